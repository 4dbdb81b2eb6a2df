"""The ways a network is asked to run ("modes"), each defined once.

A mode is a sequence of network rewrites (applied in order by :func:`tfa.network.rewrites.apply_mode`)
plus the words, labels and colour every output uses for it. Everything that names a mode (the
command line's choices, the summary, the figures, the report) reads this registry, and a combined
mode is one more entry whose ``rewrites`` list more than one rewrite, not a new code path.

The rewrites (see :mod:`tfa.network.rewrites` for what each does to a network):

- ``cofactors_internal``: electron carriers and adenine nucleotides are internal; their boundary
  reactions are blocked, so the network must regenerate them.
- ``carriers_to_h2``: every electron-carrier pair is replaced by H2 (N/2 H2 per N-electron unit).
- ``atp_removed``: ATP, ADP, AMP and pyrophosphate are unavailable; every reaction with one of them
  is blocked.
- ``atp_to_bare_chemistry``: each ATP-, ADP- or pyrophosphate-coupled reaction becomes its bare
  chemistry (the coupling to the hydrolysis is subtracted).
- ``currency_acetyl_phosphate``, ``currency_thioester``, ``currency_pyrophosphate``,
  ``currency_polyphosphate``: each ATP-coupled step is coupled to the hydrolysis of another donor
  instead (acetyl phosphate -> acetate, acetyl-CoA -> acetate + CoA, PPi -> 2 Pi, one
  phosphoanhydride of polyphosphate), see :mod:`tfa.network.currency_rewrites`.
- ``atp_coupling_optional``: each ATP-coupled step may run coupled or as its bare chemistry
  (a twin reaction); the fewest-couplings analysis chooses.

Modes combine: ``parse_modes("h2_only+acetyl_phosphate")`` registers (once) the mode whose
rewrites are those of both parts; combinations that make no sense are refused with the reason.

This module imports nothing heavy (no cobra), so that the command line can list the modes fast.

Examples
--------
>>> get_mode("h2_only").rewrites
('carriers_to_h2',)
>>> parse_modes("native, no_atp_bare")
['native', 'no_atp_bare']
>>> parse_modes("all") == list(STANDARD_MODES)
True
>>> get_mode(parse_modes("h2_only+acetyl_phosphate")[0]).rewrites
('carriers_to_h2', 'currency_acetyl_phosphate')
>>> parse_modes("no_atp_strict+thioester")
Traceback (most recent call last):
...
tfa.errors.InputError: mode no_atp_strict+thioester: ATP is treated two ways (atp_removed, currency_thioester); choose one of removing it, stripping it to bare chemistry, a currency substitution or the coupling choice
"""

from __future__ import annotations

from dataclasses import dataclass

from .errors import InputError

#: Names of the network rewrites a mode can be made of, in the order they may be combined.
REWRITES = ("cofactors_internal", "carriers_to_h2", "atp_removed", "atp_to_bare_chemistry",
            "currency_acetyl_phosphate", "currency_thioester", "currency_pyrophosphate",
            "currency_polyphosphate", "atp_coupling_optional")
#: The energy currencies that can take the place of ATP (rewrite ``currency_<id>``).
CURRENCY_IDS = ("acetyl_phosphate", "thioester", "pyrophosphate", "polyphosphate")
#: Rewrites that each decide what ATP is; at most one of them per mode.
ATP_TREATMENTS = frozenset({"atp_removed", "atp_to_bare_chemistry", "atp_coupling_optional"}
                           | {f"currency_{c}" for c in CURRENCY_IDS})

#: Rewrites that cannot be combined in one mode, with the reason.
EXCLUSIVE_REWRITES = {
    frozenset({"atp_removed", "atp_to_bare_chemistry"}):
        "ATP cannot be both removed and stripped to bare chemistry; choose one",
    frozenset({"cofactors_internal", "carriers_to_h2"}):
        "carriers cannot be both kept internal and replaced by H2; choose one",
}


@dataclass(frozen=True)
class Mode:
    """One way of asking a network to run.

    Attributes
    ----------
    id : str
        The identifier used in files, options and tables (``native``, ``h2_only`` ...).
    rewrites : tuple of str
        Names of the rewrites (:data:`REWRITES`), applied in this order.
    question : str
        The question in words, as the summary asks it ("runs without ATP").
    label : str
        Short label for tick marks and table headers.
    title : str
        Longer label for legends and the report.
    colour : str
        Colour of the mode in every figure (Okabe & Ito 2008 colour-blind-safe palette).
    needs : tuple of str
        Compound roles the mode needs in a network (``h2``, ``carriers``, ``atp``): a network
        without them cannot be asked this question.
    description : str
        One or two sentences for the report.
    """

    id: str
    rewrites: tuple[str, ...]
    question: str
    label: str
    title: str
    colour: str
    needs: tuple[str, ...] = ()
    description: str = ""

    def __post_init__(self) -> None:
        unknown = [r for r in self.rewrites if r not in REWRITES]
        if unknown:
            raise InputError(f"mode {self.id}: unknown rewrite(s) {', '.join(unknown)}; use "
                             f"{', '.join(REWRITES)}")
        for pair, why in EXCLUSIVE_REWRITES.items():
            if pair <= set(self.rewrites):
                raise InputError(f"mode {self.id}: {why}")
        treatments = [r for r in self.rewrites if r in ATP_TREATMENTS]
        if len(treatments) > 1:
            raise InputError(f"mode {self.id}: ATP is treated two ways ({', '.join(treatments)}); "
                             "choose one of removing it, stripping it to bare chemistry, a currency "
                             "substitution or the coupling choice")
        if len(set(self.rewrites)) != len(self.rewrites):
            raise InputError(f"mode {self.id}: a rewrite is named twice")


#: Okabe-Ito colours used for modes (M. Okabe, K. Ito, "Color Universal Design", 2008).
_BLUE, _GREEN, _ORANGE, _PURPLE, _SKY = "#0072B2", "#009E73", "#E69F00", "#CC79A7", "#56B4E9"

#: Every mode, in the order outputs list them.
MODES: dict[str, Mode] = {}


def register_mode(mode: Mode) -> Mode:
    """Add a mode to the registry (its id must be new); returns it.

    Raises
    ------
    InputError
        When a mode with that id exists already.
    """
    if mode.id in MODES:
        raise InputError(f"mode {mode.id} is registered already; give the new mode another id")
    MODES[mode.id] = mode
    return mode


register_mode(Mode(
    "native", ("cofactors_internal",), "runs with the ATP its own reactions make", "native",
    "native (ATP made by the network)", _BLUE,
    description="The network as given: carriers and ATP are internal and must be regenerated by "
                "its own reactions (the summary names the energy source that makes the ATP, e.g. "
                "the proton gradient with its ΔpH and H⁺/ATP)."))
register_mode(Mode(
    "h2_only", ("carriers_to_h2",), "runs with H2 in place of the carriers", "H2 for carriers",
    "H2 in place of carriers", _GREEN, needs=("h2", "carriers"),
    description="Every electron-carrier pair (NAD(P)H, ferredoxin ...) is replaced by H2."))
register_mode(Mode(
    "no_atp_strict", ("atp_removed",), "runs without ATP", "without ATP", "without ATP",
    _ORANGE, needs=("atp",),
    description="ATP, ADP, AMP and pyrophosphate are unavailable: every reaction using one is "
                "blocked."))
register_mode(Mode(
    "no_atp_bare", ("atp_to_bare_chemistry",), "runs as bare chemistry (ATP coupling stripped)",
    "bare chemistry", "bare chemistry (ATP coupling stripped)", _PURPLE, needs=("atp",),
    description="Each ATP-coupled reaction becomes its own chemistry, without the coupling."))
register_mode(Mode(
    "h2_bare", ("carriers_to_h2", "atp_to_bare_chemistry"),
    "runs on H2 alone without ATP (H2 for the carriers, ATP coupling stripped)",
    "H2, bare chemistry", "H2 in place of carriers and bare chemistry", _SKY,
    needs=("h2", "carriers", "atp"),
    description="The geochemical analogue: H2 in place of every carrier and no ATP coupling."))

register_mode(Mode(
    "h2_no_atp", ("carriers_to_h2", "atp_removed"),
    "runs on H2 alone without ATP (H2 for the carriers, every ATP step blocked)",
    "H2, without ATP", "H2 in place of carriers and without ATP", "#D55E00",
    needs=("h2", "carriers", "atp"),
    description="H2 in place of every carrier and every reaction with ATP, ADP, AMP or "
                "pyrophosphate blocked."))

#: Colours of the currency modes (Okabe-Ito yellow, vermillion, grey, black; Tol's teal).
_CURRENCY_COLOURS = {"acetyl_phosphate": "#F0E442", "thioester": "#882255",
                     "pyrophosphate": "#999999", "polyphosphate": "#44AA99"}
_CURRENCY_WORDS = {"acetyl_phosphate": ("acetyl phosphate", "acetyl phosphate -> acetate + Pi"),
                   "thioester": ("thioester", "acetyl-CoA -> acetate + CoA"),
                   "pyrophosphate": ("pyrophosphate", "PPi -> 2 Pi"),
                   "polyphosphate": ("polyphosphate", "one phosphoanhydride of polyphosphate -> Pi")}
for _currency in CURRENCY_IDS:
    _word, _hydrolysis = _CURRENCY_WORDS[_currency]
    register_mode(Mode(
        _currency, ("cofactors_internal", f"currency_{_currency}"),
        f"runs on {_word} in place of ATP", f"{_word} for ATP", f"{_word} in place of ATP",
        _CURRENCY_COLOURS[_currency], needs=("atp", f"currency:{_currency}"),
        description=f"Every ATP-coupled step is coupled to {_hydrolysis} instead; ATP, ADP and "
                    "AMP leave the network."))
register_mode(Mode(
    "coupling_choice", ("cofactors_internal", "atp_coupling_optional"),
    "runs when each ATP-coupled step may drop its coupling", "coupling optional",
    "each ATP coupling optional", "#332288", needs=("atp",),
    description="Every ATP-coupled step may run coupled or as its bare chemistry (the "
                "fewest-couplings analysis counts the couplings kept)."))

#: The modes an assessment asks about by default, in order.
STANDARD_MODES = ("native", "h2_only", "no_atp_strict", "no_atp_bare")
#: The mode of the single-mode analyses (H2 scan and threshold, driving force, ranges, profile).
DEFAULT_MODE = "native"


def get_mode(mode_id: str) -> Mode:
    """The registered mode with this id (a combined id ``a+b`` is registered on first use).

    >>> get_mode("h2_only+pyrophosphate").rewrites
    ('carriers_to_h2', 'currency_pyrophosphate')

    Raises
    ------
    InputError
        For an unknown id, listing the known ones.
    """
    if mode_id not in MODES and "+" in str(mode_id):
        # a combined mode named in another process (a worker) is registered here on first use
        return combine_modes([p.strip() for p in str(mode_id).split("+") if p.strip()])
    try:
        return MODES[mode_id]
    except KeyError:
        raise InputError(f"mode '{mode_id}' is not known; use one of {', '.join(MODES)}") from None


def combine_modes(parts: list[str]) -> Mode:
    """The mode made of several registered modes (registered under ``a+b`` the first time).

    Its rewrites are those of the parts, in the order of :data:`REWRITES`; the carriers are kept
    internal (``cofactors_internal``, the base of ``native`` and the currency modes) unless one
    part replaces them by H2 and ``native`` itself is not named. A combination that makes no
    sense is refused with the reason (:class:`Mode` checks it).

    >>> combine_modes(["h2_only", "no_atp_bare"]).rewrites
    ('carriers_to_h2', 'atp_to_bare_chemistry')
    """
    unknown = [p for p in parts if p not in MODES]
    if unknown:
        raise InputError(f"modes '{'+'.join(parts)}': unknown mode(s) {', '.join(unknown)}; "
                         f"combine registered modes: {', '.join(MODES)}")
    mode_id = "+".join(parts)
    if mode_id in MODES:
        return MODES[mode_id]
    rewrites = {r for p in parts for r in MODES[p].rewrites}
    if "carriers_to_h2" in rewrites and "native" not in parts:
        rewrites.discard("cofactors_internal")
    ordered = tuple(r for r in REWRITES if r in rewrites)
    defined = [MODES[p] for p in parts]
    mode = Mode(mode_id, ordered, " and ".join(m.question for m in defined),
                " + ".join(m.label for m in defined), " + ".join(m.title for m in defined),
                defined[-1].colour, tuple(dict.fromkeys(n for m in defined for n in m.needs)),
                " ".join(m.description for m in defined))
    if len(parts) == 1:
        return mode
    return register_mode(mode)


def parse_modes(text: str | list[str] | tuple[str, ...]) -> list[str]:
    """A comma-separated list of mode ids (or ``all`` for :data:`STANDARD_MODES`) -> ids; an
    item ``a+b`` combines registered modes (:func:`combine_modes`).

    Raises
    ------
    InputError
        For an empty list, an unknown mode or a combination that makes no sense.
    """
    if isinstance(text, str):
        if text.strip().lower() == "all":
            return list(STANDARD_MODES)
        items = [m.strip() for m in text.split(",") if m.strip()]
    else:
        items = [str(m).strip() for m in text]
    for item in items:
        if "+" in item and item not in MODES:
            combine_modes([p.strip() for p in item.split("+") if p.strip()])
    bad = [m for m in items if m not in MODES]
    if bad or not items:
        raise InputError(f"modes '{text if isinstance(text, str) else ','.join(items)}': unknown "
                         f"mode(s) {', '.join(bad) or '(none given)'}; use a comma-separated list of "
                         f"{', '.join(MODES)} or 'all'")
    return list(dict.fromkeys(items))
