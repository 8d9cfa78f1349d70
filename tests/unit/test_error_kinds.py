"""Every kind of input error the package can raise is raised by some case here.

The table below is also the source of docs/robustness.md
(``python tools/make_robustness_table.py``): one bad input per row, with the
message the tool gives for it.
"""

import ast
import json
import os
import tempfile
from pathlib import Path

import pytest

from rotorcalc.errors import InputError
from rotorcalc.reader import parse_rotor, read_rotor
from rotorcalc.variants import apply_change, parse_change
from tests.conftest import ROOT

PUMP = (ROOT / "cases" / "feed_pump.toml").read_text()


def mutated(old, new):
    assert old in PUMP, old
    return lambda: parse_rotor(PUMP.replace(old, new, 1), source="pump.toml")


SLEEVE = (ROOT / "cases" / "feed_pump_sleeve.toml").read_text()


def sleeve(old, new, before=""):
    """The feed pump on bearings from their geometry, its first film bearing changed (the
    error is raised before any film is solved)."""
    assert old in SLEEVE, old
    text = SLEEVE.replace("[bearing.film]", before + "[bearing.film]", 1) if before else SLEEVE
    return lambda: parse_rotor(text.replace(old, new, 1), source="pump_sleeve.toml")


def change(text):
    rotor = read_rotor(ROOT / "cases" / "feed_pump.toml")
    return lambda: apply_change(rotor, parse_change(text))


STUDY = f"""rotor = "{(ROOT / 'cases' / 'feed_pump.toml').as_posix()}"
samples = 10
seed = 1

[[uncertain]]
name = "stiffness"
change = "bearing.*.kdirect"
distribution = "uniform"
low = 0.8
high = 1.2
"""


def study(old, new, extra=""):
    """A study file of the feed pump with one edit (and ``extra`` text after it), read and
    its changes checked on the rotor, as ``rotorcalc study`` does before any sample."""
    def call():
        from rotorcalc.analysis.study import check_plan
        from rotorcalc.study_file import read_study
        assert old in STUDY, old
        with tempfile.TemporaryDirectory() as tmp:
            path = Path(tmp) / "pump_study.toml"
            path.write_text(STUDY.replace(old, new, 1) + extra, encoding="utf-8")
            rotor_path, plan = read_study(path)
            check_plan(read_rotor(rotor_path), plan)
    return call


SECOND = '\n[[uncertain]]\nname = "mass"\nchange = "disk.*.mass"\ndistribution = "uniform"\n'


#: (kind, what is wrong, the call that must raise it)
CASES = [
    ("syntax", "TOML syntax error", mutated('length = "140 mm"', 'length = "140 mm')),
    ("syntax", "a what-if change outside the grammar", change("bearing.*.k ** 2")),
    ("unknown-key", "a misspelt key", mutated('outer_diameter = "60 mm"', 'outer_diamter = "60 mm"')),
    ("unknown-key", "a change naming a bearing that does not exist", change("bearing.XX.k *= 2")),
    ("missing", "a required key left out", mutated('length = "140 mm"\nouter_diameter = "60 mm"',
                                                   'outer_diameter = "60 mm"')),
    ("missing", "a rotor with no shaft", lambda: parse_rotor(
        '[operating]\nmin_speed = "1 rpm"\nmax_speed = "2 rpm"\n')),
    ("type", "text where a whole number is expected", mutated("mode_count = 6", 'mode_count = "six"')),
    ("not-finite", "NaN or infinite value", mutated('mass = "11.8 kg"', 'mass = "nan kg"')),
    ("range", "a negative length", mutated('length = "140 mm"', 'length = "-140 mm"')),
    ("range", "a zero mass", mutated('mass = "11.8 kg"', "mass = 0")),
    ("range", "inner diameter not below outer", mutated('outer_diameter = "150 mm"\ninner_diameter = "60 mm"',
                                                        'outer_diameter = "150 mm"\ninner_diameter = "160 mm"')),
    ("unit", "a unit of the wrong dimension", mutated('kxx = "1.5e7 N/m"', 'kxx = "1.5e7 kg"')),
    ("unit", "a speed without an angle or revolution", mutated('max_speed = "3600 rpm"',
                                                              'max_speed = "3600 /min"')),
    ("order", "speed table not strictly increasing",
     mutated('speeds = ["1500 rpm", "2500 rpm"', 'speeds = ["2500 rpm", "1500 rpm"')),
    ("order", "operating minimum above maximum", mutated('min_speed = "2400 rpm"', 'min_speed = "4000 rpm"')),
    ("length", "coefficient table of another length than its speeds",
     mutated('kxx = ["1.10e8 N/m", "1.25e8 N/m", "1.40e8 N/m", "1.55e8 N/m", "1.70e8 N/m", "1.77e8 N/m"]', 'kxx = ["1.10e8 N/m"]')),
    ("station", "a part at a station that does not exist", mutated("at = 6\nkxx", "at = 60\nkxx")),
    ("station", "a part at a station name that does not exist", mutated('at = "stage_1"', 'at = "stage_one"')),
    ("duplicate", "two bearings of one name", mutated('name = "NDE"', 'name = "DE"')),
    ("unknown-material", "a reference to an unknown material",
     mutated('material = "shaft_steel"', 'material = "shaft_stel"')),
    ("conflict", "shear modulus and Poisson's ratio both given",
     mutated("poisson_ratio = 0.29", 'poisson_ratio = 0.29\nshear_modulus = "80 GPa"')),
    ("choice", "an unknown choice", mutated("mode_count = 6", 'mode_count = 6\nbeam_theory = "thick"')),
    ("file", "a file that cannot be read", lambda: read_rotor(ROOT / "cases" / "no-such.toml")),
    # round two: impossible physics, dimensionless units, magnitudes, sizes, plain text
    ("range", "negative direct damping", mutated('cxx = "2.0e4 N*s/m"', 'cxx = "-2.0e4 N*s/m"')),
    ("physics", "cross-coupled stiffness making a principal stiffness negative",
     mutated('kxy = "4.0e6 N/m"\nkyx = "-4.0e6 N/m"', 'kxy = "4.0e7 N/m"\nkyx = "4.0e7 N/m"')),
    ("physics", "a disk with polar inertia over twice its transverse inertia",
     mutated('polar_inertia = "0.062 kg*m^2"', 'polar_inertia = "0.62 kg*m^2"')),
    ("physics", "a shear modulus implying a Poisson ratio above 0.5",
     mutated("poisson_ratio = 0.29", 'shear_modulus = "1 GPa"')),
    ("unit", "a dimensionless unit where a length is expected",
     mutated('length = "140 mm"', 'length = "50 percent"')),
    ("range", "a length outside the range of any machine",
     mutated('length = "140 mm"', 'length = "1e-300 m"')),
    ("range", "a stiffness outside the range of any machine",
     mutated('kxx = "1.5e7 N/m"', 'kxx = "1e60 N/m"')),
    ("range", "a negative speed", mutated('min_speed = "2400 rpm"', 'min_speed = "-2400 rpm"')),
    ("unit", "a power tower in a unit", mutated('length = "140 mm"', 'length = "9**9**9 mm"')),
    ("size", "more sweep speeds than a sweep needs",
     mutated("speed_count = 41", "speed_count = 1000000000000")),
    ("size", "a title of a megabyte",
     mutated('title = "Six-stage', 'title = "' + "x" * 1_000_000 + '')),
    ("type", "a control character in a name", mutated('name = "DE"', 'name = "DE\\u0007"')),
    ("conflict", "a source given both as q and as coefficients", lambda: parse_rotor(
        PUMP + '\n[[cross_coupling]]\nat = 6\nq = "1e6 N/m"\nkxy = "1 N/m"\n')),
    ("range", "a stage estimate with a negative density ratio", lambda: parse_rotor(
        PUMP + '\n[[cross_coupling]]\nat = 6\nstage = { power = "1 MW", impeller_diameter = '
        '"300 mm", passage_width = "10 mm", density_ratio = -1 }\n')),
    ("choice", "an unknown placement of the cross-coupling screen", lambda: parse_rotor(
        PUMP + '\n[coupling_screen]\nplacement = "everywhere"\n')),
    ("range", "a cross-coupling sweep shorter than ten times the expected amount",
     lambda: parse_rotor(PUMP + '\n[coupling_screen]\ntop_ratio = 3\n')),
    # bearings from their geometry (cases/feed_pump_sleeve.toml)
    ("conflict", "coefficients beside a film", sleeve('bore = "plain"', 'bore = "plain"',
                                                      before='kxx = "1e8 N/m"\n')),
    ("unit", "a temperature without a unit", sleeve('inlet_temperature = "45 degC"',
                                                    "inlet_temperature = 45")),
    ("range", "a clearance too large for a thin film", sleeve('clearance = "70 um"',
                                                              'clearance = "5 mm"')),
    ("choice", "an oil grade that is no ISO viscosity grade", sleeve("grade = 46", "grade = 47")),
    ("missing", "a film without its oil", sleeve('[bearing.oil]\ngrade = 46\n'
                                                 'inlet_temperature = "45 degC"\n', "")),
    # changes to the loads
    ("missing", "a change to cross-coupling on a rotor without sources",
     change("cross_coupling.*.q *= 2")),
    ("unknown-key", "a change naming an unbalance case that does not exist",
     change("unbalance.top.amount *= 2")),
    ("syntax", "a change scaling an unbalance's phase", change("unbalance.couple.phase *= 2")),
    # study files (rotorcalc study, docs/scale.md)
    ("missing", "a study file naming no rotor", study('rotor = "', '# rotor = "')),
    ("missing", "a study file without uncertain inputs", study(
        STUDY[STUDY.index("[[uncertain]]"):], "")),
    ("unknown-key", "a misspelt key in a study file", study("seed = 1", "sed = 1")),
    ("range", "a study of no samples", study("samples = 10", "samples = 0")),
    ("choice", "an unknown sampling", study("seed = 1", 'seed = 1\nsampling = "random"')),
    ("type", "a negative seed", study("seed = 1", "seed = -1")),
    ("range", "a confidence of 100 %", study("seed = 1", "seed = 1\nconfidence = 1.0")),
    ("choice", "an unknown influence measure", study("seed = 1", 'seed = 1\nindices = "fast"')),
    ("choice", "an unknown distribution", study('"uniform"', '"gaussian"')),
    ("unknown-key", "a parameter of another distribution", study("high = 1.2",
                                                                  "high = 1.2\nsd = 0.1")),
    ("missing", "a distribution's parameter left out", study("high = 1.2", "")),
    ("type", "a parameter that is not a number", study("high = 1.2", 'high = "1.2"')),
    ("range", "a uniform range upside down", study("high = 1.2", "high = 0.7")),
    ("range", "a triangular mode outside its range", study(
        'distribution = "uniform"\nlow = 0.8\nhigh = 1.2',
        'distribution = "triangular"\nlow = 0.8\nmode = 1.3\nhigh = 1.2')),
    ("range", "a normal spread of zero", study(
        'distribution = "uniform"\nlow = 0.8\nhigh = 1.2',
        'distribution = "normal"\nmean = 1.0\nsd = 0')),
    ("range", "a lognormal median of zero", study(
        'distribution = "uniform"\nlow = 0.8\nhigh = 1.2',
        'distribution = "lognormal"\nmedian = 0\nsigma = 0.1')),
    ("range", "a normal factor that can reach zero", study(
        'distribution = "uniform"\nlow = 0.8\nhigh = 1.2',
        'distribution = "normal"\nmean = 1.0\nsd = 0.3')),
    ("range", "a uniform factor that can reach zero", study("low = 0.8", "low = 0")),
    ("choice", "an unknown way to apply a value", study('change = "', 'by = "add"\nchange = "')),
    ("conflict", "a unit on a factor", study('change = "', 'unit = "N/m"\nchange = "')),
    ("missing", "an input without a change", study('change = "bearing.*.kdirect"', "")),
    ("type", "an input name that is not text", study('name = "stiffness"', "name = 3")),
    ("duplicate", "two inputs of one name", study("samples = 10", "samples = 10",
                                                  SECOND.replace('"mass"', '"stiffness"')
                                                  + "low = 0.9\nhigh = 1.1\n")),
    ("unknown-key", "a study input whose change does not fit the rotor",
     study("bearing.*.kdirect", "bearing.XX.kdirect")),
]

#: Kinds raised only by the command line (tested in tests/cli): refusing to
#: write over the input or a picture with an unknown extension ("output"), and
#: a command-line option that cannot be used ("option").
CLI_ONLY = {"output", "option"}


@pytest.mark.parametrize("kind,what,call", CASES, ids=[f"{k}:{w}" for k, w, _ in CASES])
def test_kind_is_raised(kind, what, call):
    with pytest.raises(InputError) as info:
        call()
    err = info.value
    assert err.kind == kind, err.message()
    assert err.key and err.message()
    record = os.environ.get("ROTORCALC_RECORD_ERRORS")
    if record:
        with open(record, "a", encoding="utf-8") as handle:
            handle.write(json.dumps({"kind": kind, "what": what, "key": err.key,
                                     "message": err.message()}) + "\n")


def kinds_in_code():
    """The ``kind=`` of every ``InputError(...)`` call in the package (read from the AST)."""
    used = set()
    for path in (ROOT / "rotorcalc").rglob("*.py"):
        if path.name == "errors.py":
            continue  # the class itself: with_location copies an existing kind
        for node in ast.walk(ast.parse(path.read_text())):
            if isinstance(node, ast.Call) and getattr(node.func, "id", None) == "InputError":
                kinds = [k.value for k in node.keywords if k.arg == "kind"]
                assert kinds, f"{path}:{node.lineno}: InputError without a kind"
                if isinstance(kinds[0], ast.Constant):
                    used.add(kinds[0].value)
                else:  # re-raising with a caught error's kind adds no kind of its own
                    assert ast.unparse(kinds[0]).endswith(".kind"), \
                        f"{path}:{node.lineno}: kind is neither a literal nor passed through"
    return used


def test_every_kind_in_the_code_has_a_case():
    used = kinds_in_code()
    covered = {k for k, _, _ in CASES} | CLI_ONLY
    assert used <= covered, f"input-error kinds without a test case: {sorted(used - covered)}"
