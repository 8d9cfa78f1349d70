"""Rotor model to global sparse matrices and the DOF map: a pure function.

Global DOFs: shaft node ``n`` owns ``4n .. 4n+3`` = ``[x, y, a, b]``; the
support (pedestal) nodes follow, two DOFs ``[xs, ys]`` each.  The equation of
motion is ``M q'' + (C(spin) + spin G) q' + K(spin) q = f``.
"""

from __future__ import annotations

import dataclasses
import threading
from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from .fe import bearing as fe_bearing
from .fe.disk import disk_gyroscopic, disk_mass
from .fe.shaft import ShaftElement
from .errors import InputError
from .notices import Notice
from .model import Rotor
from .units import to_rpm

DOF_PER_NODE = 4
#: Relative size below which a bearing stiffness (or a damping acting on a rigid
#: motion) counts as none: far below any bearing, far above roundoff.
RIGID_RTOL = 1e-10


@dataclass(frozen=True)
class Mesh:
    """Nodes and elements of a rotor's shaft.

    Attributes
    ----------
    node_z : ndarray
        Axial position of every shaft node, m.
    station_nodes : ndarray of int
        Node index of every station.
    elements : tuple of ShaftElement
    element_nodes : ndarray (n_elements, 2)
    element_section : ndarray of int
        Section each element belongs to.
    """

    node_z: np.ndarray
    station_nodes: np.ndarray
    elements: tuple
    element_nodes: np.ndarray
    element_section: np.ndarray

    @property
    def n_nodes(self):
        return len(self.node_z)


def mesh(rotor: Rotor) -> Mesh:
    """Divide every section into its elements."""
    theory = rotor.settings.beam_theory
    z, station_nodes, elements, sections = [0.0], [0], [], []
    for index, section in enumerate(rotor.sections):
        n = section.elements
        length = section.length / n
        for _ in range(n):
            elements.append(ShaftElement(
                length=length,
                outer_diameter=section.outer_diameter,
                inner_diameter=section.inner_diameter,
                youngs_modulus=section.material.youngs_modulus,
                shear_modulus=section.material.shear_modulus,
                density=section.material.density,
                added_mass=section.added_mass / n,
                shear=theory == "timoshenko",
                rotary=theory != "euler-bernoulli"))
            sections.append(index)
            z.append(z[-1] + length)
        station_nodes.append(len(z) - 1)
    element_nodes = np.array([[i, i + 1] for i in range(len(elements))], dtype=int)
    return Mesh(np.asarray(z), np.asarray(station_nodes, dtype=int), tuple(elements),
                element_nodes, np.asarray(sections, dtype=int))


@dataclass(frozen=True)
class _Link:
    """A speed-dependent 2x2 bearing acting between ground or a support node."""

    bearing: object
    dofs: np.ndarray      # global DOFs of the element ([x, y] or [x, y, xs, ys])


@dataclass(frozen=True)
class SystemMatrices:
    """Global matrices of a rotor-bearing system and its DOF map.

    Use :meth:`stiffness` and :meth:`damping` for the speed-dependent parts;
    ``mass`` and ``gyroscopic`` are constant.  All matrices are
    ``scipy.sparse`` CSR in SI units.
    """

    rotor: Rotor
    mesh: Mesh
    mass: sp.csr_matrix
    gyroscopic: sp.csr_matrix
    shaft_stiffness: sp.csr_matrix
    support_stiffness: sp.csr_matrix
    support_damping: sp.csr_matrix
    links: tuple
    n_dof: int
    support_dofs: np.ndarray   # (n_bearings, 2), -1 where the bearing is grounded
    source_links: tuple = ()   # destabilising sources, grounded at their station
    # the links' 2x2 coefficients at the last (speed, whirl) read: stiffness and damping
    # are asked for at the same speed one after the other (never copied by replace)
    _last: dict = dataclasses.field(default_factory=dict, init=False, compare=False,
                                    repr=False)

    def node_dofs(self, node):
        """Global DOFs ``[x, y, a, b]`` of a shaft node."""
        return DOF_PER_NODE * node + np.arange(DOF_PER_NODE)

    @property
    def every_link(self):
        """The bearings' and seals' links, then the destabilising sources'."""
        return self.links + self.source_links

    @property
    def translation_dofs(self):
        """(n_nodes, 2) global DOFs of x and y at every shaft node."""
        base = DOF_PER_NODE * np.arange(self.mesh.n_nodes)
        return np.stack([base, base + 1], axis=1)

    def _bearing_part(self, omega, which, whirl, part=None):
        """The bearings' (and sources') stiffness (``which="k"``) or damping at ``omega``,
        as a sparse matrix; ``part`` maps each 2x2 block first (the reduced basis's
        reference keeps the direct terms)."""
        rows, cols, data = [], [], []
        for link, (k2, c2) in zip(self.every_link, self._coefficients(omega, whirl)):
            block = k2 if which == "k" else c2
            local = fe_bearing.element(block if part is None else part(block), len(link.dofs))
            r, c = np.meshgrid(link.dofs, link.dofs, indexing="ij")
            rows.append(r.ravel())
            cols.append(c.ravel())
            data.append(local.ravel())
        if not rows:
            return sp.csr_matrix((self.n_dof, self.n_dof))
        return sp.coo_matrix((np.concatenate(data), (np.concatenate(rows), np.concatenate(cols))),
                             shape=(self.n_dof, self.n_dof)).tocsr()

    def _coefficients(self, omega, whirl):
        """Every link's ``(k2, c2)`` at ``omega``, read once for a pair of calls."""
        key = (float(omega), None if whirl is None else float(whirl))
        if key not in self._last:
            self._last.clear()
            self._last[key] = [link.bearing.matrices(omega, whirl)
                               for link in self.every_link]
        return self._last[key]

    def stiffness(self, omega, whirl=None):
        """K(spin): shaft, bearings at ``omega`` (rad/s) and supports.  ``whirl`` (rad/s):
        the whirl frequency two-way bearing tables are read at (default: synchronous)."""
        return _scatter(self, "k").matrix([k2 for k2, _ in self._coefficients(omega, whirl)])

    def damping(self, omega, whirl=None):
        """C(spin): bearings at ``omega`` (rad/s) and supports (no spin * G term);
        ``whirl`` as for :meth:`stiffness`."""
        return _scatter(self, "c").matrix([c2 for _, c2 in self._coefficients(omega, whirl)])

    @property
    def whirl_dependent(self):
        """The bearings, seals and sources whose coefficients depend on whirl frequency."""
        return tuple(link.bearing for link in self.every_link
                     if link.bearing.whirl_dependent)

    def rigid_body_basis(self, omega):
        """Orthonormal basis (n_dof, r) of the rigid-body motions the bearings leave free.

        The shaft alone moves rigidly in four ways (two translations, two
        tilts: ``x = X + z A``, ``y = Y + z B``) with its supports at rest.  Such a
        motion strains nothing when every bearing force ``K_b u_b`` vanishes, so
        the free ones are the null space of the stacked bearing stiffnesses
        applied to the four motions.  The test compares bearing stiffnesses with
        one another and with the whole shaft's bending stiffness
        (:meth:`shaft_scale`), so it depends neither on the mesh nor on the mass
        of shaft and disks; it replaces a test on the size of computed
        eigenvalues, which did (docs/theory.md).
        """
        z = self.mesh.node_z
        length = max(float(z[-1] - z[0]), 1e-300)
        rigid = np.zeros((self.n_dof, 4))
        shaft = DOF_PER_NODE * np.arange(self.mesh.n_nodes)
        rigid[shaft, 0] = 1.0                      # X
        rigid[shaft + 1, 1] = 1.0                  # Y
        rigid[shaft, 2] = (z - z[0]) / length      # A (tilt scaled by the length: like units)
        rigid[shaft + 2, 2] = 1.0 / length
        rigid[shaft + 1, 3] = (z - z[0]) / length  # B
        rigid[shaft + 3, 3] = 1.0 / length
        rows = [link.bearing.matrices(omega)[0] @ rigid[link.dofs[:2]] for link in self.links]
        if rows:
            stack = np.vstack(rows)
            _, sv, vt = np.linalg.svd(stack)
            sv = np.concatenate([sv, np.zeros(4 - len(sv))])
            # against the bearings and the shaft's own bending stiffness: bearings of 1e-3
            # N/m under a steel shaft leave it free, not "supported" at 0.00 Hz
            scale = max(sv[0], self.shaft_scale())
            free = vt[sv <= RIGID_RTOL * scale] if scale > 0 else vt
        else:
            free = np.eye(4)
        if not len(free):
            return np.zeros((self.n_dof, 0))
        return np.linalg.qr(rigid @ free.T)[0]

    def require_support(self):
        """Raise an InputError when the bearings leave a rigid-body motion free at the
        minimum or the maximum continuous speed: a rotor that is not held up has no
        critical speeds to judge (``modes`` may still look at one, free-free)."""
        op = self.rotor.operating
        free = max(self.rigid_body_basis(w).shape[1] for w in (op.min_speed, op.max_speed))
        if free:
            raise InputError("bearing", f"leaves the rotor free in {free} rigid-body "
                             "motion(s): it is not held up", value=len(self.rotor.bearings),
                             expected="bearings with stiffness in x and y at two stations "
                                      "at least", kind="physics")

    def shaft_scale(self):
        """Bending stiffness of the whole shaft, 48 E I / L^3 with its stiffest section
        (N/m): the scale a bearing's stiffness is compared with (mesh independent)."""
        length = max(float(self.mesh.node_z[-1] - self.mesh.node_z[0]), 1e-300)
        ei = max(s.material.youngs_modulus * s.second_moment for s in self.rotor.sections)
        return 48.0 * ei / length**3

    def zero_eigenvalues(self, omega, basis=None, d_mat=None):
        """How many eigenvalues of the pencil at ``omega`` are exactly zero.

        With ``N`` the rigid-body basis (``r`` columns), the quadratic pencil
        has ``2 r - rank(N^T D N)`` zero eigenvalues, ``D = C + spin G``: a
        rigid motion that a damper or the gyroscopic coupling acts on leaves one
        zero eigenvalue, not two (the other becomes a real decay or a nutation).
        """
        basis = self.rigid_body_basis(omega) if basis is None else basis
        r = basis.shape[1]
        if r == 0:
            return 0
        if d_mat is None:
            d_mat = self.damping(omega) + omega * self.gyroscopic
        projected = basis.T @ (d_mat @ basis)
        scale = abs(d_mat).sum(axis=1).max() if d_mat.nnz else 0.0
        if scale == 0.0:
            return 2 * r
        sv = np.linalg.svd(projected, compute_uv=False)
        return 2 * r - int(np.sum(sv > RIGID_RTOL * scale))

    def table_warnings(self, speeds):
        """One warning per bearing whose coefficient table does not cover ``speeds`` (rad/s)."""
        speeds = np.atleast_1d(np.asarray(speeds, dtype=float))
        out = []
        for i, link in enumerate(self.links):
            b = link.bearing
            if len(b.speeds) < 2:
                continue
            lo, hi = b.speeds[0], b.speeds[-1]
            parts = []
            if np.any(speeds < lo * (1 - 1e-12)):
                parts.append(f"below {to_rpm(lo):.0f} rpm")
            if np.any(speeds > hi * (1 + 1e-12)):
                parts.append(f"above {to_rpm(hi):.0f} rpm")
            if parts:
                outside = speeds[(speeds < lo * (1 - 1e-12)) | (speeds > hi * (1 + 1e-12))]
                out.append(Notice(f"bearing {b.name or i}: speeds {' and '.join(parts)} lie "
                                  "outside its coefficient table; the end values were held",
                                  "table-range", outside))
        return out

    def element_matrices(self, index):
        """Mass, stiffness, gyroscopic matrices (8x8) and global DOFs of shaft element ``index``."""
        element = self.mesh.elements[index]
        n1, n2 = self.mesh.element_nodes[index]
        dofs = np.concatenate([self.node_dofs(n1), self.node_dofs(n2)])
        return element.mass(), element.stiffness(), element.gyroscopic(), dofs


class _Collector:
    """COO triplets for one global matrix."""

    def __init__(self):
        self.rows, self.cols, self.data = [], [], []

    def add(self, dofs, block):
        r, c = np.meshgrid(dofs, dofs, indexing="ij")
        self.rows.append(r.ravel())
        self.cols.append(c.ravel())
        self.data.append(np.asarray(block, dtype=float).ravel())

    def matrix(self, n, symmetry=0):
        """The summed matrix; ``symmetry`` +1 or -1 makes it exactly (skew-)symmetric.

        Summing duplicates does not fix the order of the additions, so a
        symmetric sum can differ from its transpose in the last bit.
        """
        if not self.rows:
            return sp.csr_matrix((n, n))
        out = sp.coo_matrix((np.concatenate(self.data),
                             (np.concatenate(self.rows), np.concatenate(self.cols))),
                            shape=(n, n)).tocsr()
        if symmetry:
            out = ((out + symmetry * out.T) * 0.5).tocsr()
        return out


def _element_dofs(n1, n2):
    return np.concatenate([DOF_PER_NODE * n1 + np.arange(4), DOF_PER_NODE * n2 + np.arange(4)])


def assemble(rotor: Rotor) -> SystemMatrices:
    """Build the global sparse matrices of ``rotor``.

    Parameters
    ----------
    rotor : Rotor

    Returns
    -------
    SystemMatrices
    """
    m = mesh(rotor)
    n_shaft = DOF_PER_NODE * m.n_nodes
    n_support = sum(1 for b in rotor.bearings if b.support is not None)
    n_dof = n_shaft + 2 * n_support
    mass, stiff, gyro = _Collector(), _Collector(), _Collector()
    supp_k, supp_c = _Collector(), _Collector()

    for element, (n1, n2) in zip(m.elements, m.element_nodes):
        dofs = _element_dofs(n1, n2)
        mass.add(dofs, element.mass())
        stiff.add(dofs, element.stiffness())
        gyro.add(dofs, element.gyroscopic())

    for disk in rotor.disks:
        dofs = DOF_PER_NODE * m.station_nodes[disk.station] + np.arange(4)
        mass.add(dofs, disk_mass(disk.mass, disk.transverse_inertia))
        gyro.add(dofs, disk_gyroscopic(disk.polar_inertia))

    links, support_dofs, next_dof = [], [], n_shaft
    for i, bearing in enumerate(rotor.bearings):
        if bearing.film is not None and not bearing.coefficients:
            raise InputError(f"{bearing.key}.film", "has no coefficients computed yet",
                             expected="a rotor read by read_rotor, or passed through "
                                      "rotorcalc.bearings.tabulate_films", kind="missing")
        shaft = DOF_PER_NODE * m.station_nodes[bearing.station] + np.arange(2)
        if bearing.support is None:
            links.append(_Link(bearing, shaft))
            support_dofs.append([-1, -1])
            continue
        pedestal = np.array([next_dof, next_dof + 1])
        next_dof += 2
        links.append(_Link(bearing, np.concatenate([shaft, pedestal])))
        support_dofs.append(list(pedestal))
        s = bearing.support
        mass.add(pedestal, np.diag([s.mass, s.mass]))
        supp_k.add(pedestal, np.diag([s.kx, s.ky]))
        supp_c.add(pedestal, np.diag([s.cx, s.cy]))

    return SystemMatrices(
        rotor=rotor, mesh=m, mass=mass.matrix(n_dof, 1), gyroscopic=gyro.matrix(n_dof, -1),
        shaft_stiffness=stiff.matrix(n_dof, 1), support_stiffness=supp_k.matrix(n_dof, 1),
        support_damping=supp_c.matrix(n_dof, 1), links=tuple(links), n_dof=n_dof,
        source_links=tuple(_Link(s, DOF_PER_NODE * m.station_nodes[s.station] + np.arange(2))
                           for s in rotor.sources),
        support_dofs=np.asarray(support_dofs, dtype=int).reshape(-1, 2))


class _Scatter:
    """A speed-dependent matrix (K or C) on a fixed pattern: the constant part's values and,
    for each link, where its element matrix's entries go.  Each speed adds the links' values
    into zeros in link order, adds that to the constant part and drops the entries that come
    to zero: the numbers of the sparse sums it replaces (``constant + bearing part``), bit
    for bit on the bundled and generated rotors (tests/unit/test_assembly.py; where more than
    eight links meet at one node scipy sums their duplicates in another order: to roundoff),
    in a quarter of their time."""

    def __init__(self, constant, links, n):
        rows = [np.repeat(link.dofs, len(link.dofs)) for link in links]
        cols = [np.tile(link.dofs, len(link.dofs)) for link in links]
        c = constant.tocoo()
        every = sp.coo_matrix((np.ones(c.nnz + sum(len(r) for r in rows)),
                               (np.concatenate([c.row] + rows), np.concatenate([c.col] + cols))),
                              shape=(n, n)).tocsr()
        every.sum_duplicates()
        self.indices, self.indptr, self.n = every.indices, every.indptr, n
        keys = np.repeat(np.arange(n), np.diff(every.indptr)) * n + every.indices

        def at(r, cl):
            return np.searchsorted(keys, np.asarray(r, dtype=np.int64) * n + cl)

        self.constant = np.zeros(len(keys))
        self.constant[at(c.row, c.col)] = c.data        # canonical: one entry per place
        self.places = [at(r, cl) for r, cl in zip(rows, cols)]
        self.sizes = [len(link.dofs) for link in links]

    def matrix(self, blocks):
        """The matrix with the links' 2x2 ``blocks``, canonical CSR without zeros."""
        part = np.zeros(len(self.constant))
        for block, size, place in zip(blocks, self.sizes, self.places):
            np.add.at(part, place, fe_bearing.element(block, size).ravel())
        data = self.constant + part
        keep = data != 0
        if keep.all():
            return sp.csr_matrix((data, self.indices.copy(), self.indptr.copy()),
                                 shape=(self.n, self.n))
        indptr = np.concatenate([[0], np.cumsum(keep)])[self.indptr].astype(self.indptr.dtype)
        return sp.csr_matrix((data[keep], self.indices[keep], indptr), shape=(self.n, self.n))


#: Scatters kept (the systems of one study share their constant matrices; a cross-coupling
#: screen makes a system per amount with the same links).
SCATTERS = 8
_SCATTERS = {}
_LOCK = threading.Lock()


def _scatter(system, which):
    """The :class:`_Scatter` of ``system``'s K (``which="k"``) or C, found once per constant
    part and link layout."""
    links = system.every_link
    constant = ((system.shaft_stiffness, system.support_stiffness) if which == "k"
                else (system.support_damping,))
    key = (which, tuple(id(x) for x in constant),
           tuple(link.dofs.tobytes() for link in links))
    found = _SCATTERS.get(key)
    if found is None or any(a is not b for a, b in zip(found[0], constant)):
        total = constant[0] + constant[1] if which == "k" else constant[0]
        total = sp.csr_matrix(total)
        total.sum_duplicates()
        found = (constant, _Scatter(total, links, system.n_dof))
        with _LOCK:   # a worker on threads (an outside cluster's) may share the cache
            while len(_SCATTERS) >= SCATTERS:
                _SCATTERS.pop(next(iter(_SCATTERS)), None)
            _SCATTERS[key] = found
    return found[1]


def with_sources(system: SystemMatrices, sources) -> SystemMatrices:
    """``system`` with ``sources`` in place of its rotor's own destabilising sources: the
    shaft, bearings and supports as assembled (what a sweep of the applied cross-coupling
    changes, without assembling the rest again).  Equal to assembling the rotor with those
    sources (sources sit at stations, which are nodes of every mesh)."""
    sources = tuple(sources)
    nodes = system.mesh.station_nodes
    return dataclasses.replace(
        system, rotor=dataclasses.replace(system.rotor, sources=sources),
        source_links=tuple(_Link(s, DOF_PER_NODE * nodes[s.station] + np.arange(2))
                           for s in sources))
