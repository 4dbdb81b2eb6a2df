"""Carbon-fixation routes as first-class objects: a route is a named set of reactions that is
allowed to be the only entry of carbon from the carbon source (CO2); every other reaction that
consumes the carbon source is closed in that direction while the route is asked.

Routes come from a route file (``routes.toml`` beside the network, or named with ``--routes``)::

    carbon_source = "co2"                  # optional: default the compound with thermo key CO2
    shared = ["CPS"]                       # optional: carbon entries open for every route

    [routes.acetyl_coa]
    name = "acetyl-CoA pathway"            # optional: words for tables and figures
    pathways = ["acetyl-CoA pathway (methyl branch)", "acetyl-CoA pathway (carbonyl branch)"]
    reactions = ["PFOR"]                   # further reactions (ids) of the route
    exclude = ["ACL"]                      # optional: reactions blocked while the route is asked

or, without a file, one route per pathway tag that holds a carbon-fixing reaction
(:func:`routes_from_pathways`). A reaction "fixes" carbon in the direction in which it consumes
the carbon source (a carboxylation forward, a decarboxylation run backwards); decarboxylations
run forwards stay open for every route.
"""

from __future__ import annotations

import contextlib
import difflib
from dataclasses import dataclass
from pathlib import Path
from typing import Iterator

import cobra

from ..errors import InputError
from .checks import is_boundary_reaction

try:  # Python 3.11+
    import tomllib
except ModuleNotFoundError:  # pragma: no cover - Python 3.10
    import tomli as tomllib

#: The file of routes read beside a network when no other is named.
ROUTE_FILE = "routes.toml"
#: Names of the carbon source tried when the route file names none.
CARBON_SOURCE_NAMES = ("CO2", "co2", "carbon dioxide", "CO2tot")
_ROUTE_KEYS = ("name", "pathways", "reactions", "exclude")
_FILE_KEYS = ("carbon_source", "shared", "routes")


@dataclass(frozen=True)
class Route:
    """A carbon-fixation route: ``id``, words ``name``, its ``reactions`` (ids, in network order),
    where it was defined (``defined_by``), the ``excluded`` reactions blocked while it is asked
    and the ``shared`` carbon entries left open for every route."""

    id: str
    name: str
    reactions: tuple[str, ...]
    defined_by: str = ""
    excluded: tuple[str, ...] = ()
    shared: tuple[str, ...] = ()


def pathway_tag(reaction: cobra.Reaction) -> str:
    """The pathway tag of a reaction (``pathway`` note, else cobra's subsystem; may be empty)."""
    return str((reaction.notes or {}).get("pathway") or reaction.subsystem or "")


def carbon_source(model: cobra.Model, name: str | None = None) -> cobra.Metabolite:
    """The carbon source: the compound ``name`` (id, name, synonym or thermo key), else the one
    named CO2.

    Raises
    ------
    InputError
        When none is found.
    """
    from .currency_rewrites import find_compound

    names = (name,) if name else CARBON_SOURCE_NAMES
    met = find_compound(model, names)
    if met is None:
        raise InputError(f"no carbon source {' or '.join(names)} in network {model.id}; name it "
                         f"with carbon_source = \"ID\" in the route file")
    return met


def carbon_fixing(model: cobra.Model, carbon: cobra.Metabolite) -> dict[str, int]:
    """Reaction id -> direction (+1 forward, -1 backward) in which an internal reaction consumes
    the carbon source, for every one that can run that way."""
    out = {}
    for reaction in model.reactions:
        if is_boundary_reaction(reaction) or carbon not in reaction.metabolites:
            continue
        coefficient = reaction.metabolites[carbon]
        direction = 1 if coefficient < 0 else -1
        if (direction > 0 and reaction.upper_bound > 0) or (direction < 0 and reaction.lower_bound < 0):
            out[reaction.id] = direction
    return out


def routes_from_pathways(model: cobra.Model, carbon: cobra.Metabolite) -> list[Route]:
    """One route per pathway tag that holds a carbon-fixing reaction, in network order."""
    fixing = carbon_fixing(model, carbon)
    tags: dict[str, list[str]] = {}
    for reaction in model.reactions:
        tag = pathway_tag(reaction)
        if tag and not is_boundary_reaction(reaction):
            tags.setdefault(tag, []).append(reaction.id)
    return [Route(_slug(tag), tag, tuple(ids), f"pathway tag '{tag}'")
            for tag, ids in tags.items() if any(r in fixing for r in ids)]


def _slug(text: str) -> str:
    out = "".join(c if c.isalnum() else "_" for c in text.lower())
    while "__" in out:
        out = out.replace("__", "_")
    return out.strip("_")


def read_routes(path: str | Path, model: cobra.Model) -> tuple[list[Route], str | None]:
    """Routes of a route file (see the module text) and its carbon source (None: default).

    Raises
    ------
    InputError
        Naming the file and the route or key at fault: unknown keys, a pathway no reaction
        carries, a reaction not in the network, a route without reactions.
    """
    from ..util.files import read_input_text

    path = Path(path)
    try:
        data = tomllib.loads(read_input_text(path, "route file"))
    except tomllib.TOMLDecodeError as err:
        raise InputError(f"{path}: not valid TOML ({err}); see docs/formats.md, route files") from None
    unknown = [k for k in data if k not in _FILE_KEYS]
    if unknown:
        raise InputError(f"{path}: unknown key(s) {', '.join(unknown)}; a route file has "
                         "carbon_source, shared and [routes.ID] tables")
    routes_data = data.get("routes")
    if not isinstance(routes_data, dict) or not routes_data:
        raise InputError(f"{path}: no routes; add a table [routes.ID] with pathways and/or reactions")
    tags: dict[str, list[str]] = {}
    for reaction in model.reactions:
        tags.setdefault(pathway_tag(reaction).lower(), []).append(reaction.id)
    ids = {r.id for r in model.reactions}

    def reaction_ids(value, where: str, key: str) -> list[str]:
        out = []
        for rid in _strings(value, where, key):
            if rid not in ids:
                close = difflib.get_close_matches(rid, sorted(ids), n=1)
                raise InputError(f"{where}: reaction '{rid}' is not in the network"
                                 + (f"; did you mean '{close[0]}'?" if close else ""))
            out.append(rid)
        return out

    shared = tuple(reaction_ids(data.get("shared", []), str(path), "shared"))
    routes = []
    for route_id, spec in routes_data.items():
        where = f"{path}, route {route_id}"
        if not isinstance(spec, dict):
            raise InputError(f"{where}: give a table with pathways and/or reactions")
        for key in spec:
            if key not in _ROUTE_KEYS:
                close = difflib.get_close_matches(key, _ROUTE_KEYS, n=1)
                raise InputError(f"{where}: unknown key '{key}'"
                                 + (f"; did you mean '{close[0]}'?" if close else
                                    f"; use {', '.join(_ROUTE_KEYS)}"))
        members: list[str] = []
        for tag in _strings(spec.get("pathways", []), where, "pathways"):
            found = tags.get(tag.lower())
            if not found:
                close = difflib.get_close_matches(tag.lower(), [t for t in tags if t], n=1)
                raise InputError(f"{where}: no reaction carries the pathway tag '{tag}'"
                                 + (f"; did you mean '{close[0]}'?" if close else ""))
            members += found
        members += reaction_ids(spec.get("reactions", []), where, "reactions")
        excluded = reaction_ids(spec.get("exclude", []), where, "exclude")
        members = [m for m in members if m not in excluded]
        if not members:
            raise InputError(f"{where}: the route has no reactions; list pathways or reactions")
        order = {r.id: k for k, r in enumerate(model.reactions)}
        members = sorted(set(members), key=order.get)
        routes.append(Route(str(route_id), str(spec.get("name") or route_id), tuple(members),
                            f"route file {path.name}", tuple(excluded), shared))
    source = data.get("carbon_source")
    if source is not None and not isinstance(source, str):
        raise InputError(f"{path}: carbon_source must be a compound id in quotes")
    return routes, source


def _strings(value, where: str, key: str) -> list[str]:
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        raise InputError(f"{where}: {key} must be a list of names in quotes")
    return value


def network_routes(model: cobra.Model, route_file: str | Path | None = None,
                   network_folder: Path | None = None) -> tuple[list[Route], cobra.Metabolite]:
    """The routes to compare and the carbon source: the route file named, else ``routes.toml``
    in the network's folder, else one route per carbon-fixing pathway tag."""
    path = Path(route_file) if route_file else None
    if path is None and network_folder is not None and (Path(network_folder) / ROUTE_FILE).is_file():
        path = Path(network_folder) / ROUTE_FILE
    if path is not None:
        routes, source = read_routes(path, model)
        return routes, carbon_source(model, source)
    carbon = carbon_source(model)
    return routes_from_pathways(model, carbon), carbon


@contextlib.contextmanager
def route_only(model: cobra.Model, route: Route, carbon: cobra.Metabolite) -> Iterator[list[str]]:
    """Close, for the duration of the context, the carbon-fixing direction of every reaction not
    in ``route`` (nor among its shared entries), and block its excluded reactions (``with
    model:``, undone on exit); yields the ids closed."""
    members = set(route.reactions) | set(route.shared)
    closed = []
    with model:
        for rid in route.excluded:
            if rid in model.reactions:
                model.reactions.get_by_id(rid).bounds = (0.0, 0.0)
                closed.append(rid)
        for rid, direction in carbon_fixing(model, carbon).items():
            if rid in members or rid not in model.reactions:
                continue
            reaction = model.reactions.get_by_id(rid)
            if direction > 0:
                reaction.upper_bound = 0.0
            else:
                reaction.lower_bound = 0.0
            closed.append(rid)
        yield closed
