"""Every bad number, condition and environment is refused with one clear line (exit code 2):
the input gate (tfa.util.numbers) in the equation grammar, the tables, the environment, the
command line and the Python API; water must be liquid; the caps are enforced.

Physical references: the saturation pressure of water from the IAPWS-95 formulation (Wagner and
Pruss 2002, J. Phys. Chem. Ref. Data 31:387; values from memory) and from pychnosz's SUPCRT92
water model (the model of the species data). The caps themselves are "common practice" rules
of thumb, documented in tfa/util/numbers.py and the design notes ("Limits").
"""

from __future__ import annotations

import math

import pytest

import tfa
from tfa.cli import main
from tfa.conditions import Conditions
from tfa.equation import parse_equation
from tfa.errors import ConditionsError, EquationSyntaxError, InputError, NetworkFileError
from tfa.network.environment import Environment
from tfa.network.inputs import resolve_inputs
from tfa.util import numbers
from tfa.water import SATURATION, liquid_at, saturation_pressure

EQUATION = "H2 + CO2tot <=> formate + H2O"
NOTHING = ["coverage", "feasibility", "census", "h2_scan", "h2_threshold", "gradient",
           "driving_force", "energy_profile", "ranges", "robustness"]


def one_line_error(capsys, argv: list[str]) -> str:
    """Run a command in this process; it must exit 2 with one line on stderr, no traceback."""
    code = main(argv)
    captured = capsys.readouterr()
    lines = captured.err.strip().splitlines()
    assert code == 2, captured.err
    assert len(lines) == 1 and "error" in lines[0] and "Traceback" not in captured.err, captured.err
    return lines[0]


# ------------------------------------------------------------------ the gate itself
@pytest.mark.parametrize("text, words", [
    ("1/0", "divides by zero"), ("1" * 400, "400 characters"), ("nan", "NaN"),
    ("inf", "infinite"), ("1e300", "magnitude"), ("seven", "not a number"), ("", "not a number"),
])
def test_gate_refuses_non_numbers(text, words):
    with pytest.raises(InputError, match=words):
        numbers.read_number(text, "coefficient", "f.tsv line 3", fraction=True)


def test_gate_names_the_place_and_keeps_good_values():
    with pytest.raises(InputError, match=r"^f.tsv line 3: \[feed\] H2 '-1' is out of range"):
        numbers.read_activity("-1", "[feed] H2", "f.tsv line 3")
    assert numbers.read_number("2/3", "c", fraction=True) == pytest.approx(2 / 3)
    assert numbers.read_count("12", "draws") == 12
    for bad in (True, None, [1], "12.5"):
        with pytest.raises(InputError):
            numbers.read_count(bad, "draws")
    with pytest.raises(InputError, match="whole number"):
        numbers.read_count("5", "draws", text=False)       # the Python API takes an int only


# ------------------------------------------------------------------ equations
@pytest.mark.parametrize("equation, words", [
    ("1/0 H2 + CO2tot <=> formate + H2O", "divides by zero"),
    (f"{'9' * 400} H2 + CO2tot <=> formate + H2O", "400 characters"),
    ("-1 H2 + CO2tot <=> formate + H2O", "coefficient -1 must be positive"),
    ("20000 H2 <=> 20000 H2(g)", "out of range"),
])
def test_bad_coefficients_are_refused_in_dg(capsys, equation, words):
    """Formerly a ZeroDivisionError / OverflowError traceback, or '-1 H2' an unknown compound."""
    line = one_line_error(capsys, ["dg", equation])
    assert words in line


def test_bad_coefficient_in_a_reactions_table_names_file_and_line(mini_folder):
    table = mini_folder / "reactions.tsv"
    text = table.read_text().replace("co2 + nadh <=> for + nad", "1/0 co2 + nadh <=> for + nad")
    table.write_text(text)
    with pytest.raises(NetworkFileError, match=r"reactions.tsv line 3, column 'equation': column 1: "
                                               "coefficient '1/0' divides by zero"):
        tfa.load_network(mini_folder)
    table.write_text(text.replace("1/0 co2", f"{'1' * 400} co2"))
    with pytest.raises(NetworkFileError, match="400 characters"):
        tfa.load_network(mini_folder)


def test_a_huge_table_cell_is_refused_with_its_line(mini_folder):
    """A 50 MB cell: formerly csv's 'field larger than field limit' traceback."""
    table = mini_folder / "compounds.tsv"
    with table.open("a") as handle:
        handle.write("big\tbig\t\tH2\t0\t\t\t\t\t\t" + "x" * 50_000_000 + "\n")
    with pytest.raises(NetworkFileError, match=r"compounds.tsv line \d+: the line has 50,0"):
        tfa.load_network(mini_folder)


@pytest.mark.parametrize("cell, words", [("1e300", "out of range"), ("nan", "NaN"),
                                         ("inf", "infinite")])
def test_flux_bounds_in_a_table_are_capped(mini_folder, cell, words):
    table = mini_folder / "reactions.tsv"
    table.write_text(table.read_text().replace("test\tauto\t-500\t500", f"test\tauto\t-500\t{cell}"))
    with pytest.raises(NetworkFileError, match=words):
        tfa.load_network(mini_folder)


# ------------------------------------------------------------------ conditions and water
def test_pressure_nan_and_absurd_pressure_are_refused(capsys):
    """Formerly "pressure nan bar is below 1 bar", and --pressure 1e9 gave +2,404,792 kJ/mol."""
    assert "NaN" in one_line_error(capsys, ["dg", EQUATION, "--pressure", "nan"])
    line = one_line_error(capsys, ["dg", EQUATION, "--pressure", "1e9"])
    assert "pressure" in line and "<= 5000" in line


def test_hot_water_needs_its_boiling_pressure(capsys):
    """100-300 degC at the default 1 bar was computed as liquid water; now refused with the
    pressure needed (IAPWS-95: 15.5 bar at 200 degC, from memory)."""
    line = one_line_error(capsys, ["dg", EQUATION, "--temperature", "200"])
    assert "water boils at 200.0 degC below 15.5 bar" in line and "at least 15.54 bar" in line
    assert main(["dg", EQUATION, "--temperature", "200", "--pressure", "16", "--json"]) == 0
    capsys.readouterr()
    with pytest.raises(ConditionsError, match="water boils"):
        Conditions.from_celsius(120.0)
    Conditions.from_celsius(99.0)                     # below 100 degC 1 bar is enough


def test_saturation_table_against_iapws_and_pychnosz():
    """IAPWS-95 saturation pressures (Wagner and Pruss 2002; from memory): 1.0142 bar at
    100 degC, 15.549 bar at 200 degC, 85.879 bar at 300 degC; and pychnosz's SUPCRT92 water
    between the tabulated points (the interpolation in 1/T stays within 0.1 %)."""
    import contextlib
    import io
    import warnings

    import numpy as np
    pychnosz = pytest.importorskip("pychnosz")

    for celsius, iapws in ((100.0, 1.0142), (200.0, 15.549), (300.0, 85.879)):
        assert saturation_pressure(celsius) == pytest.approx(iapws, rel=2e-3)
    middles = np.array([t + 2.5 for t, _ in SATURATION[1:-1]])
    with contextlib.redirect_stdout(io.StringIO()), warnings.catch_warnings():
        warnings.simplefilter("ignore")
        reference = pychnosz.water("Psat", T=middles + 273.15, Psat_floor=None, messages=False)
    for celsius, expected in zip(middles, reference):
        assert saturation_pressure(float(celsius)) == pytest.approx(float(expected), rel=1e-3,
                                                                     abs=1e-4)
    assert liquid_at(250.0, 40.0) and not liquid_at(250.0, 39.0)


def test_ionic_strength_is_capped():
    with pytest.raises(ConditionsError, match="ionic strength"):
        Conditions(ionic_strength=1e300)


# ------------------------------------------------------------------ command-line caps
@pytest.mark.parametrize("argv, words", [
    (["feasible", "--time-limit", "inf"], "--time-limit"),
    (["feasible", "--k-sigma", "1e9"], "--k-sigma"),
    (["robustness", "--draws", "100000000"], "--draws"),
    (["assess", "--h2-levels", "1000000"], "--h2-levels"),
    (["feasible", "--alternatives", "0"], "--alternatives"),
    (["feasible", "--min-driving-force", "-1"], "--min-driving-force"),
    (["robustness", "--workers", "99999"], "--workers"),
    (["robustness", "--sigma-scale", "nan"], "--sigma-scale"),
    (["map", "--x", "temperature=0:100:1000000000", "--y", "ph=7"], "COUNT"),
])
def test_caps_on_options(capsys, argv, words):
    """--time-limit inf was an OverflowError traceback; --k-sigma 1e9 and --draws 1e8 ran for
    minutes; a huge map grid ran out of memory."""
    assert words in one_line_error(capsys, argv)


@pytest.mark.parametrize("axis", ["temperature=500,600", "h2=-1", "ph=nan", "pressure=0.5"])
def test_map_refuses_bad_axis_values_before_running(capsys, tmp_path, mini_folder, axis):
    """Formerly exit 0 with files written."""
    out = tmp_path / "map"
    line = one_line_error(capsys, ["map", str(mini_folder), "--x", axis, "--y", "ionic_strength=0.1",
                                   "--modes", "native", "--out", str(out)])
    assert "axis" in line or "map point" in line
    assert not out.exists()


# ------------------------------------------------------------------ environment files
def test_missing_demand_is_an_error_unless_named(mini_folder):
    """Without [demand] every mode was 'feasible ... meets the demand' (the zero-flux state)."""
    env = mini_folder / "environment.toml"
    text = env.read_text()
    env.write_text(text.replace('[demand]\nreaction = "DM_mal"\nflux = 0.01\n', ""))
    with pytest.raises(NetworkFileError, match=r"no \[demand\] section.*none = true"):
        resolve_inputs(mini_folder)
    env.write_text(text.replace('reaction = "DM_mal"\nflux = 0.01', "none = true"))
    assert resolve_inputs(mini_folder).environment.no_demand
    env.write_text(text.replace("flux = 0.01", "flux = 0.0"))
    with pytest.raises(NetworkFileError, match="must be > 0"):
        resolve_inputs(mini_folder)


@pytest.mark.parametrize("old, new, words", [
    ("[bounds]\n", "[bounds]\natpp = [1e-4, 1e-2]\n", ["[bounds]", "'atpp'", "did you mean 'atp'"]),
    ("[feed]\n", "[feed]\nh2s = 1e-4\n", ["[feed]", "'h2s'"]),
    ('allowed = ["ac"]', 'allowed = ["acc"]', ["[outlets]", "did you mean 'ac'"]),
    ("flux = 0.01", "flux = 0.01\nflx = 2", ["unknown key 'flx'", "did you mean 'flux'"]),
    ('name = "mini test setting"', 'name = "mini"\nnmae = "x"', ["did you mean 'name'"]),
    ("h2 = 1.0e-3", "h2 = 1e300", ["[feed] h2", "out of range"]),
    ("default = [1.0e-6, 1.0e-2]", "default = [1.0e-6, 1e300]", ["[bounds] default"]),
])
def test_environment_keys_and_values_are_checked(mini_folder, old, new, words):
    """A typo among the [bounds] keys was ignored (INFO log only); feeds of 1e300 mol/L were
    accepted."""
    env = mini_folder / "environment.toml"
    env.write_text(env.read_text().replace(old, new))
    with pytest.raises(NetworkFileError) as info:
        inputs = resolve_inputs(mini_folder)
        inputs.environment.check_network(inputs.model)    # as every run does before solving
    for word in words:
        assert word in str(info.value)


def test_a_byte_order_mark_is_accepted_in_every_table_and_toml(mini_folder):
    """A UTF-8 BOM was refused in reaction_values.tsv and environment.toml (common practice:
    spreadsheet programs write one)."""
    values = ("id\tequation\tdelta_g_standard_kJ_per_mol\tsigma_kJ_per_mol\t"
              "delta_h_standard_kJ_per_mol\ttemperature_C\tph\tionic_strength\tpmg\tsource_key\t"
              "peer_reviewed\tnote\n"
              "v1\tac + atp <=> actp + adp\t13.0\t1.0\t\t25\t7\t0.25\t\tS1\tyes\tinvented test value\n")
    (mini_folder / "reaction_values.tsv").write_text(values)
    (mini_folder / "sources.tsv").write_text("key\tauthors\tyear\tcitation\tdoi\tpeer_reviewed\n"
                                             "S1\tNobody\t2000\tinvented\t\tyes\n")
    for name in ("reactions.tsv", "compounds.tsv", "reaction_values.tsv", "sources.tsv",
                 "environment.toml"):
        path = mini_folder / name
        path.write_bytes(b"\xef\xbb\xbf" + path.read_bytes())
    inputs = resolve_inputs(mini_folder)
    assert inputs.environment.name == "mini test setting"
    assert list(inputs.network_sources()["key"]) == ["S1"]
    from tfa.network.energies import network_sources
    from tfa.thermo.literature import read_literature_values

    assert [v.id for v in read_literature_values(inputs.literature_path)] == ["v1"]
    assert list(network_sources(inputs.model)) == ["S1"]


def test_an_environment_that_is_a_pipe_or_device_is_refused(mini_folder):
    """/dev/stdin hung the tool; /dev/zero filled the memory."""
    for device in ("/dev/zero", "/dev/stdin"):
        with pytest.raises(NetworkFileError, match="not a regular file"):
            Environment.from_toml(device)


# ------------------------------------------------------------------ the Python API
@pytest.mark.parametrize("kwargs, words", [
    ({"out": 1}, "out: expected a folder path"),
    ({"draws": "5"}, "draws '5' is not a whole number"),
    ({"alternatives": None}, "alternatives None"),
    ({"conditions": {"pH": "seven"}}, "not a number"),
    ({"conditions": {"temperature": 70}}, "celsius=70 (degC) or temperature_K=70 (K)"),
    ({"conditions": {"ph_value": 7}}, "did you mean 'ph'"),
    ({"options": "x"}, "expected a ProblemOptions"),
    ({"progress": "x"}, "progress: expected a function"),
    ({"route": 3}, "route: give"),
    ({"bogus": 1}, "unknown keyword"),
    ({"h2_range": (1e-9, math.nan)}, "NaN"),
    ({"draws": 10**9}, "out of range"),
])
def test_python_api_misuse_raises_the_projects_errors(kwargs, words):
    """Formerly TypeErrors from deep inside, and temperature=70 read as 70 K without a word."""
    with pytest.raises(InputError) as info:
        tfa.assess(skip=NOTHING, **kwargs)
    assert words in str(info.value)


def test_problem_options_refuse_infinite_time_limits():
    from tfa.problem.builder import ProblemOptions

    with pytest.raises(InputError, match="infinite"):
        ProblemOptions(time_limit=math.inf)
    with pytest.raises(InputError, match="not a number"):
        ProblemOptions(uncertainty_k="x")


def test_equation_parser_keeps_fractions():
    assert parse_equation("1/2 O2 + H2 <=> H2O").stoichiometry() == {"O2": -0.5, "H2": -1.0,
                                                                     "H2O": 1.0}
    with pytest.raises(EquationSyntaxError, match="positive"):
        parse_equation("+2 H2 <=> H2(g)")
