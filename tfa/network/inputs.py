"""Where a network and its setting come from: files, the bundled demo, or objects the caller made.

:func:`resolve_inputs` is the one rule every entry point (the Python API and every command)
uses: a network given as a reactions table, a folder holding one, SBML or cobra JSON (or a
``cobra.Model``), and an environment file (TOML) or :class:`~tfa.network.environment.Environment`;
with neither, the bundled network at its own environment (demo data: the invented Kestrel Ridge
vent field); a network given without an environment (and none beside it) gets the neutral
default built from it (:mod:`tfa.network.default_environment`). Condition overrides
(``celsius``, ``ph``, ``ionic_strength``, ``pressure``, ``pmg``) replace the environment's. The
network is completed once on reading (:func:`tfa.network.completion.complete_network`).
"""

from __future__ import annotations

import logging
import warnings
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import cobra
import pandas as pd

from ..conditions import ModelRangeWarning, condition_overrides
from ..errors import InputError
from ..util.files import check_input_file, read_input_text
from .bundled import bundled_environment_path, bundled_folder
from .default_environment import neutral_environment, with_demand
from .environment import Environment
from .io_sbml import TABLE_SUFFIXES
from .io_sbml import load_network as read_any
from .io_table import reaction_values_beside

logger = logging.getLogger(__name__)

#: File name of a network's own table of data sources, beside its reactions table.
SOURCES_FILES = (("sources.tsv", "\t"), ("sources.csv", ","))


@dataclass
class Inputs:
    """A network and its setting as read, with where each came from.

    Attributes
    ----------
    model : cobra.Model
    environment : Environment
    network_source, environment_source : str
        Plain words: the files read (or "bundled network ...", "cobra model ...").
    literature_path : Path or None
        The network's own table of reaction values, when there is one.
    network_folder : Path or None
        The folder of the network's files.
    warnings : list of str
        Model-range warnings raised while reading (conditions past a model's usual range).
    completion : NetworkCompletion or None
        The identifier mapping, roles and warnings filled in on reading
        (:func:`tfa.network.completion.complete_network`).
    """

    model: cobra.Model
    environment: Environment
    network_source: str
    environment_source: str
    literature_path: Path | None = None
    network_folder: Path | None = None
    warnings: list[str] = field(default_factory=list)
    completion: Any = None

    def network_sources(self) -> pd.DataFrame | None:
        """The network's own ``sources.tsv`` (or ``.csv``) beside its reactions table, if any."""
        return network_sources(self.network_folder)


def _network_folder(path: Path) -> Path:
    return path if path.is_dir() else path.parent


def default_environment_path(network: str | Path | None) -> Path | None:
    """``environment.toml`` beside a network's files, when there is one."""
    if network is None:
        return None
    candidate = _network_folder(Path(network)) / "environment.toml"
    return candidate if candidate.is_file() else None


def resolve_inputs(network: Any = None, environment: Any = None,
                   compounds: str | Path | None = None, require_balanced: bool = True,
                   h2: str | None = None, demand: str | None = None,
                   identifiers: str | Path | None = None,
                   **conditions: float | None) -> Inputs:
    """Read the network and the environment as ``tfa`` resolves them everywhere (see
    :func:`_resolve`); model-range warnings raised on the way are recorded in
    :attr:`Inputs.warnings` (and shown as usual)."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", ModelRangeWarning)
        inputs = _resolve(network, environment, compounds, require_balanced, h2, demand,
                          identifiers, **conditions)
    for item in caught:
        if issubclass(item.category, ModelRangeWarning) and str(item.message) not in inputs.warnings:
            inputs.warnings.append(str(item.message))
        warnings.warn_explicit(item.message, item.category, item.filename, item.lineno)
    return inputs


def _resolve(network: Any = None, environment: Any = None,
             compounds: str | Path | None = None, require_balanced: bool = True,
             h2: str | None = None, demand: str | None = None,
             identifiers: str | Path | None = None,
             **conditions: float | None) -> Inputs:
    """Read the network and the environment as ``tfa`` resolves them everywhere.

    Parameters
    ----------
    network : None, path or cobra.Model
        None: the bundled network; a path: reactions table, folder, SBML or cobra JSON.
    environment : None, path or Environment
        None: ``environment.toml`` beside the network; for a network without one, the neutral
        default built from it (:mod:`tfa.network.default_environment`); for the bundled
        network, its own.
    compounds : path, optional
        Compounds table, when not ``compounds.tsv`` beside the reactions table.
    require_balanced : bool
        Refuse unbalanced reactions (the checker reads them anyway to report them).
    h2, demand : str, optional
        The H2 compound and the demand reaction (``--h2``, ``--demand``), when no role or
        environment names them.
    identifiers : path, optional
        The user's table of identifiers (default ``identifiers.tsv`` beside the network).
    conditions : float
        ``celsius`` [degC], ``ph``, ``ionic_strength`` [mol/L], ``pressure`` [bar], ``pmg``:
        overrides of the environment's conditions (None: keep).

    Raises
    ------
    InputError
        A missing file, a malformed table, an object of the wrong type.
    """
    literature = None
    folder = None
    if network is None:
        folder = bundled_folder()
        model = read_any(folder / "reactions.tsv", require_balanced=require_balanced)
        literature = reaction_values_beside(folder / "reactions.tsv")
        network_source = f"bundled network ({folder / 'reactions.tsv'})"
        default_env = bundled_environment_path()
    elif isinstance(network, (str, Path)):
        path = Path(network)
        if not path.exists():
            raise InputError(f"{path}: no such file or folder; give a reactions table, a folder "
                             "holding reactions.tsv, or an SBML/JSON file")
        if compounds is not None and not Path(compounds).is_file():
            raise InputError(f"{compounds}: no such compounds table; give the path of "
                             "compounds.tsv or leave --compounds out")
        model = read_any(path, compounds, require_balanced=require_balanced)
        folder = _network_folder(path)
        # the readers keep a reaction_values_path note only within the file's folder
        note = (model.notes or {}).get("reaction_values_path")
        literature = Path(note) if note else reaction_values_beside(folder / "reactions.tsv")
        if literature is not None:
            model.notes["reaction_values_path"] = str(literature)
        network_source = str(path)
        default_env = default_environment_path(path)
    elif isinstance(network, cobra.Model):
        model = network
        # a model made in Python is the caller's own: its note is followed, through the gate
        path = (model.notes or {}).get("reaction_values_path")
        literature = (check_input_file(path, "reaction values named by the model's note")
                      if path else None)
        network_source = f"cobra model {model.id}"
        default_env = None
    else:
        raise InputError(f"network: expected a path or a cobra.Model, got {type(network).__name__}")
    completion = _complete(model, network, identifiers, h2)
    if environment is None and default_env is None:
        env = neutral_environment(model, demand)
        env_source = "built from the network"
    elif environment is None or isinstance(environment, (str, Path)):
        env_path = Path(environment) if environment is not None else default_env
        env = Environment.from_toml(env_path)
        env_source = str(env_path)
    elif isinstance(environment, Environment):
        env = environment
        env_source = environment.source or environment.name
    else:
        raise InputError(f"environment: expected a path or an Environment, got "
                         f"{type(environment).__name__}")
    if demand is not None and env.demand_reaction != demand:
        env = with_demand(env, model, demand)
    changes = condition_overrides(conditions)
    if "ph" in changes:   # the gradient's outer protons move with the pH (dpH kept)
        from .mixing_line import environment_with_ph
        env = environment_with_ph(env, model, changes.pop("ph"))
    if changes:
        env = env.with_conditions(**changes)
    inputs = Inputs(model, env, network_source, env_source, literature, folder,
                    completion=completion)
    from .compartments import compartment_warnings

    for text in compartment_warnings(model, env):   # a compartment without a stated pH: say so
        logger.warning("%s", text)
        inputs.warnings.append(text)
    return inputs


def _complete(model: cobra.Model, network: Any, identifiers: str | Path | None, h2: str | None):
    """:func:`tfa.network.completion.complete_network` as the inputs call it."""
    from ..thermo.database import ThermoDatabase
    from .completion import complete_network
    from .identifiers import identifier_table_beside

    path = Path(network) if isinstance(network, (str, Path)) else None
    from_table = network is None or (path is not None and (
        path.is_dir() or path.suffix.lower() in TABLE_SUFFIXES))
    table = identifiers if identifiers is not None else identifier_table_beside(path)
    if identifiers is not None and not Path(identifiers).is_file():
        raise InputError(f"{identifiers}: no such identifiers table; give the path of a table "
                         "with columns compound and thermo_key")
    return complete_network(model, ThermoDatabase.load(), from_table, table, h2)


def load_network(path: str | Path | None = None, compounds: str | Path | None = None,
                 require_balanced: bool = True) -> cobra.Model:
    """Read a network: a reactions table (``.tsv``/``.csv``, ``compounds.tsv`` beside it), a
    folder holding ``reactions.tsv``, SBML (``.xml``) or cobra JSON; None reads the bundled
    network (demo data: the invented Kestrel Ridge vent field).

    Raises
    ------
    InputError
        Missing file, malformed table (with file and line), unbalanced reaction.
    """
    return resolve_inputs(path, None, compounds, require_balanced=require_balanced).model


def load_environment(path: str | Path | None = None, network: str | Path | None = None,
                     **conditions: float | None) -> Environment:
    """Read an environment file (TOML); without ``path`` the ``environment.toml`` beside the
    network, else the bundled one. ``conditions`` (``celsius``, ``ph``, ``ionic_strength``,
    ``pressure``, ``pmg``) override the file's."""
    env_path = Path(path) if path is not None else default_environment_path(network)
    environment = Environment.from_toml(env_path or bundled_environment_path())
    changes = condition_overrides(conditions)
    return environment.with_conditions(**changes) if changes else environment


def network_sources(folder: Path | None) -> pd.DataFrame | None:
    """A network's own table of data sources (``key, authors, year, citation, doi,
    peer_reviewed``) from ``sources.tsv``/``.csv`` in its folder; None when there is none.

    Raises
    ------
    InputError
        When the file exists but cannot be read as a table.
    """
    if folder is None:
        return None
    import io

    for name, sep in SOURCES_FILES:
        path = folder / name
        if path.exists():
            text = read_input_text(path, "table of sources")
            try:
                frame = pd.read_csv(io.StringIO(text), sep=sep, comment="#", dtype=str,
                                    keep_default_na=False)
            except (pd.errors.ParserError, pd.errors.EmptyDataError) as err:
                raise InputError(f"{path}: cannot be read as a table ({err}); fix it or remove it")
            return frame if "key" in frame.columns else None
    return None
