"""Property tests: random valid rotors keep the structural invariants.

The invariants follow from the energy expressions (kinetic energy gives a
symmetric positive-definite M; strain energy a symmetric K; the gyroscopic
term is skew-symmetric) and from real matrices having conjugate eigenvalues.
"""

import numpy as np
import scipy.linalg as la
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from rotorcalc.analysis import modes_at
from rotorcalc.assembly import assemble
from rotorcalc.model import Bearing, Disk, Material, OperatingRange, Rotor, Section, Settings
from rotorcalc.solvers import scaled_pencil

finite = dict(allow_nan=False, allow_infinity=False)


@st.composite
def rotors(draw, isotropic=False):
    # valid physics only: a Poisson's ratio of metals, disks with I_p <= 2 I_t
    modulus = draw(st.floats(7e10, 2.2e11, **finite))
    material = Material("m", modulus,
                        modulus / (2.0 * (1.0 + draw(st.floats(0.25, 0.35, **finite)))),
                        draw(st.floats(2700, 8900, **finite)))
    n = draw(st.integers(1, 4))
    sections = []
    for i in range(n):
        od = draw(st.floats(0.02, 0.2, **finite))
        sections.append(Section(draw(st.floats(0.05, 0.6, **finite)), od, material,
                                inner_diameter=draw(st.sampled_from([0.0, 0.5 * od])),
                                elements=draw(st.integers(1, 3)),
                                added_mass=draw(st.sampled_from([0.0, 2.0]))))
    disks = []
    for _ in range(draw(st.integers(0, 2))):
        polar = draw(st.floats(0.01, 2, **finite))
        disks.append(Disk(draw(st.integers(0, n)), draw(st.floats(1, 80, **finite)), polar,
                          polar / 2.0 + draw(st.floats(0.0, 1, **finite))))
    disks = tuple(disks)
    bearings = []
    for station in sorted({0, n, draw(st.integers(0, n))}):
        kx = draw(st.floats(1e6, 1e9, **finite))
        ky = kx if isotropic else draw(st.floats(1e6, 1e9, **finite))
        cx = draw(st.floats(0, 1e4, **finite))
        coefficients = {"kxx": (kx,), "kyy": (ky,), "cxx": (cx,), "cyy": (cx,)}
        bearings.append(Bearing(station, coefficients))
    return Rotor(tuple(sections), OperatingRange(100.0, 300.0), disks=disks,
                 bearings=tuple(bearings), settings=Settings(mode_count=4))


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(rotors())
def test_matrix_invariants(rotor):
    s = assemble(rotor)
    m, k, g = s.mass.toarray(), s.stiffness(200.0).toarray(), s.gyroscopic.toarray()
    assert np.array_equal(m, m.T)
    assert np.array_equal(k, k.T)
    assert np.array_equal(g, -g.T)
    assert np.all(np.linalg.eigvalsh(m) > 0)
    ux = np.zeros(s.n_dof)
    ux[0::4] = 1.0
    assert ux @ m @ ux > 0
    assert np.isclose(ux @ m @ ux, rotor.mass, rtol=1e-10)


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(rotors(), st.floats(0, 2000, **finite))
def test_eigenvalues_in_conjugate_pairs(rotor, speed):
    s = assemble(rotor)
    a, b, _, _ = scaled_pencil(s.mass, s.damping(speed) + speed * s.gyroscopic, s.stiffness(speed))
    lam = la.eigvals(a, b)
    lam = lam[np.isfinite(lam)]
    scale = np.abs(lam).max()
    upper = np.sort_complex(lam[lam.imag > 1e-9 * scale])
    lower = np.sort_complex(np.conj(lam[lam.imag < -1e-9 * scale]))
    assert len(upper) == len(lower)
    assert np.allclose(upper, lower, rtol=1e-7, atol=1e-9 * scale)


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(rotors(isotropic=True))
def test_isotropic_pairs_equal_at_zero_speed(rotor):
    m = modes_at(rotor, 0.0, 4)
    f = m.frequency
    assert np.allclose(f[0::2], f[1::2], rtol=1e-7)


@settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(rotors(isotropic=True))
def test_results_independent_of_mesh_refinement(rotor):
    """Refining the mesh converges the results: starting from the reader's default mesh
    (one element per two diameters of section length), the change of the two lowest
    damped frequencies from doubling the elements again is at most half the change from
    the first doubling (the elements converge as h^2 to h^4, docs/verification.md), and
    below 1 %.  The halving holds once the mesh is in its asymptotic range; below a change
    of 1e-6 of the frequency the mesh no longer matters and a one-element start may lie
    before that range (a stubby shaft whose lowest modes are the rigid rotor on its
    bearings: 1, 2, 4, 8, 16 elements give 234.359431, ...404, ...358, ...345, ...342 rad/s,
    a second change larger than the first, then a factor of 3.5 to 4 per doubling).

    The modes compared are the two lowest the tool would judge (damping ratio below the
    rotor's ``overdamped_ratio``): a motion damped to the edge of overdamping has a damped
    frequency that no mesh holds (sqrt(1 - zeta^2) at zeta 0.9997), and its frequency falls
    below the judged modes' or it turns overdamped as the mesh is refined (a light end section
    on a damped bearing: 132, 58, 22 rad/s at 1, 2, 4 times the elements, then two real
    eigenvalues), so that the two lowest frequencies were not the same modes each time."""
    import dataclasses
    import math as _math

    def meshed(r, factor):
        return dataclasses.replace(r, sections=tuple(dataclasses.replace(
            s, elements=factor * max(s.elements, _math.ceil(s.length / (2 * s.outer_diameter))))
            for s in r.sections))

    def judged(r):
        m = modes_at(r, 0.0, 8)
        zeta = -m.eigenvalues.real / np.abs(m.eigenvalues)
        return m.frequency[zeta < rotor.settings.overdamped_ratio][:2]

    f1, f2, f4 = (judged(meshed(rotor, n)) for n in (1, 2, 4))
    assert len(f1) == len(f2) == len(f4) == 2
    assert np.all(np.abs(f4 - f2) <= 0.5 * np.abs(f2 - f1) + 1e-6 * f4)
    assert np.allclose(f4, f2, rtol=1e-2)
