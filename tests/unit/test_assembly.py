"""Global matrices: symmetry, totals against analytic sums, DOF map."""

import numpy as np
import pytest

from rotorcalc.assembly import assemble
from rotorcalc.model import Bearing, Disk, Support
from tests.conftest import ROOT, isotropic, uniform_shaft


def rotor_with_parts():
    disk = Disk(1, 12.0, 0.3, 0.16)
    brg = Bearing(0, {"kxx": (1e8,), "kyy": (2e8,), "kxy": (1e7,), "kyx": (-1e7,),
                      "cxx": (1e4,), "cyy": (1e4,)},
                  support=Support(kx=5e8, ky=6e8, mass=30.0, cx=1e3, cy=1e3))
    return uniform_shaft(length=0.8, elements=8, disks=[disk],
                         bearings=[brg, isotropic(1, 1e8)])


def test_matrix_symmetries():
    s = assemble(rotor_with_parts())
    for mat in (s.mass, s.shaft_stiffness, s.support_stiffness, s.support_damping):
        assert abs(mat - mat.T).max() == 0
    assert abs(s.gyroscopic + s.gyroscopic.T).max() == 0
    k = s.stiffness(100.0).toarray()
    assert k[0, 1] == pytest.approx(1e7) and k[1, 0] == pytest.approx(-1e7)


def test_totals_match_analytic():
    """Rigid translation gives the total mass; rigid tilts give transverse and polar inertia."""
    rotor = rotor_with_parts()
    s = assemble(rotor)
    z = s.mesh.node_z
    zc = 0.4
    ux = np.zeros(s.n_dof)
    ux[0:4 * len(z):4] = 1
    ux[s.support_dofs[0, 0]] = 1
    assert ux @ s.mass @ ux == pytest.approx(rotor.mass + 30.0, rel=1e-12)
    sec = rotor.sections[0]
    tilt_x, tilt_y = np.zeros(s.n_dof), np.zeros(s.n_dof)
    tilt_x[0:4 * len(z):4], tilt_x[2:4 * len(z):4] = z - zc, 1.0
    tilt_y[1:4 * len(z):4], tilt_y[3:4 * len(z):4] = z - zc, 1.0
    m_shaft = sec.mass
    i_shaft = m_shaft * sec.length**2 / 12 + sec.material.density * sec.second_moment * sec.length
    disk_term = 0.16 + 12.0 * (0.8 - zc) ** 2
    assert tilt_x @ s.mass @ tilt_x == pytest.approx(i_shaft + disk_term, rel=1e-12)
    polar = 2 * sec.material.density * sec.second_moment * sec.length + 0.3
    assert tilt_x @ s.gyroscopic @ tilt_y == pytest.approx(polar, rel=1e-12)


def test_dof_map():
    s = assemble(rotor_with_parts())
    assert s.n_dof == 4 * 9 + 2
    assert list(s.node_dofs(3)) == [12, 13, 14, 15]
    assert list(s.mesh.station_nodes) == [0, 8]
    np.testing.assert_array_equal(s.support_dofs, [[36, 37], [-1, -1]])
    m, k, g, dofs = s.element_matrices(2)
    assert m.shape == (8, 8) and list(dofs) == list(range(8, 16))


def test_speed_table_interpolation_and_hold():
    brg = Bearing(0, {"kxx": (1e8, 2e8), "kyy": (1e8, 2e8)}, speeds=(100.0, 200.0), name="A")
    s = assemble(uniform_shaft(bearings=[brg, isotropic(1, 1e8)]))
    assert s.stiffness(150.0)[0, 0] - s.shaft_stiffness[0, 0] == pytest.approx(1.5e8)
    assert s.stiffness(500.0)[0, 0] - s.shaft_stiffness[0, 0] == pytest.approx(2e8)
    assert s.table_warnings([50.0, 150.0]) and "below 955 rpm" in s.table_warnings([50.0])[0]
    assert s.table_warnings([150.0]) == []


def test_a_system_with_other_sources_equals_the_rotor_assembled_with_them():
    """What the cross-coupling screen does at each amount (no assembly again): the same
    matrices, entry for entry, as assembling the rotor with those sources."""
    import dataclasses

    from rotorcalc.analysis.coupling_screen import applied_sources
    from rotorcalc.assembly import assemble, with_sources
    from rotorcalc.reader import read_rotor
    rotor = read_rotor(ROOT / "cases" / "compressor.toml")
    bare = dataclasses.replace(rotor, sources=())
    shares = tuple((s.station, 1.0 / len(rotor.sources)) for s in rotor.sources)
    sources = applied_sources(shares, 3.5e6)
    fast = with_sources(assemble(bare), sources)
    slow = assemble(dataclasses.replace(bare, sources=sources))
    speed = rotor.operating.max_speed
    for name in ("stiffness", "damping"):
        a, b = getattr(fast, name)(speed), getattr(slow, name)(speed)
        assert (a != b).nnz == 0, name
    assert (fast.mass != slow.mass).nnz == 0 and fast.rotor == slow.rotor
    assert (fast.stiffness(speed) != assemble(bare).stiffness(speed)).nnz > 0


def _sparse_sum(system, speed, whirl, which):
    """K or C by adding sparse matrices: the constant part and the links' blocks as a COO
    matrix (what the fixed-pattern assembly replaces)."""
    part = system._bearing_part(speed, which, whirl)
    if which == "k":
        return system.shaft_stiffness + system.support_stiffness + part
    return system.support_damping + part


@pytest.mark.parametrize("case", ["compressor", "hp_compressor_damper_seal", "feed_pump",
                                  "overhung_fan", "generated"])
def test_fixed_pattern_assembly_gives_the_sparse_sums_bit_for_bit(case):
    """K(spin) and C(spin) from the fixed pattern (``assembly._Scatter``): the same pattern
    (canonical, no stored zeros) and the same numbers, bit for bit, as the sparse sums, at
    speeds over the range and at other whirl frequencies; on the generated rotor (bearings
    on pedestals, a seal, speed-dependent cross-coupling) and with applied sources too."""
    import dataclasses

    from rotorcalc.analysis.coupling_screen import applied_sources
    from rotorcalc.assembly import with_sources
    from rotorcalc.reader import read_rotor
    if case == "generated":
        from tests.benchmarks.generated import generated_rotor
        rotor = generated_rotor(40, mode_count=4, speed_count=10)
    else:
        rotor = read_rotor(ROOT / "cases" / f"{case}.toml")
    system = assemble(rotor)
    systems = [system, with_sources(system, applied_sources(((1, 1.0),), 2e6))]
    for s in systems:
        for speed in np.linspace(0.0, 1.3 * rotor.operating.max_speed, 6):
            for whirl in (None, 0.4 * speed + 1.0):
                for which, name in (("k", "stiffness"), ("c", "damping")):
                    a = getattr(s, name)(speed, whirl)
                    b = _sparse_sum(s, speed, whirl, which).tocsr()
                    assert a.has_canonical_format and not (a.data == 0).any()
                    assert np.array_equal(a.indptr, b.indptr), (name, speed)
                    assert np.array_equal(a.indices, b.indices), (name, speed)
                    assert np.array_equal(a.data, b.data), (name, speed)


def test_fixed_pattern_drops_entries_that_come_to_zero():
    """A bearing coefficient of exactly zero at some speed leaves no stored zero (the sparse
    sum drops it too), so the solvers' cached reorderings see one pattern per pattern."""
    brg = Bearing(0, {"kxx": (1e8, 1e8), "kyy": (1e8, 1e8), "kxy": (0.0, 5e6)},
                  speeds=(100.0, 200.0), name="A")
    s = assemble(uniform_shaft(bearings=[brg, isotropic(1, 1e8)]))
    low, high = s.stiffness(100.0), s.stiffness(200.0)
    assert not (low.data == 0).any() and high.nnz == low.nnz + 1
    assert low[0, 1] == s.shaft_stiffness[0, 1] and high[0, 1] == 5e6
