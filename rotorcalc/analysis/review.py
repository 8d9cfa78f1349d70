"""Everything a design review reads, computed once: the screening (sweep, stability,
critical speeds, margins, unbalance response, the file's cross-coupling screen), the rotor
at rest, the bearings' coefficients, the critical-speed map, the mode shapes at the
critical speeds, a mesh check and the what-if variants.

The report (:mod:`rotorcalc.report`) only presents this object: it computes nothing.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from ..model import Rotor
from ..units import to_rpm
from ..vocabulary import CAUTION
from .modes import Modes
from .screening import Screening, screen

#: The mesh check's finer mesh has this many times the elements of every section.
MESH_REFINEMENT = 2
#: Natural frequencies compared by the mesh check: those below this multiple of the top
#: sweep speed (the ones the verdicts read, with room above).
MESH_CHECK_SPAN = 1.5
#: A change of the checked frequencies above this share on refining is reported as a
#: coarse mesh (common practice).
MESH_TOLERANCE = 0.005


@dataclass(frozen=True)
class Finding:
    """One item a verdict rests on that did not pass: what, and by which rule.

    ``kind``: "margin", "stability", "response", "cross-coupling" or "coverage".
    ``rule`` and ``label`` name the rule and where it comes from (empty for coverage:
    the item was not judged at all).
    """

    kind: str
    text: str
    rule: str = ""
    label: str = ""

    def to_dict(self):
        return dataclasses.asdict(self)


def findings(result: Screening):
    """Every failing or uncovered item of a screening, in the order a reviewer reads them."""
    from .stability import describe_branch
    out = []
    rule = result.margins.rule
    for row in result.margins.rows:
        if not row.passed:
            c = row.critical
            text = (f"critical speed {to_rpm(c.speed):.0f} rpm ({c.whirl}, log dec "
                    f"{c.log_dec:.3f}): margin {row.margin:.1f} % {row.side}, required "
                    f"{row.required:.1f} %, verdict {row.verdict}")
            if row.verdict_response is not None:
                text += f"; from the response peak: {row.verdict_response}"
            out.append(Finding("margin", text, rule.describe(), rule.label))
    stab = result.stability
    if stab is not None:
        for m in stab.failing:
            out.append(Finding("stability", describe_branch(m), stab.rule.describe(),
                               stab.rule.label))
        if stab.divergent_speeds:
            out.append(Finding("stability", "a non-oscillating motion grows at "
                               f"{len(stab.divergent_speeds)} speeds (first at "
                               f"{to_rpm(stab.divergent_speeds[0]):.0f} rpm)",
                               stab.rule.describe(), stab.rule.label))
    response = result.response
    if response is not None:
        from .response import limits_caption
        rule = limits_caption(result.rotor)   # names each limit's label in its words
        for check in response.vibration + response.clearance:
            if not check.passed:
                out.append(Finding(
                    "response", f"{check.check} at {check.where} ({check.case}): "
                    f"{check.value * 1e6:.1f} um at {to_rpm(check.speed):.0f} rpm against "
                    f"{check.limit * 1e6:.1f} um, {check.verdict}", rule, ""))
    coupling = result.coupling
    if coupling is not None and not coupling.passed:
        criteria = coupling.screen.criteria
        if coupling.screen.verdict != "pass":
            out.append(Finding("cross-coupling", f"the screen {coupling.screen.verdict}s: "
                               f"{coupling.screen.summary()}", criteria.describe_screen(),
                               criteria.label))
        if coupling.sources is not None and not coupling.sources.passed:
            out.append(Finding("cross-coupling", "with every source applied: "
                               f"{coupling.sources.summary()}", criteria.describe_sources(),
                               criteria.label))
    out.extend(Finding("coverage", gap.text) for gap in result.gaps)
    return tuple(out)


@dataclass(frozen=True)
class MassProperties:
    """The rotor as a rigid body: mass (kg), axial centre of mass (m from the first
    station), polar moment of inertia about the spin axis and transverse moment about the
    centre of mass (kg m^2), summed from the sections (uniform tubes; added mass spread
    along the axis, as the model carries it: translational inertia only) and the disks."""

    mass: float
    centre: float
    polar: float
    transverse: float

    def to_dict(self):
        return {"mass_kg": self.mass, "centre_of_mass_m": self.centre,
                "polar_inertia_kg_m2": self.polar, "transverse_inertia_kg_m2": self.transverse}


def mass_properties(rotor: Rotor) -> MassProperties:
    """Rigid-body mass properties (see :class:`MassProperties`)."""
    z = rotor.station_positions
    parts = []   # (mass, axial position, polar, transverse about own centre)
    for i, s in enumerate(rotor.sections):
        ro2, ri2 = (s.outer_diameter / 2) ** 2, (s.inner_diameter / 2) ** 2
        m_tube = s.material.density * s.area * s.length
        polar = m_tube * (ro2 + ri2) / 2
        transverse = (m_tube * (3 * (ro2 + ri2) + s.length ** 2) / 12
                      + s.added_mass * s.length ** 2 / 12)
        parts.append((m_tube + s.added_mass, (z[i] + z[i + 1]) / 2, polar, transverse))
    for d in rotor.disks:
        parts.append((d.mass, z[d.station], d.polar_inertia, d.transverse_inertia))
    m = np.array([p[0] for p in parts])
    pos = np.array([p[1] for p in parts])
    mass = float(m.sum())
    centre = float(m @ pos / mass)
    polar = float(sum(p[2] for p in parts))
    transverse = float(sum(p[3] for p in parts) + m @ (pos - centre) ** 2)
    return MassProperties(mass, centre, polar, transverse)


@dataclass(frozen=True)
class MeshCheck:
    """The natural frequencies at one sweep speed with the rotor's mesh and with every
    section's elements multiplied by :data:`MESH_REFINEMENT`.

    ``speed`` rad/s; ``coarse`` and ``fine`` rad/s (the damped frequencies below
    :data:`MESH_CHECK_SPAN` times the top sweep speed, lowest first); ``elements`` and
    ``fine_elements`` the shaft element counts.
    """

    speed: float
    coarse: np.ndarray
    fine: np.ndarray
    elements: int
    fine_elements: int

    @property
    def largest_change(self):
        if not len(self.coarse):
            return 0.0
        return float(np.max(np.abs(self.coarse - self.fine) / self.fine))

    @property
    def converged(self):
        return self.largest_change <= MESH_TOLERANCE

    def describe(self):
        n = len(self.coarse)
        if not n:
            return (f"No natural frequency below {MESH_CHECK_SPAN:g} times the top sweep "
                    "speed: the mesh was not checked.")
        verdict = ("the mesh is fine enough for them" if self.converged else
                   f"more than {MESH_TOLERANCE:.1%} (common practice): refine the mesh "
                   "(more elements per section) before signing")
        return (f"With {MESH_REFINEMENT} times the elements ({self.elements} -> "
                f"{self.fine_elements}), the {n} natural frequencies below "
                f"{MESH_CHECK_SPAN:g} times the top sweep speed at {to_rpm(self.speed):.0f} "
                f"rpm change by {self.largest_change:.2%} at most: {verdict}.")

    def to_dict(self):
        return {"speed_rpm": float(to_rpm(self.speed)), "elements": self.elements,
                "fine_elements": self.fine_elements,
                "frequencies_hz": [float(w / (2 * np.pi)) for w in self.coarse],
                "fine_frequencies_hz": [float(w / (2 * np.pi)) for w in self.fine],
                "largest_change": self.largest_change, "converged": self.converged,
                "text": self.describe()}


def mesh_check(rotor: Rotor, result) -> MeshCheck:
    """Compare the sweep's frequencies at the speed nearest the maximum continuous speed
    with those of a mesh :data:`MESH_REFINEMENT` times finer (one extra solve)."""
    from .modes import modes_at
    speeds = result.speeds
    i = int(np.argmin(np.abs(speeds - rotor.operating.max_speed)))
    speed = float(speeds[i])
    top = MESH_CHECK_SPAN * float(speeds[-1])
    coarse = np.sort(result.eigenvalues[i].imag)
    coarse = coarse[(coarse > 0) & (coarse < top)]
    fine_rotor = dataclasses.replace(rotor, sections=tuple(
        dataclasses.replace(s, elements=s.elements * MESH_REFINEMENT) for s in rotor.sections))
    fine = np.sort(modes_at(fine_rotor, speed, result.eigenvalues.shape[1]).eigenvalues.imag)
    fine = fine[fine > 0]
    n = min(len(coarse), len(fine))
    elements = sum(s.elements for s in rotor.sections)
    return MeshCheck(speed, coarse[:n], fine[:n], elements, elements * MESH_REFINEMENT)


def critical_modes(result: Screening):
    """The mode at each critical speed as a one-mode :class:`Modes` (for its picture)."""
    out = []
    for c in result.criticals:
        out.append(Modes(c.speed, np.array([c.eigenvalue]), c.shape[None],
                         np.zeros((0, 1), dtype=complex), result.sweep.node_z,
                         result.sweep.station_nodes, np.zeros(0)))
    return tuple(out)


@dataclass(frozen=True)
class Review:
    """Every result a design review presents (module docstring).  ``statics`` and
    ``stiffness`` are None for a rotor without bearings; ``comparison`` None without
    variants."""

    rotor: Rotor
    screening: Screening
    mass: MassProperties
    mesh: MeshCheck
    modes: tuple
    bearings: tuple
    statics: object = None
    stiffness: object = None
    coupling: object = None
    comparison: object = None
    variants: tuple = ()

    @property
    def verdict(self):
        return self.screening.verdict

    @property
    def findings(self):
        return findings(self.screening)

    @property
    def warnings(self):
        """Every analysis's warnings, each once, in the order the analyses ran."""
        s = self.screening
        out = list(s.sweep.warnings)
        if s.response is not None:
            out += list(s.response.warnings)
        if self.comparison is not None:
            for name, other in zip(self.comparison.names[1:], self.comparison.screenings[1:]):
                out += [f"({name}) {w}" for w in other.sweep.warnings]
        return tuple(dict.fromkeys(str(w) for w in out))

    def to_dict(self):
        out = {"verdict": self.verdict, "findings": [f.to_dict() for f in self.findings],
               "mass_properties": self.mass.to_dict(), "mesh_check": self.mesh.to_dict(),
               "screening": self.screening.to_dict(), "caution": CAUTION}
        if self.statics is not None:
            out["statics"] = self.statics.to_dict()
        if self.stiffness is not None:
            out["critical_speed_map"] = self.stiffness.to_dict()
        if self.comparison is not None:
            out["comparison"] = self.comparison.to_dict()
        return out


def side_analyses(rotor: Rotor):
    """(statics, bearing curves, stiffness study, cross-coupling study) of a rotor: the
    analyses that do not need the screening (statics and the map are None without a
    journal bearing, the study None when the file asks for no cross-coupling screen)."""
    from .bearing_curves import bearing_curves
    statics = stiffness = coupling = None
    if any(b.role != "seal" for b in rotor.bearings):
        from ..statics import static_solution
        from .stiffness_study import stiffness_study
        statics = static_solution(rotor)
        stiffness = stiffness_study(rotor)
    if rotor.coupling_rule is not None:
        from .coupling_screen import coupling_study
        coupling = coupling_study(rotor)
    return statics, tuple(bearing_curves(rotor)), stiffness, coupling


def finish_review(rotor: Rotor, result: Screening, side, variants=(), workers=1) -> Review:
    """The review from the rotor's screening and its :func:`side_analyses` (whose
    cross-coupling study the screening took): the analyses that read the screening (mesh
    check, shapes at the criticals, the variants)."""
    statics, bearings, stiffness, coupling = side
    comparison = None
    if variants:
        from .whatif import compare
        comparison = compare(rotor, variants, workers=workers, base=result)
    return Review(rotor, result, mass_properties(rotor), mesh_check(rotor, result.sweep),
                  critical_modes(result), bearings, statics, stiffness, coupling, comparison,
                  tuple(variants))


def review(rotor: Rotor, variants=(), workers=1, progress=None) -> Review:
    """Run every analysis the rotor file asks for, each once (module docstring).

    Parameters
    ----------
    rotor : Rotor
    variants : sequence of Variant
        What-if variants screened beside the rotor (the rotor's own screening is reused
        as their base).
    workers : int
        Worker processes for the sweep and the variants' screenings; results do not
        depend on it.
    progress : callable, optional
        ``progress(done, total)`` of the sweep.
    """
    side = side_analyses(rotor)
    result = screen(rotor, progress=progress, workers=workers, coupling=side[3])
    return finish_review(rotor, result, side, variants, workers)
