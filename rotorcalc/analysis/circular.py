"""Forward and backward modes of a degenerate pair.

On isotropic supports without gyroscopic coupling (or where it vanishes, as
in the bounce mode of a symmetric rotor) a forward and a backward mode share
one eigenvalue, and the eigen-solver returns an arbitrary basis of their
plane: the whirl labels would then follow roundoff.  Every DOF comes in
pairs (x, y), (a, b), (xs, ys); a vector splits into a forward circular part
(``y = -i x``) and a backward one (``y = +i x``).

When the system commutes with a quarter turn about the shaft axis
(isotropic: every matrix is unchanged by ``(x, y) -> (-y, x)``), every
eigenvector of a simple eigenvalue is purely forward or purely backward.  A
computed eigenvector with both parts is therefore one of a (nearly)
degenerate pair that roundoff has mixed, whatever the roundoff level of the
model: the pair is recognised by its mixing, not by how close its two
eigenvalues came out (that distance is itself roundoff, larger on stiff
rotors on soft supports).  The pair is replaced by its forward and its
backward part, and each gets its own eigenvalue from the Rayleigh functional
of the quadratic.  The split is kept only when the new vectors solve the
eigenproblem as well as the old ones did.
"""

from __future__ import annotations

import functools

import numpy as np
import scipy.sparse as sp

from ..pencils import times

#: A vector of an isotropic system whose weaker circular part exceeds this share
#: of its size is mixed (exact eigenvectors have none; roundoff in a well-separated
#: eigenvalue leaves about 1e-12 or less).
MIXED = 1e-7
#: Largest relative residual always accepted for a split pair (beyond the residual
#: of the unsplit vectors, which is accepted too).
RESIDUAL_RTOL = 1e-8
#: Matrices equal to their quarter-turn image to this relative size are isotropic.
ISOTROPY_RTOL = 1e-12


def circular_parts(vector):
    """Forward and backward circular parts of a displacement vector (DOF pairs)."""
    x, y = vector[0::2], vector[1::2]
    f, b = (x + 1j * y) / 2.0, (x - 1j * y) / 2.0
    forward, backward = np.empty_like(vector), np.empty_like(vector)
    forward[0::2], forward[1::2] = f, -1j * f
    backward[0::2], backward[1::2] = b, 1j * b
    return forward, backward


@functools.lru_cache(maxsize=16)
def _turn(n):
    """The quarter turn ``J: (x, y) -> (-y, x)`` of every DOF pair and its transpose."""
    # (J x)[2i] = -x[2i+1], (J x)[2i+1] = x[2i]
    perm = np.arange(n).reshape(-1, 2)[:, ::-1].ravel()
    sign = np.tile([-1.0, 1.0], n // 2)
    j = sp.csr_matrix((sign, (np.arange(n), perm)), shape=(n, n))
    return j, j.T.tocsr()


def _quarter_turn(a):
    """``J^T A J`` for the quarter turn ``J: (x, y) -> (-y, x)`` of every DOF pair."""
    j, jt = _turn(a.shape[0])
    return jt @ sp.csr_matrix(a) @ j


def is_isotropic(*matrices):
    """True when every matrix is unchanged by a quarter turn about the shaft axis."""
    for a in matrices:
        if a.shape[0] % 2:
            return False
        size = abs(a).max() if a.nnz else 0.0
        if not size:
            continue
        # the turn swaps the x and y diagonal entries of every pair: a cheap first test
        # (the same answer: a difference there is a difference of the turned matrix)
        diagonal = a.diagonal()
        if np.abs(diagonal[0::2] - diagonal[1::2]).max() > ISOTROPY_RTOL * size:
            return False
        if abs(_quarter_turn(a) - a).max() > ISOTROPY_RTOL * size:
            return False
    return True


def _residual(m, d, k, lam, x):
    r = (lam * lam) * (m @ x) + lam * (d @ x) + k @ x
    scale = (abs(lam) ** 2 * abs(m).max() + abs(lam) * abs(d).max() + abs(k).max())
    return np.linalg.norm(r) / (scale * max(np.linalg.norm(x), 1e-300))


def rayleigh_values(m, d, k, vectors, near, products=None):
    """Rayleigh value of each column ``x``: the root nearest ``near`` of
    ``(x^H M x) lam^2 + (x^H D x) lam + x^H K x = 0``.

    ``products`` may pass ``(M X, D X, K X)`` already computed.
    """
    mx, dx, kx = products if products is not None else (times(m, vectors), times(d, vectors),
                                                        times(k, vectors))
    return nearest_root(*quadratic_forms(vectors, (mx, dx, kx)), near)


def quadratic_forms(vectors, products):
    """``x^H P x`` of each column ``x`` of ``vectors`` for each product ``P X`` given."""
    xh = np.conj(vectors)
    return [np.einsum("ij,ij->j", xh, px) for px in products]


def nearest_root(a, b, c, near):
    """The root nearest ``near`` of ``a lam^2 + b lam + c = 0`` (elementwise)."""
    near = np.broadcast_to(np.asarray(near, dtype=complex), a.shape)
    with np.errstate(divide="ignore", invalid="ignore"):
        root = np.sqrt(b * b - 4.0 * a * c + 0j)
        pair = np.stack([(-b + root) / (2.0 * a), (-b - root) / (2.0 * a)])
    return pair[np.argmin(np.abs(pair - near), axis=0), np.arange(len(near))]


def mixing(vector):
    """Share of the weaker circular part in a vector: 0 pure, 0.5 planar."""
    fwd, bwd = circular_parts(vector)
    nf, nb = np.linalg.norm(fwd), np.linalg.norm(bwd)
    return min(nf, nb) / max(nf + nb, 1e-300)


def split_degenerate(values, vectors, m, d, k):
    """Replace each degenerate pair of an isotropic system by its forward and backward modes.

    Parameters
    ----------
    values : complex ndarray (n,)
    vectors : complex ndarray (n_dof, n)
        Displacement eigenvectors (columns).
    m, d, k : sparse matrices
        The quadratic eigenproblem ``(lam^2 M + lam D + K) x = 0``.

    Returns
    -------
    values : complex ndarray (n,)
    vectors : complex ndarray (n_dof, n)
        Unchanged unless the system is isotropic and a pair was mixed.
    """
    values, out = np.array(values, dtype=complex), vectors.copy()
    if vectors.shape[0] % 2 or len(values) < 2 or not is_isotropic(k, d, m):
        return values, out
    mixed = [i for i in range(len(values)) if mixing(out[:, i]) > MIXED]
    while len(mixed) >= 2:
        i = mixed.pop(0)
        j = min(mixed, key=lambda c: abs(values[c] - values[i]))
        mixed.remove(j)
        parts = [circular_parts(out[:, c]) for c in (i, j)]
        fwd = max((p[0] for p in parts), key=np.linalg.norm)
        bwd = max((p[1] for p in parts), key=np.linalg.norm)
        if min(np.linalg.norm(fwd), np.linalg.norm(bwd)) == 0:
            continue
        mean = (values[i] + values[j]) / 2.0
        lam_f, lam_b = rayleigh_values(m, d, k, np.stack([fwd, bwd], axis=1), mean)
        before = max(_residual(m, d, k, values[i], out[:, i]),
                     _residual(m, d, k, values[j], out[:, j]))
        after = max(_residual(m, d, k, lam_f, fwd), _residual(m, d, k, lam_b, bwd))
        if after <= max(RESIDUAL_RTOL, 10.0 * before):
            # keep the slot order by frequency: the lower slot takes the lower one
            lo, hi = sorted((i, j))
            pair = sorted([(lam_f, fwd), (lam_b, bwd)], key=lambda p: p[0].imag)
            (values[lo], out[:, lo]), (values[hi], out[:, hi]) = pair
    return values, out
