"""The design review's own numbers: rigid-body mass properties, the mesh check, the list of
failing items, and that every analysis runs once.

References
----------
- Mass properties of a uniform solid or hollow circular cylinder about its axis,
  m (R^2 + r^2) / 2, and about a diameter through its centre, m (3 (R^2 + r^2) + L^2) / 12:
  the standard table of mass moments of inertia (e.g. J. L. Meriam and L. G. Kraige,
  "Engineering Mechanics: Dynamics", appendix table of homogeneous solids; from memory).
- The parallel-axis theorem (same source).
- For whole rotors, the assembled consistent mass matrix M itself: a rigid translation u
  and a rigid tilt v about the centre of mass give the mass u^T M u and the transverse
  moment of inertia v^T M v exactly (the kinetic energy of a rigid motion, which the
  consistent element matrices reproduce exactly: the cubic shape functions contain it).
"""

import dataclasses
import math

import numpy as np
import pytest

from rotorcalc.analysis import review as rv
from rotorcalc.analysis.screening import screen
from rotorcalc.assembly import assemble
from rotorcalc.model import Disk, OperatingRange, Rotor, Section
from rotorcalc.reader import read_rotor
from tests.conftest import CASES, ROOT, STEEL, uniform_shaft
from tests.verification.record import check

HANDBOOK = ("homogeneous circular cylinder, mass moments of inertia (Meriam and Kraige, "
            "Engineering Mechanics: Dynamics, appendix table; from memory)")
MATRIX = "assembled consistent mass matrix: rigid motions u^T M u, v^T M v"


@pytest.mark.parametrize("inner", [0.0, 0.03])
def test_a_uniform_tube_matches_the_handbook_cylinder(inner):
    """Handbook cylinder (module docstring): mass, centre, polar and transverse moments."""
    length, outer = 0.8, 0.09
    rotor = uniform_shaft(length=length, diameter=outer, inner=inner, elements=4)
    props = rv.mass_properties(rotor)
    r2 = (outer / 2) ** 2 + (inner / 2) ** 2
    mass = STEEL.density * math.pi / 4 * (outer ** 2 - inner ** 2) * length
    tube = "hollow" if inner else "solid"
    check(f"Uniform {tube} tube 0.8 m: mass (kg)", HANDBOOK, mass, props.mass, 1e-12)
    check(f"Uniform {tube} tube 0.8 m: centre of mass (m)", HANDBOOK, length / 2, props.centre,
          1e-12)
    check(f"Uniform {tube} tube 0.8 m: polar moment m (R^2 + r^2) / 2 (kg m^2)", HANDBOOK,
          mass * r2 / 2, props.polar, 1e-12)
    check(f"Uniform {tube} tube 0.8 m: transverse moment m (3 (R^2 + r^2) + L^2) / 12 "
          "(kg m^2)", HANDBOOK, mass * (3 * r2 + length ** 2) / 12, props.transverse, 1e-12)


def test_a_shaft_with_a_disk_follows_the_parallel_axis_theorem():
    """Parallel-axis theorem (module docstring): a 50 kg disk at one end of a tube."""
    length, outer = 1.0, 0.06
    shaft = uniform_shaft(length=length, diameter=outer, elements=4)
    disk = Disk(1, 50.0, 0.4, 0.2)
    rotor = dataclasses.replace(shaft, disks=(disk,))
    m_s = STEEL.density * math.pi / 4 * outer ** 2 * length
    centre = (m_s * length / 2 + 50.0 * length) / (m_s + 50.0)
    transverse = (m_s * (3 * (outer / 2) ** 2 + length ** 2) / 12 + m_s * (length / 2 - centre) ** 2
                  + 0.2 + 50.0 * (length - centre) ** 2)
    props = rv.mass_properties(rotor)
    source = "parallel-axis theorem with the cylinder table (" + HANDBOOK + ")"
    check("Tube with an end disk: centre of mass (m)", source, centre, props.centre, 1e-12)
    check("Tube with an end disk: transverse moment about the centre (kg m^2)", source,
          transverse, props.transverse, 1e-12)
    check("Tube with an end disk: polar moment (kg m^2)", source,
          m_s * (outer / 2) ** 2 / 2 + 0.4, props.polar, 1e-12)


def _rigid_motions(system, centre):
    """A unit translation in x and a unit tilt in the x-z plane about ``centre`` (the tilt
    DOF and its sign chosen as the one the shaft's stiffness does not strain)."""
    n = system.n_dof
    nodes = system.mesh.node_z
    shift = np.zeros(n)
    shift[system.translation_dofs[:, 0]] = 1.0
    best = None
    for dof in (2, 3):
        for sign in (1.0, -1.0):
            tilt = np.zeros(n)
            tilt[system.translation_dofs[:, 0]] = nodes - centre
            tilt[4 * np.arange(len(nodes)) + dof] = sign
            strain = np.linalg.norm(system.shaft_stiffness @ tilt)
            if best is None or strain < best[0]:
                best = (strain, tilt)
    return shift, best[1]


@pytest.mark.parametrize("case", CASES, ids=lambda p: p.stem)
def test_mass_and_transverse_inertia_match_the_assembled_mass_matrix(case):
    """Every bundled case: u^T M u and v^T M v of the rigid motions (module docstring)
    against the sums of :func:`mass_properties` (supports held still: no pedestal mass)."""
    rotor = read_rotor(case)
    rotor = dataclasses.replace(rotor, bearings=tuple(
        dataclasses.replace(b, support=None) for b in rotor.bearings))
    system = assemble(rotor)
    props = rv.mass_properties(rotor)
    shift, tilt = _rigid_motions(system, props.centre)
    check(f"{case.stem}: rotor mass (kg)", MATRIX, shift @ (system.mass @ shift), props.mass,
          1e-9)
    check(f"{case.stem}: transverse moment about the centre of mass (kg m^2)", MATRIX,
          tilt @ (system.mass @ tilt), props.transverse, 1e-9)


def test_the_mesh_check_reports_a_coarse_mesh_and_passes_a_fine_one():
    """A pinned-pinned-like uniform shaft on stiff bearings, operating up to its second
    bending mode: with one element per half the second mode is several per cent off (more
    than the 0.5 % tolerance), with ten per half they agree (convergence of the cubic beam
    element, common practice)."""
    from rotorcalc.model import Bearing
    stiff = {"kxx": (1e10,), "kyy": (1e10,)}
    coarse = Rotor((Section(0.5, 0.05, STEEL, elements=1), Section(0.5, 0.05, STEEL, elements=1)),
                   OperatingRange(100.0, 3000.0),
                   bearings=(Bearing(0, stiff), Bearing(2, stiff)))
    fine = dataclasses.replace(coarse, sections=tuple(
        dataclasses.replace(s, elements=10) for s in coarse.sections))
    for rotor, converged in ((coarse, False), (fine, True)):
        result = screen(rotor)
        check = rv.mesh_check(rotor, result.sweep)
        assert check.converged is converged, check.describe()
        assert check.fine_elements == 2 * check.elements
        assert ("refine the mesh" in check.describe()) is not converged


def test_findings_list_every_failing_item_with_its_rule_and_label():
    """A rotor that fails: each margin row that fails appears with the margin rule's own
    text and label, each coverage gap as not judged."""
    rotor = read_rotor(ROOT / "cases" / "feed_pump.toml")
    op = rotor.operating
    result = screen(rotor)
    first = result.margins.rows[0].critical.speed
    # an operating range on the first critical: its margin must fail
    moved = dataclasses.replace(rotor, operating=dataclasses.replace(
        op, min_speed=first * 0.98, max_speed=first * 1.02, trip_speed=first * 1.05))
    failing = screen(moved)
    found = rv.findings(failing)
    margins = [f for f in found if f.kind == "margin"]
    assert len(margins) == sum(not r.passed for r in failing.margins.rows) >= 1
    assert all(f.rule == failing.margins.rule.describe() and f.label == failing.margins.rule.label
               for f in margins)
    assert [f.text for f in found if f.kind == "coverage"] == [g.text for g in failing.gaps]
    assert not rv.findings(result) or result.verdict != "pass"


def test_the_review_runs_each_analysis_once(monkeypatch):
    """One screening (the variants' base is the rotor's own), one statics, one map."""
    import rotorcalc.analysis.stiffness_study as study_module
    import rotorcalc.analysis.whatif as whatif
    import rotorcalc.statics as statics_module
    from rotorcalc.variants import read_variants
    calls = {"screen": 0, "statics": 0, "map": 0}

    def counted(name, function):
        def wrapper(*args, **kwargs):
            calls[name] += 1
            return function(*args, **kwargs)
        return wrapper

    monkeypatch.setattr(rv, "screen", counted("screen", rv.screen))
    monkeypatch.setattr(whatif, "screen", counted("screen", whatif.screen))
    monkeypatch.setattr(statics_module, "static_solution",
                        counted("statics", statics_module.static_solution))
    monkeypatch.setattr(study_module, "stiffness_study",
                        counted("map", study_module.stiffness_study))
    _, rotor, variants = read_variants(ROOT / "cases" / "overhung_fan_variants.toml")
    review = rv.review(rotor, variants)
    assert calls == {"screen": 1 + len(variants), "statics": 1, "map": 1}
    assert review.comparison.screenings[0] is review.screening
