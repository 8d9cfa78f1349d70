"""Damped modes at one spin speed."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..vocabulary import Whirl, old_keywords
from ..assembly import SystemMatrices, assemble
from ..errors import SolverError
from ..notices import Notice, record
from ..pencils import times
from ..solvers import NUMERICAL_FAILURES, make_solver
from ..units import to_hz, to_rpm
from .circular import nearest_root, quadratic_forms, split_degenerate

#: Whirl labels from the forward share (see :func:`forward_fraction`): forward at
#: or above this share, backward at or below one minus it, mixed between.  With
#: every node on the same ellipse, 0.75 is a minor axis of about a quarter of the
#: major one.
WHIRL_PURITY = 0.75


def read_only(obj):
    """Make every numpy array field of a frozen result read-only (and its own copy
    where it is a view of another's memory): frozen means frozen."""
    for name, value in vars(obj).items():
        if isinstance(value, np.ndarray) and value.flags.writeable:
            if value.base is not None:
                value = value.copy()
                object.__setattr__(obj, name, value)
            value.flags.writeable = False


def whirl_senses(shapes):
    """Forward and backward circle radii of each node's orbit.

    For a node moving as ``x = Re(X e^{iwt})``, ``y = Re(Y e^{iwt})``, the
    orbit is the sum of a forward circle of radius ``|X + iY|/2`` and a
    backward one of radius ``|X - iY|/2``.

    Parameters
    ----------
    shapes : complex ndarray (..., n_nodes, 2)

    Returns
    -------
    forward, backward : ndarray (..., n_nodes)
    """
    x, y = shapes[..., 0], shapes[..., 1]
    return np.abs(x + 1j * y) / 2.0, np.abs(x - 1j * y) / 2.0


def forward_fraction(shapes):
    """Forward share of a mode: its forward-circular content over all of it.

    Each node's orbit splits into a forward and a backward circle (radii
    ``rf``, ``rb``, :func:`whirl_senses`); the share is ``sum rf^2 / sum (rf^2 +
    rb^2)`` over the nodes, a number in [0, 1]: 1 for pure forward circles, 0
    for pure backward ones, 1/2 for straight-line orbits.  It changes smoothly
    as orbits flatten, so a nearly planar mode no longer flips between labels
    with roundoff (a node-by-node vote did).
    """
    rf, rb = whirl_senses(shapes)
    fwd = (rf * rf).sum(axis=-1)
    total = fwd + (rb * rb).sum(axis=-1)
    return np.where(total > 0, fwd / np.where(total > 0, total, 1.0), 0.5)


#: A forward share within this of one half is a straight-line whirl: roundoff alone puts it
#: on one side (a projection's basis changed which of two such modes a screen took as
#: "forward"); the cross-coupling screens take such a mode as a candidate for forward.
STRAIGHT_LINE = 1e-6


def whirl_label(fraction):
    """'forward', 'backward' or 'mixed' from a forward share (:data:`WHIRL_PURITY`)."""
    if fraction >= WHIRL_PURITY:
        return Whirl.FORWARD
    if fraction <= 1.0 - WHIRL_PURITY:
        return Whirl.BACKWARD
    return Whirl.MIXED


def log_decrement(eigenvalues):
    """Log decrement -2 pi Re(lambda) / Im(lambda); positive is stable."""
    return -2.0 * np.pi * eigenvalues.real / eigenvalues.imag + 0.0  # no -0.0


#: A positive real eigenvalue below this share of the lowest modal frequency is
#: roundoff; above it, a motion grows without whirling.
GROWTH_RTOL = 1e-8

#: A real part within this many estimated roundoff errors of zero is zero.
ROUNDOFF_FACTOR = 10.0


def is_conservative(c_mat, k_mat):
    """No damping and a symmetric stiffness: every eigenvalue is imaginary.

    For ``M q'' + spin G q' + K q = 0`` with ``M``, ``K`` symmetric positive
    definite and ``G`` skew, energy is conserved and the eigenvalues lie on the
    imaginary axis: their log decrements are exactly zero.
    """
    if c_mat.nnz and abs(c_mat).max() > 0:
        return False
    if not k_mat.nnz:
        return True
    return abs(k_mat - k_mat.T).max() <= 1e-14 * abs(k_mat).max()


def mode_checks(values, vectors, m, d, k, products=None):
    """Estimated error and Rayleigh value of every computed eigenpair, in one pass.

    With ``X`` the vectors and ``MX, DX, KX`` their products (computed once, in
    the original unscaled matrices, so they hold whatever digits the solve
    lost): the error estimate is first-order perturbation with the right vector
    standing in for the left one, ``|Q(lam) x| |x| / |x^H Q'(lam) x|``, and the
    Rayleigh value the root nearest ``lam`` of ``x^H Q(rho) x = 0``, with
    ``Q(lam) = lam^2 M + lam D + K``.

    ``products``: ``(MX, DX, KX)`` when the solver computed them already.

    Returns
    -------
    errors : ndarray (n,)
        rad/s.
    rayleigh : complex ndarray (n,)
    """
    mx, dx, kx = products if products is not None else \
        (times(m, vectors), times(d, vectors), times(k, vectors))
    lam = np.asarray(values)
    residual = np.linalg.norm(lam**2 * mx + lam * dx + kx, axis=0)
    size = np.linalg.norm(vectors, axis=0)
    a, b, c = quadratic_forms(vectors, (mx, dx, kx))
    slope = np.abs(2.0 * lam * a + b)
    with np.errstate(divide="ignore", invalid="ignore"):
        errors = np.where(slope > 0, residual * size / slope, np.inf)
    return errors, nearest_root(a, b, c, lam)


def snap_roundoff(values, errors, conservative):
    """Eigenvalues with real parts that are roundoff set to exactly zero.

    A real part within :data:`ROUNDOFF_FACTOR` of the eigenvalue's estimated
    error (:func:`mode_checks`) is zero, so an undamped model reads log
    decrement 0 (not +-1e-18 with a verdict that follows its sign).  A
    conservative model (:func:`is_conservative`) gets zero real parts outright.
    """
    values = np.array(values, dtype=complex)
    if conservative:
        return 1j * values.imag
    small = np.abs(values.real) <= ROUNDOFF_FACTOR * errors
    values[small] = 1j * values[small].imag
    return values


#: A mode whose eigenvalue and its vector's Rayleigh value differ by more than this
#: share has lost the digits that matter (four significant ones): the solve fails
#: rather than print it.
DIGITS_LOST = 1e-4
#: ... checked for modes below this damping ratio: near the change to overdamped
#: motion an eigenvalue is ill-conditioned by nature, and its digits do not matter.
DIGITS_DAMPING = 0.45


def _check_digits(values, rayleigh, speed):
    """Raise SolverError when a computed mode disagrees with its own vector.

    The Rayleigh value of a computed vector (:func:`mode_checks`) agrees with
    the computed eigenvalue to second order in the vector's error on a sound
    solve (measured: 1e-12 on the bundled cases), and not at all when the
    pencil lost its digits.
    """
    damping = -values.real / np.maximum(np.abs(values), 1e-300)
    lost = ~(np.abs(rayleigh - values) <= DIGITS_LOST * np.abs(values))   # NaN too
    lost &= damping < DIGITS_DAMPING
    if lost.any():
        i = int(np.argmax(lost))
        raise SolverError(
            f"the eigen-solve at {to_rpm(speed):.6g} rpm lost the digits that matter: the "
            f"mode at {to_hz(values[i].imag):.4g} Hz disagrees with its own shape by "
            f"{abs(rayleigh[i] - values[i]) / abs(values[i]):.1e} of itself. The model's "
            "stiffnesses or masses span too many decades for double precision (a bearing far "
            "stiffer than the shaft, or a near-massless part): bring them closer, e.g. a "
            "stiff bearing as a pin of 1e3 x the shaft's stiffness")


class Readings:
    """What a result with complex ``eigenvalues`` (rad/s) and node ``shapes`` reads off them,
    point by point: damped natural frequency (rad/s), log decrement, forward share."""

    @property
    def frequency(self):
        """Damped natural frequency, rad/s."""
        return self.eigenvalues.imag

    @property
    def log_dec(self):
        return log_decrement(self.eigenvalues)

    @property
    def forward_fraction(self):
        return forward_fraction(self.shapes)


@dataclass(frozen=True)
class Modes(Readings):
    """Damped modes of a rotor at one speed.

    Attributes
    ----------
    speed : float
        Spin speed, rad/s.
    eigenvalues : complex ndarray (n,)
        ``-zeta wn + i wd``, rad/s, lowest damped frequency first.
    shapes : complex ndarray (n, n_nodes, 2)
        x and y translation at every shaft node, largest = 1.
    vectors : complex ndarray (n_dof, n)
        Full displacement eigenvectors (same scaling as ``shapes``).
    node_z : ndarray
        Node positions, m; ``station_nodes`` picks the stations.
    warnings : tuple of str
    """

    speed: float
    eigenvalues: np.ndarray
    shapes: np.ndarray
    vectors: np.ndarray
    node_z: np.ndarray
    station_nodes: np.ndarray
    real_eigenvalues: np.ndarray
    warnings: tuple = ()
    rigid_body_modes: int = 0

    def __post_init__(self):
        read_only(self)

    @property
    def frequency_hz(self):
        return to_hz(self.frequency)

    @property
    def frequency_cpm(self):
        return to_rpm(self.frequency)

    @property
    def damping_ratio(self):
        return -self.eigenvalues.real / np.abs(self.eigenvalues)

    @property
    def whirl(self):
        return [whirl_label(f) for f in self.forward_fraction]

    @property
    def station_shapes(self):
        """(n, n_stations, 2) complex translations at the stations."""
        return self.shapes[:, self.station_nodes, :]

    def plot(self, mode=1, *, ax=None, rotor=None):
        """The shape of mode number ``mode`` (from 1, lowest frequency first;
        :func:`rotorcalc.plotting.plot_mode_shape`), over the rotor's outline when ``rotor`` is
        given."""
        from ..plotting import plot_mode_shape
        return plot_mode_shape(self, mode, ax=ax, rotor=rotor)

    def to_dict(self):
        """Plain-Python summary for JSON (SI units, speeds also in rpm)."""
        return {
            "speed_rad_s": float(self.speed),
            "speed_rpm": float(to_rpm(self.speed)),
            "modes": [
                {
                    "mode": i + 1,
                    "frequency_hz": float(self.frequency_hz[i]),
                    "frequency_cpm": float(self.frequency_cpm[i]),
                    "eigenvalue_re": float(self.eigenvalues[i].real),
                    "eigenvalue_im": float(self.eigenvalues[i].imag),
                    "damping_ratio": float(self.damping_ratio[i]),
                    "log_dec": float(self.log_dec[i]),
                    "whirl": self.whirl[i],
                    "forward_fraction": float(self.forward_fraction[i]),
                    "station_shape": [
                        {"x_re": float(v[0].real), "x_im": float(v[0].imag),
                         "y_re": float(v[1].real), "y_im": float(v[1].imag)}
                        for v in self.station_shapes[i]],
                }
                for i in range(len(self.eigenvalues))
            ],
            "non_oscillatory_eigenvalues": [float(v) for v in self.real_eigenvalues],
            "rigid_body_modes": self.rigid_body_modes,
            "warnings": [record(w) for w in self.warnings],
        }


@old_keywords(n_modes="mode_count")
def modes_at(rotor_or_system, speed, mode_count=None, solver=None, near=None, whirl=None):
    """Damped modes at spin speed ``speed`` (rad/s).

    Parameters
    ----------
    rotor_or_system : Rotor or SystemMatrices
        Pass assembled matrices to avoid re-assembly in a loop.
    speed : float
        rad/s.
    mode_count : int, optional
        Defaults to the rotor's ``settings.mode_count``.
    solver : callable, optional
        From :func:`rotorcalc.solvers.make_solver`; ``"auto"`` (by model size) by default.
    near : complex, optional
        rad/s: the ``mode_count`` modes nearest this eigenvalue instead of the lowest.
    whirl : float, optional
        rad/s: read bearing tables over whirl frequency at this frequency for every mode
        (:mod:`rotorcalc.analysis.own_frequency` iterates it per mode); by default at the
        spin speed (synchronous coefficients).

    Returns
    -------
    Modes
    """
    system = rotor_or_system if isinstance(rotor_or_system, SystemMatrices) \
        else assemble(rotor_or_system)
    n = system.rotor.settings.mode_count if mode_count is None else mode_count
    solve = solver if solver is not None else make_solver()
    speed = float(speed)
    c_mat, k_mat = system.damping(speed, whirl), system.stiffness(speed, whirl)
    d_mat = c_mat + speed * system.gyroscopic
    basis = system.rigid_body_basis(speed)
    zeros = system.zero_eigenvalues(speed, basis, d_mat)
    try:
        if hasattr(solve, "solve_at"):     # a solver bound to the system (reduced basis)
            pairs = solve.solve_at(system, speed, n, near, zeros, whirl, d_mat=d_mat,
                                   k_mat=k_mat)
        elif near is None:
            pairs = solve(system.mass, d_mat, k_mat, n, zeros=zeros)
        else:
            pairs = solve(system.mass, d_mat, k_mat, n, near=near, zeros=zeros)
    except NUMERICAL_FAILURES as exc:
        raise SolverError(f"the eigen-solve at {to_rpm(speed):.6g} rpm failed "
                          f"({type(exc).__name__}: {exc})") from None
    if not (np.all(np.isfinite(pairs.values)) and np.all(np.isfinite(pairs.vectors))):
        raise SolverError(f"the eigen-solve at {to_rpm(speed):.6g} rpm returned values that "
                          "are not finite (the model's numbers span too many decades?)")
    values, q = split_degenerate(pairs.values, pairs.vectors, system.mass, d_mat, k_mat)
    order = np.argsort(values.imag, kind="stable")
    # the solver's (M X, D X, K X), while the vectors are its own
    products = getattr(pairs, "products", None)
    if products is not None and not np.array_equal(q, pairs.vectors):
        products = None
    if not np.array_equal(order, np.arange(len(order))):     # no copies when in order
        values, q = values[order], q[:, order]
        products = None if products is None else tuple(p[:, order] for p in products)
    values, shapes, vectors = settle(system, speed, values, q, c_mat, d_mat, k_mat, products)
    warnings = list(system.table_warnings(speed)) + list(getattr(pairs, "warnings", ()))
    scale = float(np.abs(values).min()) if len(values) else 1.0
    growing = pairs.real_eigenvalues[pairs.real_eigenvalues > GROWTH_RTOL * scale]
    if len(growing):
        warnings.append(Notice(f"a non-oscillating motion grows at {to_rpm(speed):.0f} rpm (real "
                        f"eigenvalue +{growing.max():.4g} 1/s): the rotor is unstable there "
                        "without whirling", "growth", (speed,)))
    rigid = basis.shape[1]
    if rigid:
        warnings.append(Notice(f"{rigid} rigid-body mode(s) at zero frequency: the rotor is not "
                               "fully supported; they are not listed as modes", "rigid-body"))
    return Modes(speed, values, shapes, vectors, system.mesh.node_z,
                 system.mesh.station_nodes, pairs.real_eigenvalues, tuple(warnings), rigid)


def settle(system, speed, values, q, c_mat, d_mat, k_mat, products=None):
    """Checked eigenvalues, node shapes and vectors (both scaled to a peak translation of 1)
    of solved eigenpairs ``values``, ``q`` (columns) at ``speed``: the digits checked, roundoff
    real parts set to zero (:func:`snap_roundoff`); ``products`` as :func:`mode_checks`."""
    errors, rayleigh = mode_checks(values, q, system.mass, d_mat, k_mat, products)
    _check_digits(values, rayleigh, speed)
    values = snap_roundoff(values, errors, is_conservative(c_mat, k_mat))
    tdofs = system.translation_dofs
    shapes = np.stack([q[tdofs[:, 0], :].T, q[tdofs[:, 1], :].T], axis=-1)
    peak = _peak(shapes)
    return values, shapes / peak[:, None, None], q / peak[None, :]


def _peak(shapes):
    flat = shapes.reshape(shapes.shape[0], int(np.prod(shapes.shape[1:])))   # none: (0, k)
    idx = np.argmax(np.abs(flat), axis=1)
    peak = flat[np.arange(flat.shape[0]), idx]
    return np.where(np.abs(peak) > 0, peak, 1.0)
