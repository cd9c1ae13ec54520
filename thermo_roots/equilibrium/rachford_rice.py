"""The Rachford–Rice equation: the vapor fraction of a feed split by given K-values.

For a feed z and equilibrium ratios Kᵢ = yᵢ/xᵢ the molar vapor fraction β is the root of

    g(β) = Σᵢ zᵢ (Kᵢ − 1) / (1 + β (Kᵢ − 1)) = 0,

and then xᵢ = zᵢ / (1 + β (Kᵢ − 1)), yᵢ = Kᵢ xᵢ.

Between its poles β₋ = 1/(1 − K_max) < 0 and β₊ = 1/(1 − K_min) > 1 (the window of the
negative flash) every denominator is positive and g'(β) = −Σ zᵢ (Kᵢ − 1)² / (1 + β (Kᵢ − 1))² < 0,
so g falls monotonically from +∞ to −∞ and has exactly one root there. The bracket is
taken from the physics of that root: xᵢ ≤ 1 and yᵢ ≤ 1 give

    max over Kᵢ > 1 of (Kᵢ zᵢ − 1)/(Kᵢ − 1)  ≤  β  ≤  min over Kᵢ < 1 of (1 − zᵢ)/(1 − Kᵢ),

two ends strictly inside the window where g is finite. The sign of g at the middle of the
window tells which half holds the root; the root is then found by bracketed root finding
(Chandrupatla's method, :func:`thermo_roots.find_root`) between the bound on that side and
a point past the middle. The unknown actually solved for is the distance to the nearer
pole, u = 1 + β (Kₚ − 1) of the component p whose pole it is (in ln u), so that x and y
keep their digits when the root lies next to a pole (a nearly pure feed, a trace
component, a negative flash far out); see ``_solve``.

References
----------
.. [1] Rachford, H. H., Rice, J. D., "Procedure for use of electronic digital computers
   in calculating flash vaporization hydrocarbon equilibrium", J. Pet. Technol. 4(10),
   sec. 1, 19 and sec. 2, 3 (1952).
.. [2] Whitson, C. H., Michelsen, M. L., "The negative flash", Fluid Phase Equilib. 53,
   51–71 (1989): the window between the poles and β outside [0, 1].
.. [3] Leibovici, C. F., Neoschil, J., "A new look at the Rachford-Rice equation",
   Fluid Phase Equilib. 74, 303–308 (1992): the tighter bracket from xᵢ, yᵢ ≤ 1.
.. [4] Nielsen, M., Lia, H., "Avoiding round-off error in the Rachford-Rice equation",
   Fluid Phase Equilib. (2023) (the pole-distance unknown; from memory).
.. [5] Michelsen, M. L., Mollerup, J. M., *Thermodynamic Models: Fundamentals and
   Computational Aspects*, 2nd ed., Tie-Line Publications, 2007, ch. 10.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from thermo_roots.errors import InputError, WrongTypeError
from thermo_roots.roots import find_root

#: Status texts of :func:`rachford_rice`, per state (the equation's verdict for these K,
#: not a phase: that needs a stability test with the model).
TWO_PHASE = "two-phase"            # 0 < β < 1
BELOW_ZERO = "beta <= 0"           # the root lies at or below 0: the feed is on the liquid side for these K
ABOVE_ONE = "beta >= 1"            # the root lies at or above 1: the feed is on the vapor side for these K
ALL_K_ABOVE = "all K >= 1"         # no root at all: g(β) > 0 everywhere (vapor for these K)
ALL_K_BELOW = "all K <= 1"         # no root at all: g(β) < 0 everywhere (liquid for these K)
ALL_K_ONE = "all K = 1"            # g ≡ 0: the trivial solution, β undetermined
NOT_SOLVED = "not solved"          # NaN or infinite input, or the root finder failed
STATUSES = (TWO_PHASE, BELOW_ZERO, ABOVE_ONE, ALL_K_ABOVE, ALL_K_BELOW, ALL_K_ONE, NOT_SOLVED)

_EPS = float(np.finfo(float).eps)


def rachford_rice_function(beta, z, K):
    """g(β) = Σ zᵢ (Kᵢ − 1)/(1 + β (Kᵢ − 1)) [-], the components along the last axis."""
    d = np.asarray(K, dtype=float) - 1.0
    return np.sum(np.asarray(z, dtype=float) * d / (1.0 + np.asarray(beta, dtype=float)[..., None] * d), axis=-1)


@dataclass(frozen=True)
class RachfordRice:
    """The split of a feed by given K-values.

    Attributes
    ----------
    beta : float or ndarray
        Molar vapor fraction [-], one per state. In [0, 1] unless ``negative_flash=True``
        was asked (then the root itself, which may lie outside); NaN for "all K = 1",
        "not solved", and, with ``negative_flash=True``, where the equation has no root.
    x, y : ndarray
        Liquid and vapor mole fractions [-], shape (..., n_components). Where the state
        is single phase (status other than "two-phase" without ``negative_flash``) both
        equal z. The material balance z = (1 − β) x + β y holds to rounding.
    status : str or ndarray of str
        One of :data:`STATUSES` per state.
    iterations : int or ndarray of int
        Root-finder iterations per state (0 where it did not run).
    negative_flash : bool
        Whether β outside [0, 1] was asked for.
    """

    beta: Any
    x: Any
    y: Any
    status: Any
    iterations: Any
    negative_flash: bool

    @property
    def two_phase(self):
        """True where 0 < β < 1."""
        return np.asarray(self.status) == TWO_PHASE

    def __repr__(self) -> str:
        status = np.asarray(self.status)
        if status.ndim == 0:
            return f"RachfordRice(beta={float(self.beta):.10g}, status={str(status)!r})"
        counts = ", ".join(f"{int(np.sum(status == s))} {s}" for s in STATUSES if np.any(status == s))
        return f"RachfordRice({status.size} states: {counts})"

    def _repr_html_(self) -> str:
        status = np.asarray(self.status)
        if status.ndim == 0:
            rows = [("vapor fraction β", f"{float(self.beta):.10g}"), ("status", str(status))]
        else:
            rows = [(s, str(int(np.sum(status == s)))) for s in STATUSES if np.any(status == s)]
        body = "".join(f"<tr><th style='text-align:left'>{k}</th><td>{v}</td></tr>" for k, v in rows)
        return f"<table><caption>Rachford–Rice split</caption>{body}</table>"


def _as_components(value, label: str) -> np.ndarray:
    if isinstance(value, (str, bytes)) or value is None:
        raise WrongTypeError(f"rachford_rice: {label} must be an array of numbers, not {value!r}.")
    try:
        out = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise WrongTypeError(f"rachford_rice: {label} must be an array of numbers, not {value!r}.") from None
    if out.ndim == 0:
        raise InputError(f"rachford_rice: {label} needs the components along its last axis (shape (n_components,) "
                         f"or (n_states, n_components)); got the single number {value!r}.")
    return out


def rachford_rice(z, K, negative_flash: bool = False, rtol: float = 4 * _EPS, maxiter: int = 100) -> RachfordRice:
    """Vapor fraction and phase compositions of a feed z split by K-values, for many states at once.

    Parameters
    ----------
    z : array_like, shape (..., n_components)
        Feed mole fractions [-]; each state's should sum to 1 (not enforced, so that a
        flash may pass trial compositions). Components with zᵢ = 0 take no part.
    K : array_like, shape (..., n_components)
        Equilibrium ratios yᵢ/xᵢ [-], positive; broadcasts with z.
    negative_flash : bool
        Return the root β even where it lies outside [0, 1] (Whitson & Michelsen's
        negative flash, with x and y from it); by default such states get β = 0 or 1 and
        x = y = z.
    rtol : float
        Relative tolerance [-] on the unknown actually solved for, the denominator
        u = 1 + β (Kₚ − 1) of the component whose pole is nearer (see :func:`_solve`;
        it is the absolute tolerance on ln u); the default, 4 machine epsilons, followed
        by one Newton step on u, gives x and y to rounding even next to a pole.
    maxiter : int
        Most root-finder iterations per state.

    Returns
    -------
    RachfordRice
        ``beta`` (scalar for one state), ``x``, ``y``, ``status`` and ``iterations``.

    Raises
    ------
    InputError
        Shapes that do not broadcast, or a negative K (NaN or infinite
        entries give the state "not solved" instead).

    References
    ----------
    See the module: Rachford & Rice (1952), Whitson & Michelsen (1989), Leibovici &
    Neoschil (1992), Nielsen & Lia (2023), Michelsen & Mollerup (2007) ch. 10.

    Examples
    --------
    >>> r = rachford_rice([0.5, 0.5], [2.0, 0.5])
    >>> round(float(r.beta), 12), str(r.status)
    (0.5, 'two-phase')
    """
    if not isinstance(negative_flash, (bool, np.bool_)):
        raise WrongTypeError(f"rachford_rice: negative_flash must be True or False, not {negative_flash!r}.")
    z_in, K_in = _as_components(z, "z"), _as_components(K, "K")
    try:
        z_b, K_b = np.broadcast_arrays(z_in, K_in)
    except ValueError:
        raise InputError(f"rachford_rice: z of shape {z_in.shape} and K of shape {K_in.shape} do not broadcast; "
                         "give both as (n_components,) or (n_states, n_components).") from None
    if np.any(K_b < 0):
        raise InputError("rachford_rice: every K must be >= 0 (K = y/x; 0 for a component that does not "
                         f"vaporise); got {float(K_b[K_b < 0].ravel()[0])!r}. Check the K-values (e.g. Wilson's "
                         "estimate).")
    shape = z_b.shape[:-1]
    n_c = z_b.shape[-1]
    zf, Kf = z_b.reshape(-1, n_c), K_b.reshape(-1, n_c)
    n = zf.shape[0]

    finite = np.isfinite(zf).all(axis=1) & np.isfinite(Kf).all(axis=1) & (zf >= 0).all(axis=1) \
        & (zf > 0).any(axis=1)
    present = zf > 0
    above = (present & (Kf > 1)).any(axis=1)
    below = (present & (Kf < 1)).any(axis=1)
    status = np.full(n, NOT_SOLVED, dtype="<U15")
    status[finite & above & ~below] = ALL_K_ABOVE
    status[finite & below & ~above] = ALL_K_BELOW
    status[finite & ~above & ~below] = ALL_K_ONE
    has_root = finite & above & below

    beta = np.full(n, np.nan)
    iterations = np.zeros(n, dtype=int)
    t = np.full_like(zf, np.nan)                  # the denominators 1 + β (Kᵢ − 1), solved for accurately
    if has_root.any():
        solved = _solve(zf[has_root], Kf[has_root], rtol, maxiter)
        beta[has_root], t[has_root], iterations[has_root], ok, side = solved
        status[has_root] = np.where(ok, side, NOT_SOLVED)

    x = np.full_like(zf, np.nan)
    y = np.full_like(zf, np.nan)
    split = status == TWO_PHASE
    if negative_flash:
        split |= (status == BELOW_ZERO) | (status == ABOVE_ONE)
    else:
        beta[(status == BELOW_ZERO) | (status == ALL_K_BELOW)] = 0.0
        beta[(status == ABOVE_ONE) | (status == ALL_K_ABOVE)] = 1.0
    x[split] = zf[split] / t[split]
    y[split] = Kf[split] * x[split]
    one_phase = ~split & (status != NOT_SOLVED)
    x[one_phase] = zf[one_phase]
    y[one_phase] = zf[one_phase]

    if shape == ():
        return RachfordRice(float(beta[0]), x[0], y[0], str(status[0]), int(iterations[0]), bool(negative_flash))
    return RachfordRice(beta.reshape(shape), x.reshape(*shape, n_c), y.reshape(*shape, n_c), status.reshape(shape),
                        iterations.reshape(shape), bool(negative_flash))


def _solve(z, K, rtol, maxiter):
    """β for states that have a root (a component present with K > 1 and one with K < 1).

    Near a pole, β itself cannot carry the digits of 1 + β (Kᵢ − 1) (a feed that is nearly
    one component, or a negative flash far out). So the unknown is the distance to the
    nearer pole: u = tₚ = 1 + β dₚ (dᵢ = Kᵢ − 1) of the component p whose pole it is
    (largest K at the low end, smallest at the high end), and every other denominator is
    tᵢ = ((dₚ − dᵢ) + u dᵢ)/dₚ, without cancellation. Which pole is nearer follows from the
    sign of g at the middle of the window (g falls, so g > 0 there puts the root in the
    upper half); u runs from the pole (u = 0) to past the middle, and the physical bound
    (yₚ ≤ 1 at the low end: u ≥ Kₚ zₚ; xₚ ≤ 1 at the high end: u ≥ zₚ) closes the bracket.
    References: Leibovici & Neoschil (1992); Nielsen & Lia (2023) (module references).
    """
    n, n_c = z.shape
    d = K - 1.0
    present = z > 0
    j = np.where(present, d, -np.inf).argmax(axis=1)   # largest K present: the low pole −1/dⱼ
    k = np.where(present, d, np.inf).argmin(axis=1)    # smallest K present: the high pole −1/dₖ
    rows = np.arange(n)
    dj, dk = d[rows, j], d[rows, k]
    mid = -0.5 * (1.0 / dj + 1.0 / dk)
    upper = np.sum(z * d / (1.0 + mid[:, None] * d), axis=1) > 0
    p = np.where(upper, k, j)
    dp = d[rows, p]
    # tₚ at three quarters of the window from p's pole (≥ 3/4): past the middle, so a root on
    # the middle itself stays inside the bracket whatever rounding does to g there
    u_hi = 0.75 * (1.0 - dp / np.where(upper, dj, dk))
    u_lo = np.minimum(np.where(upper, z[rows, p], K[rows, p] * z[rows, p]), 0.5 * u_hi)
    offset = (dp[:, None] - d) / dp[:, None]
    scale = d / dp[:, None]
    weight = z * d

    def g(u, i):
        with np.errstate(divide="ignore", invalid="ignore"):   # u = 0 is the pole itself
            return np.sum(weight[i] / (offset[i] + u[..., None] * scale[i]), axis=-1)

    def slope(u, i):
        return -np.sum(weight[i] * scale[i] / (offset[i] + u[..., None] * scale[i]) ** 2, axis=-1)

    # g → ±∞ at u → 0; rounding can put u_lo a hair past the root when the root sits on the bound
    sign_at_pole = np.where(upper, -1.0, 1.0)
    u_lo = _keep_sign(g, rows, u_lo, np.zeros(n), sign_at_pole)
    # Solved in ln u: the root can be hundreds of decades closer to the pole than u_hi (a trace
    # component), where halving u would take a thousand steps and halving ln u takes ten.
    result = find_root(lambda s, i: g(np.exp(s), i), bracket=(np.log(u_lo), np.log(u_hi)), args=(rows,),
                       xtol=rtol, rtol=_EPS, maxiter=maxiter, trace=False)
    ok = np.asarray(result.converged)
    u = _polish(g, slope, rows, np.where(ok, np.exp(result.root), np.nan), u_lo, u_hi)
    t = offset + u[:, None] * scale
    t[rows, p] = u
    beta = (u - 1.0) / dp
    # which side of [0, 1] the root lies on, from the sign of g at 0 and 1 (g falls in β)
    with np.errstate(divide="ignore"):   # K = 0 (a component that does not vaporise): g(1) = -inf
        g0, g1 = np.sum(z * d, axis=1), np.sum(z * d / K, axis=1)
    side = np.where(g0 <= 0, BELOW_ZERO, np.where(g1 >= 0, ABOVE_ONE, TWO_PHASE))
    return beta, t, result.iterations, ok, side


def _polish(g, slope, rows, u, lo, hi):
    """One Newton step on u after the solve in ln u, kept only where it stays in the bracket
    and lowers |g|: ln u carries |ln u| eps of relative error in u, Newton's step on u
    itself brings it back to rounding."""
    with np.errstate(divide="ignore", invalid="ignore"):
        f = g(u, rows)
        step = u - f / slope(u, rows)
        better = np.isfinite(step) & (step > lo) & (step < hi)
        better[better] = np.abs(g(step[better], rows[better])) < np.abs(f[better])
    return np.where(better, step, u)


def _keep_sign(g, rows, end, pole, sign):
    """Move a bracket end towards its pole until g has there the sign it has at the pole.

    The physical bounds enclose the root exactly; rounding can put one a hair past it
    when the root sits on it. Halving the distance to the pole, where g goes to ±∞,
    restores the sign; g stays monotone on the way.
    """
    end = end.copy()
    for _ in range(1100):   # enough halvings to reach the smallest subnormal from 1
        wrong = ~(sign * g(end, rows) > 0)
        if not wrong.any():
            break
        end[wrong] = 0.5 * (end[wrong] + pole[wrong])
    return end
