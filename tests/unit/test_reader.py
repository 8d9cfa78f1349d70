"""Reading rotor files: units, stations, defaults, and every input check firing."""

import math

import pytest

from rotorcalc.errors import InputError
from rotorcalc.reader import locate, parse_rotor

BASE = """
title = "test rotor"
[stations]
left = 0
right = 2

[materials.steel]
youngs_modulus = "206 GPa"
poisson_ratio = 0.3
density = "7850 kg/m^3"

[[section]]
length = "300 mm"
outer_diameter = "60 mm"
material = "steel"
[[section]]
length = "12 in"
outer_diameter = "60 mm"
inner_diameter = "20 mm"
material = "steel"
elements = 3

[[disk]]
at = 1
mass = "20 kg"
polar_inertia = "0.2 kg*m^2"

[[bearing]]
name = "A"
at = "left"
speeds = ["1000 rpm", "3000 rpm"]
kxx = ["1e8 N/m", "650 klbf/in"]
kyy = "1e8 N/m"
cxx = 1000

[[bearing]]
name = "B"
at = "right"
kxx = "1e8 N/m"
kyy = "1e8 N/m"
[bearing.support]
mass = "50 kg"
kx = "5e8 N/m"
ky = "5e8 N/m"

[operating]
min_speed = "2000 rpm"
max_speed = "3000 rpm"
"""


def test_reads_units_and_stations():
    rotor = parse_rotor(BASE)
    assert rotor.sections[1].length == pytest.approx(0.3048)
    assert rotor.sections[0].elements == 3  # default: ceil(L / 2D)
    assert rotor.sections[1].elements == 3
    assert rotor.bearings[0].station == 0 and rotor.bearings[1].station == 2
    assert rotor.bearings[0].table("kxx")[1] == pytest.approx(650e3 * 4.4482216152605 / 0.0254)
    assert rotor.bearings[0].speeds[0] == pytest.approx(1000 * 2 * math.pi / 60)
    assert rotor.disks[0].transverse_inertia == pytest.approx(0.1)  # default Ip / 2
    assert rotor.bearings[1].support.mass == 50.0
    assert rotor.operating.max_speed == pytest.approx(3000 * 2 * math.pi / 60)
    assert rotor.sections[0].material.shear_modulus == pytest.approx(206e9 / 2.6)


def mutate(old, new):
    assert old in BASE, old
    return BASE.replace(old, new, 1)


BAD = [
    # (replace this, with this, key named in the error, kind)
    ('outer_diameter = "60 mm"\nmaterial', 'outer_diameter = "60 mm"\nmaterail', "section[0].materail", "unknown-key"),
    ('kyy = "1e8 N/m"\ncxx', 'kyy = "3 kg"\ncxx', "bearing[0].kyy", "unit"),
    ('length = "300 mm"', 'length = "-300 mm"', "section[0].length", "range"),
    ('at = "right"', 'at = 7', "bearing[1].at", "station"),
    ('speeds = ["1000 rpm", "3000 rpm"]', 'speeds = ["3000 rpm", "1000 rpm"]', "bearing[0].speeds[1]", "order"),
    ('kxx = ["1e8 N/m", "650 klbf/in"]', 'kxx = ["1e8 N/m"]', "bearing[0].kxx", "length"),
    ('inner_diameter = "20 mm"', 'inner_diameter = "70 mm"', "section[1].inner_diameter", "range"),
    ('material = "steel"\nelements', 'material = "stele"\nelements', "section[1].material", "unknown-material"),
    ('min_speed = "2000 rpm"', 'min_speed = "4000 rpm"', "operating.min_speed", "order"),
    ('mass = "20 kg"', 'mass = "nan kg"', "disk[0].mass", "not-finite"),
    ('mass = "20 kg"', 'mass = 0', "disk[0].mass", "range"),
    ('name = "B"', 'name = "A"', "bearing[1].name", "duplicate"),
    ('kyy = "1e8 N/m"\n[bearing.support]', '[bearing.support]', "bearing[1].kyy", "missing"),
    ('[stations]\nleft = 0\nright = 2', 'stations = 5', "stations", "type"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 /s"', "operating.max_speed", "unit"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\ntrip_speed = "2900 rpm"', "operating.trip_speed", "order"),
    # a bare number for a speed is refused everywhere (it was once read as rad/s in
    # [operating] only), as a number and as text, and so is a dimensionless unit
    ('min_speed = "2000 rpm"', 'min_speed = 2000', "operating.min_speed", "unit"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000"', "operating.max_speed", "unit"),
    ('max_speed = "3000 rpm"', 'max_speed = "1500 percent"', "operating.max_speed", "unit"),
    ('speeds = ["1000 rpm", "3000 rpm"]', 'speeds = [1000, 3000]', "bearing[0].speeds[0]", "unit"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[analysis]\nmin_log_dec = 0.2\nstability_rule = "none"', "analysis.min_log_dec", "conflict"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[analysis]\nspeed_to = 0', "analysis.speed_to", "range"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[analysis]\nmargin_cap_above = "None"', "analysis.margin_cap_above", "type"),
    ('elements = 3', 'elements = 2.5', "section[1].elements", "type"),
    ('at = 1\nmass', 'at = "middle"\nmass', "disk[0].at", "station"),
    ('title = "test rotor"', 'title = "test rotor"\ncolour = "red"', "colour", "unknown-key"),
    ('[operating]', '[operatng]', "operatng", "unknown-key"),
    ('length = "300 mm"', 'length = "300 mm', "(syntax)", "syntax"),
    # the statics: where gravity points, steady loads at stations
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[statics]\ngravity = "down"',
     "statics.gravity", "choice"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[statics]\ngravty = "-y"',
     "statics.gravty", "unknown-key"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[[static_load]]\nat = 1\nname = "mesh"',
     "static_load[0].fy", "missing"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[[static_load]]\nat = 1\nfy = "3 kg"',
     "static_load[0].fy", "unit"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[[static_load]]\nat = 9\nfy = "3 kN"',
     "static_load[0].at", "station"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[[static_load]]\nat = 1\nmxz = "3 kN"',
     "static_load[0].mxz", "unit"),
    # tables over speed and whirl frequency: one row per speed, one value per frequency
    ('cxx = 1000', 'cxx = [[1000, 2000], [1000, 2000]]', "bearing[0].cxx", "length"),
    ('cxx = 1000', 'whirl_frequencies = ["10 Hz", "100 Hz"]\ncxx = [[1000, 2000]]',
     "bearing[0].cxx", "length"),
    ('cxx = 1000', 'whirl_frequencies = ["10 Hz", "100 Hz"]\ncxx = [[1000, 2000], [1000]]',
     "bearing[0].cxx[1]", "length"),
    ('cxx = 1000', 'whirl_frequencies = ["100 Hz", "10 Hz"]\ncxx = [[1, 2], [1, 2]]',
     "bearing[0].whirl_frequencies[1]", "order"),
    ('cxx = 1000', 'whirl_frequencies = "10 Hz"', "bearing[0].whirl_frequencies", "type"),
    ('cxx = 1000', 'whirl_frequencies = ["10 Hz", "100 Hz"]\ncxx = [[1000, -2], [1, 2]]',
     "bearing[0].cxx[0][1]", "range"),
    ('cxx = 1000', 'whirl_frequencies = ["10 Hz", "100 Hz"]\n'
     'kxy = [["1e7 N/m", "3e8 N/m"], [0, 0]]\nkyx = [["1e7 N/m", "3e8 N/m"], [0, 0]]',
     "bearing[0].kxy[0][1]", "physics"),
    ('max_speed = "3000 rpm"', 'max_speed = "3000 rpm"\n[coupling_screen]\nexpected = "1e6 N/m"'
     '\ncoefficients_at = "own"', "coupling_screen.coefficients_at", "choice"),
]


@pytest.mark.parametrize("old,new,key,kind", BAD, ids=[b[2] + ":" + b[3] for b in BAD])
def test_bad_input_names_the_key(old, new, key, kind):
    with pytest.raises(InputError) as info:
        parse_rotor(mutate(old, new), source="case.toml")
    err = info.value
    assert err.key == key
    assert err.kind == kind
    assert err.file == "case.toml"
    assert key in err.message() or kind == "syntax"


def test_unknown_key_suggests_nearest():
    text = mutate('outer_diameter = "60 mm"\nmaterial', 'outer_diamter = "60 mm"\nmaterial')
    with pytest.raises(InputError, match="did you mean 'outer_diameter'"):
        parse_rotor(text)


def test_min_log_dec_alone_means_at_least_and_caps_can_be_lifted():
    rotor = parse_rotor(BASE + '[analysis]\nmin_log_dec = 0.2\nmargin_cap_above = "none"\n')
    assert rotor.settings.stability_rule.name == "at-least"
    assert rotor.settings.stability_rule.min_log_dec == 0.2
    assert rotor.settings.margin_rule.margin_cap_above == math.inf


def test_zero_is_the_one_speed_that_needs_no_unit():
    rotor = parse_rotor(BASE + '[analysis]\nspeed_from = 0\nspeed_to = "4000 rpm"\n')
    assert rotor.settings.speed_from == 0.0


def test_no_shaft_and_missing_operating():
    with pytest.raises(InputError) as info:
        parse_rotor('[operating]\nmin_speed = 1\nmax_speed = 2\n')
    assert info.value.key == "section" and info.value.kind == "missing"
    start = BASE.index("[operating]")
    with pytest.raises(InputError) as info:
        parse_rotor(BASE[:start])
    assert info.value.key == "operating"


def test_error_line_numbers():
    text = mutate('at = "right"', 'at = 7')
    with pytest.raises(InputError) as info:
        parse_rotor(text)
    line = text.splitlines()[info.value.line - 1]
    assert line.strip() == "at = 7"
    assert locate(BASE, "materials.steel.density") == \
        1 + BASE.splitlines().index('density = "7850 kg/m^3"')
    assert locate(BASE, "bearing[1].support.kx") == 1 + BASE.splitlines().index('kx = "5e8 N/m"')


def test_syntax_error_has_line():
    with pytest.raises(InputError) as info:
        parse_rotor(mutate('length = "300 mm"', 'length = "300 mm'))
    assert info.value.line == 1 + BASE.splitlines().index('length = "300 mm"')


def test_cross_coupling_sources_are_read_apart_from_the_bearings():
    """[[cross_coupling]]: q, a table of coefficients, or a stage estimate; never a bearing."""
    from rotorcalc.vocabulary import BearingRole
    text = BASE + ('[[cross_coupling]]\nname = "gas"\nat = 1\nq = "2e6 N/m"\n'
                   '[[cross_coupling]]\nat = 0\nstage = { power = "1 MW", impeller_diameter = '
                   '"400 mm", passage_width = "15 mm", density_ratio = 1.8 }\n')
    rotor = parse_rotor(text)
    assert len(rotor.bearings) == 2 and len(rotor.sources) == 2
    gas, stage = rotor.sources
    assert gas.role == BearingRole.SOURCE and gas.matrices(1.0)[0][0, 1] == 2e6
    assert gas.matrices(1.0)[0][1, 0] == -2e6
    assert stage.name == "Q2" and stage.matrices(1.0)[0][0, 1] > 0
    with pytest.raises(InputError) as err:
        parse_rotor(text.replace('q = "2e6 N/m"', 'q = "2e6 N/m"\nkxy = "1 N/m"'))
    assert err.value.kind == "conflict"
    with pytest.raises(InputError) as err:
        parse_rotor(text.replace('density_ratio = 1.8', 'density_ratio = -1'))
    assert err.value.key == "cross_coupling[1].stage.density_ratio"


def test_tables_over_speed_and_whirl_frequency():
    """A row per speed, a value per whirl frequency; read at the spin speed unless a whirl
    frequency is given; constants and one-way tables mix with two-way ones."""
    rotor = parse_rotor(mutate('cxx = 1000', 'whirl_frequencies = ["10 Hz", "110 Hz"]\n'
                               'cxx = [[1000, 2000], ["3000 N*s/m", 4000]]'))
    b = rotor.bearings[0]
    assert b.whirl_dependent and not rotor.bearings[1].whirl_dependent
    assert b.whirl == pytest.approx((2 * math.pi * 10, 2 * math.pi * 110))
    rpm = 2 * math.pi / 60
    # at 2000 rpm (mid-table in speed) and 60 Hz (mid-table in frequency): 2500
    assert b.matrices(2000 * rpm, 2 * math.pi * 60)[1][0, 0] == pytest.approx(2500.0)
    # synchronous at 3000 rpm = 50 Hz: 3000 + 1000 * 40 / 100
    assert b.matrices(3000 * rpm)[1][0, 0] == pytest.approx(3400.0)
    # ends held in both directions
    assert b.matrices(100 * rpm, 0.0)[1][0, 0] == pytest.approx(1000.0)
    assert b.outside_whirl_table(2 * math.pi * 200) and not b.outside_whirl_table(100.0)



def test_the_two_way_table_of_the_input_reference_reads():
    """The example of docs/input.md is a valid table (it is what users copy)."""
    import re
    from pathlib import Path
    text = (Path(__file__).parents[2] / "docs" / "input.md").read_text()
    block = next(b for b in re.findall(r"```toml\n(.*?)```", text, re.S)
                 if "whirl_frequencies" in b)
    rotor = parse_rotor(BASE + block.replace('"balance_piston"', '"right"'))
    seal = rotor.bearings[-1]
    assert seal.whirl_dependent and seal.role == "seal"
    k, c = seal.matrices(10000 * math.pi / 30, 2 * math.pi * 150)
    assert k[0, 1] == pytest.approx(3e6) and c[0, 0] == pytest.approx(7500.0)


def test_a_what_if_scales_every_point_of_a_two_way_table():
    from rotorcalc.variants import Variant, apply_variant, parse_change
    rotor = parse_rotor(mutate('cxx = 1000', 'whirl_frequencies = ["10 Hz", "110 Hz"]\n'
                               'cxx = [[1000, 2000], [3000, 4000]]'))
    half = apply_variant(rotor, Variant("half", (parse_change("bearing.A.c *= 0.5"),)))
    assert half.bearings[0].table("cxx") == ((500.0, 1000.0), (1500.0, 2000.0))
    assert half.bearings[0].whirl == rotor.bearings[0].whirl


def test_statics_input_is_read():
    rotor = parse_rotor(BASE + '[statics]\ngravity = "-x"\n[[static_load]]\nat = "right"\n'
                        'name = "gear mesh"\nfx = "2 kN"\nfy = "-500 lbf"\nmyz = "150 N*m"\n')
    assert rotor.gravity == "-x"
    load = rotor.static_loads[0]
    assert (load.station, load.name, load.fx, load.mxz, load.myz) == (2, "gear mesh", 2000.0,
                                                                      0.0, 150.0)
    assert load.fy == pytest.approx(-500 * 4.4482216152605)
    assert parse_rotor(BASE).gravity == "-y" and parse_rotor(BASE).static_loads == ()

