"""rotorcalc.bearings: every input check fires with its key; the solver's properties.

Properties checked here need no outside reference: the cavitation iteration settles and
meets its complementarity conditions; a film at rest with a still journal carries nothing;
a plain bore's damping is symmetric (the linearised film's operator is self-adjoint); the
coefficients turn with the load; the equilibrium balances the load from light to heavy
loads; mirrored rotation mirrors the coefficients; a lobe without preload is a plain land.
"""

import json
import math

import numpy as np
import pytest

from rotorcalc.bearings import (FilmOptions, Groove, Land, LobedBore, PlainBore, coefficients,
                                elliptical_bore, find_equilibrium, lobe, offset_halves_bore,
                                plain_bore, solve_film)
from rotorcalc.bearings import _reynolds as rey
from rotorcalc.errors import InputError, SolverError

D, L, C, MU, SPEED = 0.1, 0.05, 1.0e-4, 0.02, 300.0
BORE = plain_bore(D, L, C)
TWO_PI = 2 * math.pi
#: A coarse grid: the properties hold on any grid, and the file runs in seconds.
FAST = FilmOptions(60, 10)


def _film(**kw):
    args = dict(geometry=BORE, speed=SPEED, viscosity=MU, position=(0.5 * C, 0.0),
                options=FAST)
    args.update(kw)
    return lambda: solve_film(args.pop("geometry"), args.pop("speed"), args.pop("viscosity"),
                              **args)


def _coeff(**kw):
    args = dict(geometry=BORE, speed=SPEED, load=(0.0, -2000.0), viscosity=MU, options=FAST)
    args.update(kw)
    return lambda: coefficients(args.pop("geometry"), args.pop("speed"), args.pop("load"),
                                args.pop("viscosity"), **args)


#: (kind, key, call that must raise it)
BAD = [
    ("range", "film_bearing.diameter", lambda: plain_bore(-0.1, L, C)),
    ("not-finite", "film_bearing.length", lambda: plain_bore(D, float("nan"), C)),
    ("type", "film_bearing.radial_clearance", lambda: plain_bore(D, L, "0.1 mm")),
    ("range", "film_bearing.radial_clearance", lambda: plain_bore(D, L, 0.0)),
    ("physics", "film_bearing.lands[0].clearance", lambda: plain_bore(D, L, 0.01)),
    ("range", "film_bearing.grooves[0].width", lambda: plain_bore(D, L, C, [(0.0, 0.0)])),
    ("range", "film_bearing.grooves[0].width", lambda: plain_bore(D, L, C, [(0.0, 7.0)])),
    ("not-finite", "film_bearing.grooves[1].position",
     lambda: plain_bore(D, L, C, [(0.0, 0.3), (float("inf"), 0.3)])),
    ("length", "film_bearing.grooves[0]", lambda: plain_bore(D, L, C, [(0.0,)])),
    ("conflict", "film_bearing.grooves", lambda: plain_bore(D, L, C, [(0.0, 0.4), (0.3, 0.4)])),
    ("conflict", "film_bearing.grooves", lambda: plain_bore(D, L, C, [(1.0, 0.4), (1.0, 0.4)])),
    ("range", "film_bearing.feed_pressure",
     lambda: plain_bore(D, L, C, [(0.0, 0.3)], feed_pressure=-1.0)),
    ("conflict", "film_bearing.feed_pressure", lambda: plain_bore(D, L, C, feed_pressure=1e5)),
    ("order", "land.end", lambda: Land(1.0, 0.5, C)),
    ("range", "land.end", lambda: Land(0.0, 7.0, C)),
    ("range", "land.clearance", lambda: Land(0.0, 1.0, -C)),
    ("length", "land.centre", lambda: Land(0.0, 1.0, C, (0.0,))),
    ("not-finite", "land.centre[1]", lambda: Land(0.0, 1.0, C, (0.0, float("nan")))),
    ("physics", "land.centre", lambda: Land(0.0, 1.0, C, (C, 0.0))),
    ("range", "lobe.preload", lambda: lobe(0.0, 1.0, C, 1.0)),
    ("range", "lobe.preload", lambda: lobe(0.0, 1.0, C, -0.1)),
    ("not-finite", "lobe.closest_at", lambda: lobe(0.0, 1.0, C, 0.5, float("nan"))),
    ("type", "film_bearing.lobes", lambda: LobedBore(D, L, ((0.0, 1.0),))),
    ("missing", "film_bearing.lobes", lambda: LobedBore(D, L, ())),
    ("conflict", "film_bearing.lobes[1]",
     lambda: LobedBore(D, L, (Land(0.0, 2.0, C), Land(1.5, 3.0, C)))),
    ("conflict", "film_bearing.lobes[0]",
     lambda: LobedBore(D, L, (Land(0.5, 3.0, C), Land(-1.0, 0.6, C)))),
    ("range", "film_bearing.groove_width", lambda: elliptical_bore(D, L, 2 * C, 0.5, 0.0)),
    ("range", "film_bearing.groove_width", lambda: offset_halves_bore(D, L, 2 * C, 0.5, 4.0)),
    ("type", "film_options.n_theta", lambda: FilmOptions(n_theta=60.0)),
    ("range", "film_options.n_theta", lambda: FilmOptions(n_theta=4)),
    ("range", "film_options.n_z", lambda: FilmOptions(n_z=1)),
    ("range", "film_options.max_iterations", lambda: FilmOptions(max_iterations=0)),
    ("choice", "film_options.cavitation", lambda: FilmOptions(cavitation="gumbel")),
    ("type", "geometry", _film(geometry="plain")),
    ("type", "options", _film(options={"n_theta": 60})),
    ("not-finite", "speed", _film(speed=float("inf"))),
    ("type", "speed", _film(speed="fast")),
    ("range", "viscosity", _film(viscosity=0.0)),
    ("length", "position", _film(position=(0.0, 0.0, 0.0))),
    ("not-finite", "velocity[0]", _film(velocity=(float("nan"), 0.0))),
    ("physics", "position", _film(position=(1.1 * C, 0.0))),
    ("missing", "hold_rupture", _film(hold_rupture=True)),
    ("conflict", "start", _film(start="a film")),
    ("range", "speed", _coeff(speed=0.0)),
    ("range", "load", _coeff(load=(0.0, 0.0))),
    ("length", "load", _coeff(load=(1.0,))),
    ("range", "viscosity", _coeff(viscosity=-0.01)),
    ("range", "tolerance", _coeff(tolerance=0.5)),
    ("range", "step", _coeff(step=0.5)),
    ("range", "step_tolerance", _coeff(step_tolerance=0.0)),
    ("choice", "rupture", _coeff(rupture="frozen")),
]


@pytest.mark.parametrize("kind, key, call", BAD, ids=[f"{k}:{key}" for k, key, _ in BAD])
def test_every_input_check_fires(kind, key, call):
    with pytest.raises(InputError) as info:
        call()
    assert info.value.kind == kind and info.value.key == key, str(info.value)


def test_start_from_another_grid_is_refused():
    film = solve_film(BORE, SPEED, MU, (0.5 * C, 0.0), options=FilmOptions(40, 6))
    with pytest.raises(InputError, match="start"):
        solve_film(BORE, SPEED, MU, (0.5 * C, 0.0), options=FAST, start=film)


# ---- the solver ----------------------------------------------------------------------------

def _land_system(eps=0.6, n=60, nz=10):
    land = BORE.lands[0]
    grid = rey.land_grid(0.0, TWO_PI, n, nz, L, True)
    h = land.thickness(grid.theta, eps * C, 0.0)
    system = rey.assemble(grid, h, land.thickness(grid.faces, eps * C, 0.0), 0.0 * h,
                          radius=D / 2, viscosity=MU, surface_speed=SPEED * D / 2)
    return system, rey.fixed_values(grid, 0.0)


@pytest.mark.parametrize("eps", [0.05, 0.5, 0.95])
def test_cavitation_iteration_settles_and_meets_complementarity(eps):
    """p >= 0, G p - s >= 0 where the film ruptured, = 0 where it carries pressure, and the
    iteration ends in a few solves (primal-dual active set on an M-matrix)."""
    system, (fixed, value) = _land_system(eps)
    p, active, solves = rey.complementarity(system, fixed, value)
    residual = system.outflow(p) - system.s
    scale = np.abs(system.s).max()
    free = ~fixed
    assert solves <= 12
    assert p.min() >= 0.0 and np.all(p[active] == 0.0) and active.any()
    assert np.abs(residual[free & ~active]).max() <= 1e-10 * scale
    assert residual[active].min() >= -1e-10 * scale
    # started from the answer, one solve confirms it
    assert rey.complementarity(system, fixed, value, active)[2] == 1


def test_cavitation_iteration_that_cannot_settle_raises():
    system, (fixed, value) = _land_system()
    with pytest.raises(SolverError, match="did not settle"):
        rey.complementarity(system, fixed, value, max_iterations=2)


def test_warm_start_gives_the_same_film():
    cold = solve_film(BORE, SPEED, MU, (0.5 * C, -0.2 * C))
    warm = solve_film(BORE, SPEED, MU, (0.5 * C, -0.2 * C),
                      start=solve_film(BORE, SPEED, MU, (0.45 * C, -0.2 * C)))
    assert cold.grid == (120, 20)
    assert np.allclose(warm.force, cold.force, rtol=1e-12, atol=0.0)
    assert warm.iterations < cold.iterations


@pytest.mark.parametrize("cavitation", ["reynolds", "half-sommerfeld"])
def test_no_speed_and_no_motion_carry_nothing(cavitation):
    opts = FilmOptions(cavitation=cavitation)
    film = solve_film(BORE, 0.0, MU, (0.6 * C, 0.3 * C), options=opts)
    assert np.all(film.force == 0.0) and film.power_loss == 0.0 and film.side_leakage == 0.0
    # squeezing alone pushes back against the motion
    film = solve_film(BORE, 0.0, MU, (0.3 * C, 0.0), (0.01, 0.0), options=opts)
    assert film.force[0] < 0.0 and abs(film.force[1]) < 1e-9 * abs(film.force[0])


def test_plain_film_results_are_consistent():
    film = solve_film(BORE, SPEED, MU, (0.3 * C, 0.4 * C), options=FAST)
    assert film.min_thickness == pytest.approx(0.5 * C, rel=1e-12)
    assert film.side_leakage > 0.0 and film.power_loss > 0.0
    assert film.pressure[0].shape == (60, 11) and film.z[-1] == pytest.approx(L / 2)
    assert np.all(film.pressure[0][:, -1] == 0.0)
    with pytest.raises(ValueError):
        film.pressure[0][0, 0] = 1.0
    json.dumps(film.to_dict())


# ---- geometries ----------------------------------------------------------------------------

def test_lobe_without_preload_is_a_plain_land():
    grooves = [(0.0, 0.3), (math.pi, 0.3)]
    plain = plain_bore(D, L, C, grooves)
    lobed = LobedBore(D, L, tuple(lobe(land.start, land.end, C, 0.0) for land in plain.lands))
    for position in ((0.4 * C, -0.5 * C), (-0.7 * C, 0.1 * C)):
        a = solve_film(plain, SPEED, MU, position, options=FAST)
        b = solve_film(lobed, SPEED, MU, position, options=FAST)
        assert np.allclose(a.force, b.force, rtol=1e-13, atol=0.0)


def test_elliptical_and_offset_halves_shapes():
    ellip = elliptical_bore(D, L, 2 * C, 0.5, math.radians(20))
    assert ellip.clearance == pytest.approx(C)                  # C_b = (1 - m) C_p
    assert ellip.thickness(np.array([math.pi / 2, 1.5 * math.pi]), 0.0, 0.0) == \
        pytest.approx([C, C])
    assert np.isnan(ellip.thickness(0.0, 0.0, 0.0))             # in the groove
    offset = offset_halves_bore(D, L, 2 * C, 0.5, math.radians(20))
    assert offset.lobes[0].centre == pytest.approx((C, 0.0), abs=1e-12 * C)
    assert offset.lobes[1].centre == pytest.approx((-C, 0.0), abs=1e-12 * C)
    assert offset.clearance == pytest.approx(2 * C - C * math.cos(math.radians(10)))


def test_grooves_make_lands_between_them():
    bore = PlainBore(D, L, C, (Groove(math.pi / 2, 0.2), (-math.pi / 2, 0.2)))
    assert not bore.closed and len(bore.lands) == 2
    assert bore.arcs[0] == pytest.approx((math.pi / 2 + 0.1, 1.5 * math.pi - 0.1))


# ---- equilibrium and coefficients ------------------------------------------------------------

@pytest.mark.parametrize("cavitation", ["reynolds", "half-sommerfeld"])
@pytest.mark.parametrize("length", [0.5 * D, D])
def test_equilibrium_from_light_to_heavy_loads(length, cavitation):
    """Loads spanning eccentricity ratios 0.05 to 0.9 converge and balance the load."""
    bore = plain_bore(D, length, C)
    opts = FilmOptions(60, 10, cavitation)
    found = []
    for load in np.geomspace(50.0, 2.4e5, 9) * length / D:
        eq = find_equilibrium(bore, SPEED, (0.0, -load), MU, options=opts)
        film = solve_film(bore, SPEED, MU, tuple(eq.position), options=opts)
        assert np.hypot(*(film.force + eq.load)) <= 1e-9 * load
        assert eq.min_thickness == pytest.approx(C * (1 - eq.eccentricity_ratio), rel=1e-9)
        found.append(eq.eccentricity_ratio)
    assert found[0] < 0.05 and found[-1] > 0.9
    assert np.all(np.diff(found) > 0)


def test_damping_of_a_plain_bore_is_symmetric():
    """The linearised film's operator is self-adjoint: cxy = cyx to roundoff (Reynolds
    cavitation, ruptured region held)."""
    for load in (300.0, 3000.0, 30000.0):
        c = coefficients(BORE, SPEED, (0.0, -load), MU, options=FAST).damping
        assert abs(c[0, 1] - c[1, 0]) <= 1e-9 * np.abs(c).max()


def _turn(angle):
    return np.array([[math.cos(angle), -math.sin(angle)], [math.sin(angle), math.cos(angle)]])


@pytest.mark.parametrize("degrees, rtol", [(132.0, 1e-5), (17.0, 0.02)])
def test_coefficients_turn_with_the_load(degrees, rtol):
    """Turning the load turns K and C with it: to the perturbation's truncation error
    (the steps run along x and y, not along the turned axes: O(step^2) = 1e-6) when the
    turn is a whole number of grid steps (6 degrees), to the grid's error otherwise."""
    base = coefficients(BORE, SPEED, (0.0, -3000.0), MU, options=FAST)
    turn = _turn(math.radians(degrees))
    load = turn @ np.array([0.0, -3000.0])
    turned = coefficients(BORE, SPEED, tuple(load), MU, options=FAST)
    for a, b in ((base.stiffness, turned.stiffness), (base.damping, turned.damping)):
        back = turn.T @ b @ turn
        assert np.abs(back - a).max() <= rtol * np.abs(a).max()


def test_opposite_rotation_mirrors_the_coefficients():
    mirror = np.diag([1.0, -1.0])
    ahead = coefficients(BORE, SPEED, (800.0, -3000.0), MU, options=FAST)
    back = coefficients(BORE, -SPEED, (800.0, 3000.0), MU, options=FAST)
    assert back.equilibrium.position == pytest.approx(mirror @ ahead.equilibrium.position)
    assert np.allclose(mirror @ back.stiffness @ mirror, ahead.stiffness, rtol=1e-7)
    assert np.allclose(mirror @ back.damping @ mirror, ahead.damping, rtol=1e-7)


def test_step_check_reports_a_moving_rupture():
    """Re-solving the rupture in each perturbed film puts kinks in the force; halving the
    step then changes the damping, and a tight tolerance says so."""
    held = coefficients(BORE, SPEED, (0.0, -2000.0), MU, options=FAST, step_tolerance=1e-5)
    solved = coefficients(BORE, SPEED, (0.0, -2000.0), MU, options=FAST, rupture="solved",
                          step_tolerance=1e-5)
    assert held.warnings == () and max(held.step_change) < 1e-5
    assert len(solved.warnings) == 1 and "halved" in solved.warnings[0]


def test_coefficients_result_reads_and_writes():
    result = coefficients(BORE, SPEED, (0.0, -2000.0), MU, options=FAST)
    table = result.as_table()
    assert list(table) == ["kxx", "kxy", "kyx", "kyy", "cxx", "cxy", "cyx", "cyy"]
    assert table["kyy"] > 0 and table["cxx"] > 0 and table["cyy"] > 0
    doc = json.loads(json.dumps(result.to_dict()))
    assert "Screening only" in doc["caution"]
    assert doc["equilibrium"]["sommerfeld"] == pytest.approx(
        MU * SPEED / TWO_PI * L * D / 2000.0 * (D / 2 / C) ** 2)
    with pytest.raises(ValueError):
        result.stiffness[0, 0] = 0.0


def test_lobed_bores_reach_equilibrium():
    for bore in (elliptical_bore(D, L, 2 * C, 0.5), offset_halves_bore(D, L, 2 * C, 0.5)):
        for load in (200.0, 5000.0):
            eq = find_equilibrium(bore, SPEED, (0.0, -load), MU, options=FAST)
            assert eq.residual <= 1e-9


def test_a_load_the_film_cannot_carry_is_reported():
    """An offset-halves bore turning backwards pushes the journal sideways into the bore
    under a vertical load: no equilibrium, and a clear error."""
    with pytest.raises(SolverError, match="no film equilibrium"):
        find_equilibrium(offset_halves_bore(D, L, 2 * C, 0.5), -SPEED, (0.0, -500.0), MU,
                         options=FAST)
