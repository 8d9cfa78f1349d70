"""The rotor's quadratic as the solvers use it: scaled, reordered, shifted and factored.

``_scaling`` and :func:`scaled_pencil` give the dense scaled state-space pencil of the dense
solve; :class:`_Pencil` keeps the scaled quadratic ``(M^, D^, K^)`` in a bandwidth-reducing
DOF order (reverse Cuthill-McKee) and gives the shift-invert operator of the sparse solve;
:func:`_factor` factors a shifted quadratic by LAPACK's banded LU (SuperLU for wide bands).

A sweep solves matrices of one sparsity pattern at every speed: the reordering, and where
each entry of the reordered and shifted matrices comes from, are found once per pattern
(:func:`_layout`) and each speed only gathers its values into them, the same numbers in the
same places as reordering and adding the sparse matrices anew (tests/unit/test_solvers.py).
"""

from __future__ import annotations

import threading
from dataclasses import dataclass

import numpy as np
import scipy.linalg.lapack as lapack
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy.sparse.csgraph import reverse_cuthill_mckee


def _scaling(m, k):
    """Diagonal DOF scaling and the reference frequency of the scaled pencil."""
    md = np.asarray(m.diagonal(), dtype=float)
    kd = np.asarray(k.diagonal(), dtype=float)
    has_mass = md > 0.0
    if has_mass.any():
        ref = np.sqrt(np.median(kd[has_mass] / md[has_mass])) if np.any(kd[has_mass] > 0) else 1.0
    else:
        ref = 1.0
    ref = ref if np.isfinite(ref) and ref > 0 else 1.0
    d = np.where(has_mass, np.sqrt(np.where(has_mass, md, 1.0)),
                 np.sqrt(np.maximum(kd, 1e-300)) / ref)
    d = np.where(d > 0, d, 1.0)
    return d, ref


def scaled_dense(m, d_mat, k):
    """The DOF-scaled quadratic ``(M^, D^, K^)`` as dense arrays, with the scaling and the
    reference frequency (:func:`_scaling`); ``X^ = S^-1 X S^-1``."""
    scale, ref = _scaling(m, k)
    inv = 1.0 / scale
    # (inv_i x_ij) inv_j, in the order the sparse products D^-1 X D^-1 round in
    mh, dh, kh = ((x.toarray() if sp.issparse(x) else np.asarray(x)) * inv[:, None]
                  * inv[None, :] for x in (m, d_mat, k))
    return mh, dh, kh, scale, ref


def norm1(a):
    """1-norm (largest column sum of magnitudes) of a sparse or dense matrix."""
    if not sp.issparse(a):
        return float(np.abs(a).sum(axis=0).max()) if a.size else 0.0
    a = a.tocsr()
    return float(np.bincount(a.indices, np.abs(a.data), a.shape[1]).max()) if a.nnz else 0.0


def times(a, x):
    """``a @ x`` for a real matrix ``a`` (sparse or dense) and a complex block ``x``
    (n, k), without a complex copy of ``a``: the real and imaginary parts of ``x``, side by
    side in memory, are one real block (n, 2k), so the product is one real product: a sparse
    ``a``'s numbers are the complex product's, a dense one's to roundoff (BLAS sums in its
    own order); half the time on the generated rotors."""
    if not (isinstance(x, np.ndarray) and x.dtype == np.complex128 and x.ndim == 2) \
            or np.iscomplexobj(a):
        return a @ x
    return np.ascontiguousarray(a @ np.ascontiguousarray(x).view(np.float64)).view(
        np.complex128)


def backward_errors(m, d_mat, k, values, vectors):
    """Relative backward error of each eigenpair (a column of ``vectors``) of the quadratic,
    ``|Q(lam) x|_2 / ((|lam|^2 |M|_1 + |lam| |D|_1 + |K|_1) |x|_2)``."""
    norms = [norm1(a) for a in (m, d_mat, k)]
    res = times(m, vectors) * values ** 2 + times(d_mat, vectors) * values + times(k, vectors)
    size = np.abs(values) ** 2 * norms[0] + np.abs(values) * norms[1] + norms[2]
    return np.linalg.norm(res, axis=0) / (size * np.linalg.norm(vectors, axis=0))


def scaled_pencil(m, d_mat, k):
    """Dense scaled state-space pencil ``(A, B)`` and the scaling used.

    ``m, d_mat, k`` are sparse, or small dense arrays (a reduced model's).

    Returns
    -------
    a, b : ndarray (2n, 2n)
    scale : ndarray (n,)
        ``q = q_hat / scale``.
    ref : float
        Reference frequency ``s`` of the scaled state.
    """
    mh, dh, kh, scale, ref = scaled_dense(m, d_mat, k)
    n = mh.shape[0]
    eye, zero = np.eye(n), np.zeros((n, n))
    a = np.block([[zero, ref * eye], [-kh / ref, -dh]])
    b = np.block([[eye, zero], [zero, mh]])
    return a, b, scale, ref


#: Above this half-bandwidth (after reordering) the LU is SuperLU's, not LAPACK's banded one.
BAND_LIMIT = 64


class _Pencil:
    """The scaled quadratic in a bandwidth-reducing DOF order, and its shift-invert operator."""

    def __init__(self, m, d_mat, k):
        self.scale, self.ref = _scaling(m, k)
        self.n = m.shape[0]
        inv = 1.0 / self.scale
        mats = (m, d_mat, k)
        layout = _layout(mats)
        self.shifts = None if layout is None else layout.shifts
        if layout is None:      # not canonical CSR, or explicit zeros: the general way
            scaling = sp.diags(inv)
            mats = [sp.csr_matrix(scaling @ x @ scaling) for x in mats]
            self.perm, self.band = _order(mats)
            self.m, self.d, self.k = (x[self.perm][:, self.perm].tocsr() for x in mats)
            for x in (self.m, self.d, self.k):
                x.sort_indices()
            return
        self.perm, self.band = layout.perm, layout.band
        # the values D^-1 X D^-1 round to, gathered into the reordered pattern
        self.m, self.d, self.k = (     # own index arrays: the cached ones stay untouched
            sp.csr_matrix((((inv[rows] * x.data) * inv[x.indices])[where], indices.copy(),
                           indptr.copy()), shape=x.shape)
            for x, (rows, where, indices, indptr) in zip(mats, layout.parts))

    def operator(self, sigma):
        """``T = (A - sigma B)^-1 B`` on the (reordered) state ``[q^, v]``.

        With ``A - sigma B`` eliminated block-wise, one application costs one
        solve with ``Q = K^ + sigma D^ + sigma^2 M^`` (n x n, banded):
        ``x1 = -Q^-1 (s M^ z2 + (D^ + sigma M^) z1)``, ``x2 = (z1 + sigma x1) / s``.
        """
        n, s = self.n, self.ref
        solve = self.factored(sigma)
        if self.shifts is None:
            right = sp.hstack([self.d + sigma * self.m, s * self.m]).tocsr()
        else:
            right = self.shifts.right_matrix(self, sigma)

        def apply(z):
            z = np.ravel(z)
            x1 = -solve(right @ z)
            return np.concatenate([x1, (z[:n] + sigma * x1) / s])

        dtype = complex if isinstance(sigma, complex) else float
        return spla.LinearOperator((2 * n, 2 * n), matvec=apply, dtype=dtype)

    def factored(self, sigma):
        """A solve with ``K^ + sigma D^ + sigma^2 M^`` (:func:`_factor`: LinAlgError on an
        exactly zero pivot of LAPACK's banded LU)."""
        return _factor(self.shifted(sigma), self.band)

    def shifted(self, sigma):
        """``K^ + sigma D^ + sigma^2 M^`` (COO) in the pencil's order."""
        if self.shifts is None:
            return (self.k + sigma * self.d + sigma ** 2 * self.m).tocoo()
        return self.shifts.quadratic(self, sigma)

    def displacements(self, z):
        """Physical displacement vectors (original DOF order) of state vectors ``z``."""
        q = np.empty((self.n, z.shape[1]), dtype=complex)
        q[self.perm] = z[:self.n]
        return q / self.scale[:, None]

    def backward_errors(self, values, z):
        """Relative backward error of each eigenpair of the quadratic."""
        return backward_errors(self.m, self.d, self.k, values, z[:self.n])


class DensePencil:
    """A small dense quadratic (a reduced model's) with :class:`_Pencil`'s interface: the
    same DOF scaling and scaled state, the shift-invert operator from a dense LU of
    ``K^ + sigma D^ + sigma^2 M^`` (no reordering: the matrices are full)."""

    #: the DOFs in their own order (no reordering)
    perm = slice(None)

    def __init__(self, m, d_mat, k):
        self.m, self.d, self.k, self.scale, self.ref = scaled_dense(m, d_mat, k)
        self.n = self.m.shape[0]

    def operator(self, sigma):
        """``T = (A - sigma B)^-1 B`` on the scaled state ``[q^, v]`` (see :class:`_Pencil`)."""
        n, s = self.n, self.ref
        solve = self.factored(sigma)
        right = np.hstack([self.d + sigma * self.m, s * self.m])

        def apply(z):
            z = np.ravel(z)
            x1 = -solve(right @ z)
            return np.concatenate([x1, (z[:n] + sigma * x1) / s])

        dtype = complex if isinstance(sigma, complex) else float
        return spla.LinearOperator((2 * n, 2 * n), matvec=apply, dtype=dtype)

    def factored(self, sigma):
        """A solve with ``K^ + sigma D^ + sigma^2 M^`` (LAPACK's LU; LinAlgError on an
        exactly zero pivot)."""
        cplx = isinstance(sigma, complex)
        lu, piv, info = _GETRF[cplx](self.shifted(sigma))
        if info != 0:
            raise np.linalg.LinAlgError(f"shifted pencil is singular (info {info})")
        getrs = _GETRS[cplx]
        return lambda b: getrs(lu, piv, b)[0]

    def shifted(self, sigma):
        """``K^ + sigma D^ + sigma^2 M^`` (dense)."""
        return self.k + sigma * self.d + (sigma * sigma) * self.m

    def displacements(self, z):
        """Physical displacement vectors of state vectors ``z``."""
        return z[:self.n] / self.scale[:, None]

    def backward_errors(self, values, z):
        """Relative backward error of each eigenpair of the quadratic."""
        return backward_errors(self.m, self.d, self.k, values, z[:self.n])


_GETRF = {False: lapack.dgetrf, True: lapack.zgetrf}
_GETRS = {False: lapack.dgetrs, True: lapack.zgetrs}


def _order(mats):
    """Reverse Cuthill-McKee order of the matrices' joint pattern, and its half-bandwidth."""
    pattern = abs(mats[0]) + abs(mats[1]) + abs(mats[2])
    perm = reverse_cuthill_mckee(sp.csr_matrix(pattern + pattern.T), symmetric_mode=True)
    coo = (abs(pattern[perm][:, perm])).tocoo()
    return perm, (int(np.abs(coo.row - coo.col).max()) if coo.nnz else 0)


@dataclass(frozen=True)
class _Layout:
    perm: np.ndarray
    band: int
    parts: tuple      # per matrix: (row of each entry, gather map, indices, indptr)
    shifts: "_Shifts"


def _numbered(x, first=1.0):
    """``x``'s pattern with its entries numbered from ``first`` (none is zero)."""
    return sp.csr_matrix((np.arange(first, first + x.nnz), x.indices, x.indptr), shape=x.shape)


def _gather(numbered):
    """Where each entry of a matrix built from numbered ones comes from (0-based)."""
    return numbered.data.astype(np.int64) - 1


class _Shifts:
    """The shift-invert operator's two matrices, ``K^ + sigma D^ + sigma^2 M^`` and
    ``[D^ + sigma M^, s M^]``, for reordered matrices of one pattern: their patterns and
    where each entry's terms come from, found once (the sums as sparse additions would form
    them: each term where its matrix has an entry, in the same order).  A sum that cancels
    to exactly zero stays here as an explicit zero where the sparse addition drops it: the
    banded LU's factors are the same; SuperLU (bands wider than :data:`BAND_LIMIT`) may then
    order its pivots differently, to roundoff."""

    def __init__(self, m, d, k):
        n = m.shape[0]
        union = (abs(m) + abs(d) + abs(k)).tocoo()
        keys = union.row.astype(np.int64) * n + union.col
        order = np.argsort(keys, kind="stable")          # sorted for the searches below
        keys, self.rows, self.cols = keys[order], union.row[order], union.col[order]
        self.at = [np.searchsorted(keys, _keys(x)) for x in (k, d, m)]
        pair = (abs(d) + abs(m)).tocsr()
        pair.sort_indices()
        self.pair_at = [np.searchsorted(_keys(pair), _keys(x)) for x in (d, m)]
        stacked = sp.hstack([_numbered(pair), _numbered(m, pair.nnz + 1.0)]).tocsr()
        self.right = (_gather(stacked), stacked.indices, stacked.indptr, stacked.shape)
        self.size, self.pair_size = len(keys), pair.nnz

    def quadratic(self, pencil, sigma):
        """The shifted quadratic at ``sigma`` (COO)."""
        q = np.zeros(self.size, dtype=complex if isinstance(sigma, complex) else float)
        q[self.at[0]] = pencil.k.data
        q[self.at[1]] += sigma * pencil.d.data
        q[self.at[2]] += sigma ** 2 * pencil.m.data
        return sp.coo_matrix((q, (self.rows, self.cols)), shape=pencil.k.shape)

    def right_matrix(self, pencil, sigma):
        """``[D^ + sigma M^, s M^]`` at ``sigma`` (CSR)."""
        pair = np.zeros(self.pair_size, dtype=complex if isinstance(sigma, complex) else float)
        pair[self.pair_at[0]] = pencil.d.data
        pair[self.pair_at[1]] += sigma * pencil.m.data
        where, indices, indptr, shape = self.right
        values = np.concatenate([pair, pencil.ref * pencil.m.data])[where]
        return sp.csr_matrix((values, indices, indptr), shape=shape)


def _keys(x):
    """Row-major key of every entry of a CSR matrix, in its storage order."""
    return np.repeat(np.arange(x.shape[0], dtype=np.int64), np.diff(x.indptr)) * x.shape[1] \
        + x.indices


#: Reorderings kept, the oldest dropped first (a sweep's speeds share one or two patterns;
#: each worker process keeps its own).
LAYOUTS = 8
_LAYOUTS: dict = {}
_LOCK = threading.Lock()


def _layout(mats):
    """The reordering of matrices of this pattern, found once per pattern: their order,
    half-bandwidth, and for each matrix where each entry of its reordered CSR comes from.
    None for matrices that are not canonical CSR without explicit zeros (the pattern then
    is not the one the scaled products have)."""
    if not all(sp.isspmatrix_csr(x) and x.has_canonical_format and not (x.data == 0).any()
               for x in mats):
        return None
    key = tuple((x.shape, x.indptr.tobytes(), x.indices.tobytes()) for x in mats)
    if key in _LAYOUTS:
        return _LAYOUTS[key]
    perm, band = _order(mats)
    parts, reordered = [], []
    for x in mats:
        # entries numbered from 1 (none is zero): the reordering gathers, never adds
        numbered = _numbered(x)[perm][:, perm].tocsr()
        numbered.sort_indices()
        rows = np.repeat(np.arange(x.shape[0]), np.diff(x.indptr))
        parts.append((rows, _gather(numbered), numbered.indices, numbered.indptr))
        reordered.append(numbered)
    found = _Layout(perm, band, tuple(parts), _Shifts(*reordered))
    with _LOCK:       # a worker on threads (an outside cluster's) may share the cache
        while len(_LAYOUTS) >= LAYOUTS:
            _LAYOUTS.pop(next(iter(_LAYOUTS)), None)
        _LAYOUTS[key] = found
    return found


def _factor(q, band):
    """A solve function for ``q`` (COO): LAPACK's banded LU, or SuperLU for wide bands."""
    if band > BAND_LIMIT:
        lu = spla.splu(q.tocsc())
        return lu.solve
    return band_lu(band_positions(q.row, q.col, band), q.data, q.shape[0], band)


def band_positions(row, col, band):
    """Where entries ``(row, col)`` go in LAPACK's band storage (``band`` sub- and
    superdiagonals, room for the LU's fill), the storage flattened in Fortran order; a caller
    that factors one pattern many times computes them once."""
    return (2 * band + np.asarray(row) - col) + np.asarray(col, dtype=np.intp) * (3 * band + 1)


def band_lu(positions, data, n, band):
    """A solve function for the ``n x n`` matrix with entries ``data`` at ``positions``
    (:func:`band_positions`): LAPACK's banded LU.  The band storage is built in Fortran order
    and factored in place, so that it is never copied (half the factoring time at 16 000
    DOFs, the same factors; docs/performance.md)."""
    cplx = np.iscomplexobj(data)
    rows = 3 * band + 1
    ab = np.zeros(rows * n, dtype=complex if cplx else float)
    ab[positions] = data
    trf, trs = (lapack.zgbtrf, lapack.zgbtrs) if cplx else (lapack.dgbtrf, lapack.dgbtrs)
    lu, piv, info = trf(ab.reshape((rows, n), order="F"), band, band, overwrite_ab=True)
    if info != 0:
        raise np.linalg.LinAlgError(f"shifted pencil is singular (info {info})")

    def solve(b):
        return trs(lu, band, band, b, piv)[0]

    return solve


