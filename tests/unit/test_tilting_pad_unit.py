"""rotorcalc.bearings.tilting_pad: every input check fires with its key; the model's properties.

Properties checked here need no outside reference: preload and bearing clearance say the same;
a tilt leaves the film over the pivot alone and closes the trailing edge; the equilibrium
balances the load and every pad's moment; without pad inertia the reduced matrices are
symmetric whatever the layout; pad inertia adds a skew-symmetric part; the mirrored bearing
turning the other way gives the mirrored coefficients; an unloaded pad is left out with a
note; the results read and write; the model with its oil finds a film temperature.
"""

import json
import math

import numpy as np
import pytest

from rotorcalc.bearings import FilmOptions, Lubricant
from rotorcalc.bearings.pad_journal import PadJournal
from rotorcalc.bearings.tilting_pad import (PadRing, condense, first_pivot_angle,
                                            pad_coefficients, pad_equilibrium, settle_pads)
from rotorcalc.errors import InputError, SolverError

D, L, CP, MU, SPEED = 0.1, 0.05, 1.0e-4, 0.02, 300.0
#: A coarse grid: the properties hold on any grid.
FAST = FilmOptions(48, 8)
ARC = math.radians(60.0)
NAN = float("nan")


def close(a, b, rel):
    """Matrices equal within ``rel`` of the largest entry."""
    return float(np.abs(np.subtract(a, b)).max()) <= rel * float(np.abs(b).max())


def ring(**kw):
    args = dict(diameter=D, length=L, count=5, arc=ARC, clearance=CP, preload=0.3)
    args.update(kw)
    return PadRing(**args)


def _coeff(**kw):
    args = dict(ring=ring(), speed=SPEED, load=(0.0, -2000.0), viscosity=MU, options=FAST)
    args.update(kw)
    return lambda: pad_coefficients(args.pop("ring"), args.pop("speed"), args.pop("load"),
                                    args.pop("viscosity"), **args)


OIL = Lubricant(grade=46)

#: (kind, key, call that must raise it)
BAD = [
    ("range", "pads.diameter", lambda: ring(diameter=-0.1)),
    ("not-finite", "pads.length", lambda: ring(length=NAN)),
    ("type", "pads.count", lambda: ring(count=5.0)),
    ("range", "pads.count", lambda: ring(count=2)),
    ("range", "pads.arc", lambda: ring(arc=0.0)),
    ("physics", "pads.arc", lambda: ring(arc=math.radians(72.0))),
    ("physics", "pads.clearance", lambda: ring(clearance=0.01)),
    ("type", "pads.clearance", lambda: ring(clearance="0.1 mm")),
    ("range", "pads.preload", lambda: ring(preload=1.0)),
    ("range", "pads.preload", lambda: ring(preload=-0.1)),
    ("conflict", "pads.bearing_clearance", lambda: ring(bearing_clearance=0.8 * CP)),
    ("physics", "pads.bearing_clearance",
     lambda: ring(preload=None, bearing_clearance=1.2 * CP)),
    ("range", "pads.bearing_clearance", lambda: ring(preload=None, bearing_clearance=0.0)),
    ("range", "pads.pivot_offset", lambda: ring(pivot_offset=1.0)),
    ("range", "pads.pivot_offset", lambda: ring(pivot_offset=0.0)),
    ("not-finite", "pads.first_pivot", lambda: ring(first_pivot=NAN)),
    ("range", "pads.pivot_stiffness", lambda: ring(pivot_stiffness=0.0)),
    ("type", "pads.pivot_stiffness", lambda: ring(pivot_stiffness=True)),
    ("range", "pads.pad_mass", lambda: ring(pad_mass=-1.0)),
    ("not-finite", "pads.pad_inertia", lambda: ring(pad_inertia=float("inf"))),
    ("range", "pads.pad_thickness", lambda: ring(pad_thickness=-0.01)),
    ("type", "pads", _coeff(ring="five pads")),
    ("type", "options", _coeff(options={"n_theta": 48})),
    ("range", "speed", _coeff(speed=0.0)),
    ("range", "load", _coeff(load=(0.0, 0.0))),
    ("range", "viscosity", _coeff(viscosity=0.0)),
    ("range", "tolerance", _coeff(tolerance=0.5)),
    ("range", "step", _coeff(step=0.5)),
    ("not-finite", "whirl", _coeff(whirl=NAN)),
    ("not-finite", "whirl", lambda: condense(np.eye(3), np.eye(3), np.zeros((3, 3)), NAN)),
    ("type", "pads", lambda: PadJournal("pads", OIL, 320.0)),
    ("range", "oil.inlet_temperature", lambda: PadJournal(ring(), OIL, -5.0)),
    ("range", "oil.film_temperature", lambda: PadJournal(ring(), OIL, 320.0, NAN)),
    ("range", "oil.rise_share", lambda: PadJournal(ring(), OIL, 320.0, rise_share=1.5)),
    ("range", "film.carry_over", lambda: PadJournal(ring(), OIL, 320.0, carry_over=1.0)),
    ("range", "film.carry_over", lambda: PadJournal(ring(), OIL, 320.0, carry_over=-0.1)),
]


@pytest.mark.parametrize("kind, key, call", BAD, ids=[f"{k}:{key}" for k, key, _ in BAD])
def test_every_input_check_fires(kind, key, call):
    with pytest.raises(InputError) as info:
        call()
    assert info.value.kind == kind and info.value.key == key, str(info.value)


def test_preload_and_bearing_clearance_say_the_same():
    a, b = ring(preload=0.25), ring(preload=None, bearing_clearance=0.75 * CP)
    assert a.preload == pytest.approx(b.preload) and a.bearing_clearance == pytest.approx(
        b.bearing_clearance)
    assert ring(preload=None).preload == 0.0 and ring(pivot_stiffness=math.inf).flexible is False
    assert ring(pivot_stiffness=1e9).coordinates[-1] == "lift[4]"


def test_layouts():
    assert first_pivot_angle(4) == pytest.approx(-math.pi / 2)
    assert first_pivot_angle(4, between=True) == pytest.approx(-math.pi / 4)
    r = ring(pivot_offset=0.6, first_pivot=0.3)
    land = r.pad(2).lands[0]
    pivot = 0.3 + 2 * 2 * math.pi / 5
    assert land.start == pytest.approx(pivot - 0.6 * ARC)
    assert land.end == pytest.approx(pivot + 0.4 * ARC)


def test_a_tilt_keeps_the_film_over_the_pivot_and_closes_the_trailing_edge():
    r = ring()
    pivot = r.pivots[1]
    still, tilted = r.pad(1).lands[0], r.pad(1, tilt=1e-4).lands[0]
    x, y = 1e-5, -2e-5
    assert float(tilted.thickness(pivot, x, y)) == pytest.approx(
        float(still.thickness(pivot, x, y)), abs=1e-18)
    assert tilted.thickness(tilted.end, x, y) < still.thickness(still.end, x, y)
    assert tilted.thickness(tilted.start, x, y) > still.thickness(still.start, x, y)
    # the film's rate from the tilt's rate, as the thickness changes with the tilt
    rate = r.pad(1, tilt_rate=1.0).lands[0].thickness_rate(still.end, 0.0, 0.0)
    assert rate == pytest.approx((tilted.thickness(still.end, x, y)
                                  - still.thickness(still.end, x, y)) / 1e-4, rel=1e-9)


@pytest.mark.parametrize("flexible", [False, True])
def test_equilibrium_balances_the_load_and_every_moment(flexible):
    r = ring(first_pivot=math.radians(-70.0), pivot_offset=0.6,
             pivot_stiffness=3e8 if flexible else None)
    load = np.array([500.0, -2500.0])
    eq = pad_equilibrium(r, SPEED, load, MU, options=FAST)
    forces = eq.pad_forces
    assert eq.residual <= 1e-9 and np.allclose(forces.sum(axis=0), -load, rtol=0, atol=1e-6)
    t = np.c_[-np.sin(r.pivots), np.cos(r.pivots)]
    assert np.abs(np.sum(forces * t, axis=1)).max() <= 1e-8 * np.hypot(*load)
    if flexible:
        e = np.c_[np.cos(r.pivots), np.sin(r.pivots)]
        assert np.allclose(-np.sum(forces * e, axis=1), 3e8 * eq.lifts, atol=1e-6)
    assert eq.min_thickness == eq.pad_min_thickness.min() > 0.0
    again = pad_equilibrium(r, SPEED, load, MU, options=FAST, start=eq)
    assert np.allclose(again.position, eq.position, atol=1e-12 * CP)
    held = settle_pads(r, SPEED, MU, eq.position, options=FAST)
    assert np.allclose(held.load, load, rtol=0, atol=1e-5 * np.hypot(*load))


def test_reduced_matrices_are_symmetric_without_pad_inertia():
    """Any layout and load: each pad passes force along its pivot line."""
    r = ring(first_pivot=math.radians(-70.0), pivot_offset=0.6)
    result = pad_coefficients(r, SPEED, (600.0, -2500.0), MU, options=FAST)
    for w in (None, 0.0, 0.5 * SPEED, 2.0 * SPEED):
        k, c = (result.stiffness, result.damping) if w is None else result.reduce(w)
        for mat in (k, c):
            assert abs(mat[0, 1] - mat[1, 0]) <= 1e-5 * np.abs(mat).max()
            assert abs(mat[0, 1]) > 1e-3 * np.abs(mat).max()     # not diagonal here


def test_pad_inertia_adds_a_skew_part_that_vanishes_slowly():
    """Four pads, load between pads: kxx = kyy stays, a skew kxy = -kyx grows with w^2."""
    base = dict(count=4, arc=math.radians(80.0), first_pivot=first_pivot_angle(4, between=True))
    plain = pad_coefficients(ring(**base), SPEED, (0.0, -2000.0), MU, options=FAST)
    heavy = pad_coefficients(ring(pad_inertia=5e-4, **base), SPEED, (0.0, -2000.0), MU,
                             options=FAST)
    k, c = heavy.stiffness, heavy.damping
    assert k[0, 0] == pytest.approx(k[1, 1], rel=1e-6) and k[0, 1] == pytest.approx(
        -k[1, 0], rel=1e-6)
    assert abs(k[0, 1]) > 1e-3 * k[0, 0] and abs(plain.stiffness[0, 1]) < 1e-5 * k[0, 0]
    assert close(heavy.reduce(1e-3)[0], plain.reduce(1e-3)[0], 1e-6)
    skew = [heavy.reduce(w)[0][0, 1] - plain.reduce(w)[0][0, 1] for w in (0.1 * SPEED,
                                                                         0.2 * SPEED)]
    assert skew[1] / skew[0] == pytest.approx(4.0, rel=0.05)


def test_mirrored_bearing_turning_backwards_mirrors_the_coefficients():
    """x -> -x: pivot angles pi - theta, offset 1 - a, speed and Wx change sign."""
    r = ring(first_pivot=math.radians(-70.0), pivot_offset=0.6)
    m = ring(first_pivot=math.radians(250.0), pivot_offset=0.4)
    ahead = pad_coefficients(r, SPEED, (600.0, -2500.0), MU, options=FAST)
    back = pad_coefficients(m, -SPEED, (-600.0, -2500.0), MU, options=FAST)
    s = np.diag([-1.0, 1.0])
    assert np.allclose(back.equilibrium.position, s @ ahead.equilibrium.position, atol=1e-9 * CP)
    for a, b in ((ahead.stiffness, back.stiffness), (ahead.damping, back.damping)):
        assert close(s @ a @ s, b, 1e-6)


def test_whirl_frequency_and_its_reduction_agree():
    result = pad_coefficients(ring(), SPEED, (0.0, -2000.0), MU, options=FAST,
                              check_step=False)
    assert result.whirl == SPEED and np.isnan(result.step_change[0])
    at_half = pad_coefficients(ring(), SPEED, (0.0, -2000.0), MU, options=FAST,
                               whirl=0.5 * SPEED, equilibrium=result.equilibrium)
    assert np.allclose(at_half.stiffness, result.reduce(0.5 * SPEED)[0])
    assert np.allclose(at_half.damping, result.reduce(-0.5 * SPEED)[1])
    assert result.full_stiffness.shape == (7, 7) and result.coordinates[2] == "tilt[0]"


def test_an_unloaded_pad_is_left_out_with_a_note():
    """No preload, load between pads, a heavy load: the top pads' films only push them back
    towards no film; they carry nothing."""
    r = ring(preload=0.0, first_pivot=first_pivot_angle(5, between=True))
    result = pad_coefficients(r, SPEED, (0.0, -20000.0), MU, options=FAST)
    idle = [k for k, f in enumerate(result.equilibrium.pad_forces) if not np.any(f)]
    assert idle and any("carry no film" in w for w in result.warnings)
    assert np.all(np.isfinite(result.stiffness)) and result.stiffness[1, 1] > 0.0


def test_coefficients_result_reads_and_writes():
    result = pad_coefficients(ring(pivot_stiffness=1e9), SPEED, (0.0, -2000.0), MU,
                              options=FAST)
    table = result.as_table()
    assert table["kyy"] == result.stiffness[1, 1] and list(table)[-1] == "cyy"
    data = json.loads(json.dumps(result.to_dict()))
    assert "Screening only" in data["caution"] and len(data["coordinates"]) == 12
    assert data["equilibrium"]["tilts"] == result.equilibrium.tilts.tolist()


def test_a_load_the_pads_cannot_carry_is_reported():
    with pytest.raises(SolverError):
        pad_equilibrium(ring(), SPEED, (0.0, -1e9), MU, options=FAST, max_iterations=5)


def test_each_pad_finds_its_own_film_temperature():
    """Per-pad heat balance (pad_journal.py): every pad's temperature is its own fixed point
    ``T_k = T_in + share P_k / (rho c Q_k)`` within 0.1 K, recomputed here from the pads'
    films; the loaded bottom pad (pad 1, load on pad) runs hottest and the layout's mirror
    pads alike; the same viscosities given directly give the same coefficients."""
    model = PadJournal(ring(), OIL, 273.15 + 45.0, options=FAST)
    hot = model.coefficients(SPEED, (0.0, -2000.0))
    t = hot.pad_temperatures
    films = hot.equilibrium.films
    balance = [model.inlet_temperature + model.rise_share * OIL.temperature_rise(
        f.power_loss, f.inflow, model.inlet_temperature) for f in films]
    assert np.allclose(t, balance, atol=0.1 + 1e-9)
    assert np.all(t > model.inlet_temperature) and hot.temperature == t.max() == t[0]
    assert t[0] - t[2] > 1.0                         # loaded against unloaded, well apart
    assert abs(t[1] - t[4]) < 0.2 and abs(t[2] - t[3]) < 0.2      # mirror images
    assert np.allclose(hot.equilibrium.pad_viscosity, model.viscosity(t))
    direct = pad_coefficients(model.pads, SPEED, (0.0, -2000.0), model.viscosity(t),
                              options=FAST)
    assert close(direct.stiffness, hot.stiffness, 1e-6)
    slow = model.coefficients(SPEED, (0.0, -2000.0), whirl=0.0, temperature=t,
                              start=hot.equilibrium)
    assert close(slow.stiffness, hot.reduce(0.0)[0], 1e-4)


@pytest.mark.parametrize("speed", [SPEED, -SPEED])
def test_hot_oil_carried_over_warms_the_pads_downstream(speed):
    """With carry-over ``lambda`` each pad's inlet is the supply temperature raised by
    ``lambda`` times the upstream pad's outlet rise, around the ring; recomputed here by
    marching the recurrence round the ring until it repeats (not the code's linear solve),
    with the rises of the pads' own films.  Every pad runs hotter than without."""
    fresh = PadJournal(ring(), OIL, 273.15 + 45.0, options=FAST)
    mixed = fresh.changed(carry_over=0.6)
    a, b = (m.coefficients(speed, (0.0, -2000.0)) for m in (fresh, mixed))
    films, t_s = b.equilibrium.films, mixed.inlet_temperature
    rises = [OIL.temperature_rise(f.power_loss, f.inflow, t_s) for f in films]
    step = 1 if speed > 0 else -1
    inlet = [0.0] * 5
    for _ in range(200):
        for k in range(5) if step > 0 else range(4, -1, -1):
            up = (k - step) % 5
            inlet[k] = 0.6 * (inlet[up] + rises[up])
    expected = [t_s + u + mixed.rise_share * r for u, r in zip(inlet, rises)]
    assert np.allclose(b.pad_temperatures, expected, atol=0.1 + 1e-9)
    assert np.all(b.pad_temperatures > a.pad_temperatures + 0.5)


def test_a_given_film_temperature_holds_every_pad():
    model = PadJournal(ring(), OIL, 273.15 + 45.0, 273.15 + 60.0, options=FAST)
    given = model.coefficients(SPEED, (0.0, -2000.0))
    assert np.all(given.pad_temperatures == 273.15 + 60.0)
    direct = pad_coefficients(model.pads, SPEED, (0.0, -2000.0),
                              model.viscosity(273.15 + 60.0), options=FAST)
    assert close(given.stiffness, direct.stiffness, 1e-6)


def test_hotter_supply_oil_softens_the_bearing():
    """Thinner oil, a smaller Sommerfeld number, a journal further out: at this light load
    the direct damping falls (common practice: the hot-oil corner is the soft one)."""
    cool = PadJournal(ring(), OIL, 273.15 + 40.0, options=FAST)
    warm = cool.changed(inlet_temperature=273.15 + 55.0)
    a, b = (m.coefficients(SPEED, (0.0, -2000.0)) for m in (cool, warm))
    assert b.pad_temperatures.min() > a.pad_temperatures.max() - 5.0
    assert b.equilibrium.eccentricity_ratio > a.equilibrium.eccentricity_ratio
    assert b.damping[1, 1] < a.damping[1, 1]


def test_one_viscosity_per_pad_is_checked():
    with pytest.raises(InputError, match="viscosity"):
        pad_equilibrium(ring(), SPEED, (0.0, -2000.0), [MU] * 4, options=FAST)
    with pytest.raises(InputError, match="viscosity"):
        pad_equilibrium(ring(), SPEED, (0.0, -2000.0), [MU] * 4 + [-MU], options=FAST)
