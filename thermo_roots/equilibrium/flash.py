"""The isothermal (T, P) flash of a mixture: how much vapour, of what composition, and the liquid's.

For every state, vectorized:

1. the tangent-plane test (:func:`~thermo_roots.equilibrium.stability.tangent_plane`): a
   stable feed is one phase, proven, and is not flashed;
2. an unstable feed starts from the K-values of its most negative trial phase and iterates
   by successive substitution on ln K: the Rachford–Rice split of the feed by K (the
   bracketed solver of :mod:`.rachford_rice`), each phase's ln φ at its composition
   (:func:`~thermo_roots.equilibrium.fugacity.phase_fugacity`), ln Kᵢ ← ln φᵢᴸ − ln φᵢⱽ;
   every fifth step extrapolated along the dominant eigenvalue (Crowe & Nishio 1975);
3. states still unconverged after :data:`SUBSTITUTION_STEPS` (slow near a critical point)
   go on by Newton's method on the Gibbs energy in the vapour amounts (its Hessian by
   forward differences of the same ln φ, made positive definite) with a halving line
   search.

The Gibbs energy of the split, G/(RT) = Σ over phases of βₚ Σᵢ cᵢ (ln cᵢ + ln φᵢ), must fall
at every accepted step: a step that raises it is halved towards the last accepted K
(:data:`HALVINGS` times at most), in both stages.

Single phase (the rule of ``beta``): a stable feed has x = y = z, and β = 1 where its phase
word (:mod:`.phase_words`) is "vapor" or "supercritical", β = 0 where it is "liquid"; its
Z and v are in ``Z_vapor``/``v_vapor`` or ``Z_liquid``/``v_liquid`` accordingly (the other
NaN). β is never NaN for a solved state.

References
----------
Michelsen, M. L. (1982), The isothermal flash problem. Part II. Phase-split calculation,
Fluid Phase Equilib. 9, 21-40.
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., Tie-Line Publications, ch. 10 (successive substitution,
acceleration, second-order methods, the Gibbs energy as the objective).
Crowe, C. M. & Nishio, M. (1975), AIChE J. 21, 528-533 (dominant eigenvalue method).
Rachford, H. H. & Rice, J. D. (1952), J. Pet. Technol. 4(10), 19 (the split).
"""

from __future__ import annotations

import html
from dataclasses import dataclass
from typing import Any

import numpy as np

from thermo_roots.equilibrium.fugacity import phase_fugacity
from thermo_roots.equilibrium.phase_words import LIQUID, feed_phase_words
from thermo_roots.equilibrium.rachford_rice import rachford_rice
from thermo_roots.models import R
from thermo_roots.equilibrium.stability import (ACCELERATE_EVERY, NOT_CONVERGED, NOT_SOLVED, STABLE, UNSTABLE,
                                                _dominant_eigenvalue_step, _k_from_trial, _test, read_states)

#: Convergence: every |ln Kᵢ − (ln φᵢᴸ − ln φᵢⱽ)| below this [-] (the fugacities equal to 1e-10).
FLASH_TOLERANCE = 1e-10
#: Successive-substitution steps before the Newton stage takes over.
SUBSTITUTION_STEPS = 60
#: States flashed at once (memory: about 5 kB per state while iterating).
CHUNK = 2 ** 14
#: Most Newton steps.
NEWTON_STEPS = 30
#: Most halvings of a step that raised the Gibbs energy.
HALVINGS = 12
#: A split whose every |ln Kᵢ| is below this has collapsed onto the feed (the trivial solution).
TRIVIAL_BELOW = 1e-4
#: Relative slack [-] in "the Gibbs energy fell": the rounding of G, a sum of terms of order one
#: whose ln phi carry cancellations (near convergence G changes like |ln K error|², below it).
GIBBS_SLACK = 1e-11

CONVERGED = "converged"
#: Status texts of :func:`flash_tp`.
STATUSES = (CONVERGED, NOT_CONVERGED, NOT_SOLVED)


@dataclass(frozen=True)
class FlashResult:
    """The (T, P) flash of feeds. Shapes (...) per state and (..., n_components) per composition.

    Attributes
    ----------
    T, P : temperature [K] and pressure [Pa]
    z : feed mole fractions [-]
    beta : molar vapour fraction [-]: the split in two phases; in one phase 1.0 where the
        phase word is "vapor" or "supercritical" and 0.0 where it is "liquid" (the module's
        rule); NaN only where not solved
    x, y : liquid and vapour mole fractions [-] (both z in one phase); of two phases the
        "vapour" y is the one of larger molar volume (also in a liquid-liquid split)
    n_phases : 1 or 2 (0 where not solved)
    phase : "liquid", "vapor", "supercritical" or "two-phase" (:mod:`.phase_words`);
        "not solved" where the state has a reason
    Z_liquid, Z_vapor : each phase's compressibility factor P v/(R T) [-] (NaN for a phase
        that is not there)
    v_liquid, v_vapor : each phase's molar volume [m³/mol]
    v, Z : the whole's molar volume (1 − β) vᴸ + β vⱽ [m³/mol] and its P v/(R T) [-]
    tpd_min : the stability test's lowest tangent-plane distance [-]
    iterations : stability steps plus flash steps, per state
    newton : True where the Newton stage was needed
    near_critical : True where the state is one phase at the edge of what the test resolves:
        its trials crept towards the feed with tm > 0 without settling, or a trial just below
        zero led to no split of lower Gibbs energy (next to a critical point)
    status : "converged", "not converged" or "not solved"
    reason : why a state is not converged or not solved ("" otherwise)
    """

    T: Any
    P: Any
    z: Any
    beta: Any
    x: Any
    y: Any
    n_phases: Any
    phase: Any
    Z_liquid: Any
    Z_vapor: Any
    v_liquid: Any
    v_vapor: Any
    v: Any
    Z: Any
    tpd_min: Any
    iterations: Any
    newton: Any
    near_critical: Any
    status: Any
    reason: Any

    @property
    def converged(self):
        """True where the state converged."""
        return np.asarray(self.status) == CONVERGED

    def __repr__(self) -> str:
        status = np.asarray(self.status)
        if status.ndim == 0:
            if self.reason:
                return f"FlashResult({self.status}: {self.reason})"
            return (f"FlashResult(T={self.T:.6g} K, P={self.P:.6g} Pa, phase={self.phase!r}, "
                    f"beta={self.beta:.6g}, n_phases={self.n_phases})")
        phases = np.asarray(self.n_phases)
        return (f"FlashResult({status.size} states: {int(np.sum(phases == 2))} two-phase, "
                f"{int(np.sum(phases == 1))} one phase, {int(np.sum(status == NOT_CONVERGED))} not converged, "
                f"{int(np.sum(status == NOT_SOLVED))} not solved)")

    def _repr_html_(self) -> str:
        return f"<pre>{html.escape(repr(self))}</pre>"


# --------------------------------------------------------------------------- one step

def _split(model, T, P, z, ln_K):
    """The split of z by K and each phase's fugacities: (beta, x, y, liquid, vapour, G/(RT), residual)."""
    rr = rachford_rice(z, np.exp(ln_K), negative_flash=True)
    beta, x, y = np.atleast_1d(rr.beta), np.atleast_1d(rr.x), np.atleast_1d(rr.y)
    liquid = phase_fugacity(model, T, P, x)
    vapour = phase_fugacity(model, T, P, y)
    with np.errstate(divide="ignore", invalid="ignore"):
        gl = np.where(x > 0, x * (np.log(x) + liquid.ln_phi), 0.0).sum(axis=1)
        gv = np.where(y > 0, y * (np.log(y) + vapour.ln_phi), 0.0).sum(axis=1)
        residual = np.where(z > 0, liquid.ln_phi - vapour.ln_phi, ln_K)
    G = (1.0 - beta) * gl + beta * gv
    return beta, x, y, liquid, vapour, G, residual


def _accepted(G_new, G_old, beta_new, beta_old, plain=True):
    """Whether a step is kept: the Gibbs energy fell (within rounding) with 0 < β < 1 after it.

    G is the Gibbs energy of a split only for 0 < β < 1; outside (the negative flash, where
    the iteration may start or wander) it can fall without bound towards the trivial
    solution. So a step from inside that leaves is refused; a plain substitution step that
    starts outside is kept (it heads back inside where the feed does split); an
    extrapolated one (``plain=False``) must land inside.
    """
    inside_new, inside_old = (beta_new > 0.0) & (beta_new < 1.0), (beta_old > 0.0) & (beta_old < 1.0)
    fell = np.isfinite(G_new) & ~(G_new > G_old + GIBBS_SLACK * np.maximum(np.abs(G_old), 1.0))
    fell |= ~np.isfinite(G_old) & np.isfinite(G_new)
    return np.where(inside_old, inside_new & fell, np.isfinite(G_new) & (inside_new | plain))


# --------------------------------------------------------------------------- the stages

def _substitution(model, T, P, z, ln_K, tol, steps):
    """Successive substitution on ln K with acceleration and the Gibbs-energy check.

    Returns ln K, converged (bool), iterations; flat arrays over the given states.
    """
    n, _ = z.shape
    iterations = np.zeros(n, dtype=int)
    converged = np.zeros(n, dtype=bool)
    G_best = np.full(n, np.inf)
    beta_best = np.full(n, np.nan)
    plain = np.ones(n, dtype=bool)   # the pending trial is a plain substitution step (not extrapolated)
    K_best = ln_K.copy()
    last_step = np.full_like(ln_K, np.nan)
    halvings = np.zeros(n, dtype=int)
    trial = ln_K.copy()
    active = np.arange(n)
    for k in range(1, steps + 1):
        if active.size == 0:
            break
        beta, x, y, liquid, vapour, G, target = _split(model, T[active], P[active], z[active], trial[active])
        iterations[active] = k
        ok = _accepted(G, G_best[active], beta, beta_best[active], plain[active])
        # rejected: halve the step towards the last accepted K
        rejected = active[~ok]
        halvings[rejected] += 1
        trial[rejected] = 0.5 * (trial[rejected] + K_best[rejected])
        gave_up = rejected[halvings[rejected] > HALVINGS]
        kept = active[ok]
        step = target[ok] - trial[kept]
        G_best[kept], beta_best[kept], K_best[kept], halvings[kept] = G[ok], beta[ok], trial[kept], 0
        done = np.max(np.abs(step), axis=1) < tol
        converged[kept[done]] = True
        new = target[ok]
        plain[kept] = True
        if k % ACCELERATE_EVERY == 0:
            new = _dominant_eigenvalue_step(new, step, last_step[kept])
            plain[kept] = False
        last_step[kept] = step
        trial[kept] = new
        finished = np.zeros(n, dtype=bool)
        finished[kept[done]] = True
        finished[gave_up] = True
        active = active[~finished[active]]
    return K_best, converged, iterations


def _amounts_gibbs(model, T, P, z, v):
    """G/(RT) and its gradient in the vapour amounts v (per mole of feed), states (m, nc).

    l = z − v, x = l/L, y = v/V; G = Σ lᵢ (ln xᵢ + ln φᵢᴸ) + Σ vᵢ (ln yᵢ + ln φᵢⱽ) and
    ∂G/∂vᵢ = ln(yᵢ φᵢⱽ) − ln(xᵢ φᵢᴸ) (Michelsen & Mollerup 2007, ch. 10). An absent
    component (zᵢ = 0) has gradient 0.
    """
    present = z > 0
    l = z - v
    with np.errstate(divide="ignore", invalid="ignore"):
        x = l / l.sum(axis=1, keepdims=True)
        y = v / v.sum(axis=1, keepdims=True)
        liquid, vapour = phase_fugacity(model, T, P, x), phase_fugacity(model, T, P, y)
        ln_fl, ln_fv = np.log(x) + liquid.ln_phi, np.log(y) + vapour.ln_phi
        G = np.where(present, l * ln_fl + v * ln_fv, 0.0).sum(axis=1)
        gradient = np.where(present, ln_fv - ln_fl, 0.0)
    return G, gradient


def _newton(model, T, P, z, ln_K, tol, steps):
    """Newton's method on the Gibbs energy in the vapour amounts vᵢ, with a halving line search.

    Michelsen's second-order stage: the Hessian of G in v (the derivative of its gradient,
    taken by forward differences of the same ln φ, all nc columns of all states in one
    array) made positive definite by lifting its eigenvalues, so every step is a descent
    direction; the step is cut to keep 0 < vᵢ < zᵢ and halved until G falls. Starts from
    the split of z by K (states whose split is not 0 < β < 1 are left unconverged).
    Returns ln K = ln(y/x), converged, iterations.

    References
    ----------
    Michelsen (1982), Fluid Phase Equilib. 9, 21-40; Michelsen & Mollerup (2007), ch. 10.
    """
    n, nc = z.shape
    iterations = np.zeros(n, dtype=int)
    converged = np.zeros(n, dtype=bool)
    beta, x, y, *_ = _split(model, T, P, z, ln_K)
    v = beta[:, None] * y
    ln_K = ln_K.copy()
    active = np.flatnonzero((beta > 0) & (beta < 1) & np.all(np.isfinite(v), axis=1))
    present = z > 0
    eye = np.eye(nc)
    for k in range(1, steps + 1):
        if active.size == 0:
            break
        Ta, Pa, za, va = T[active], P[active], z[active], v[active]
        G, gradient = _amounts_gibbs(model, Ta, Pa, za, va)
        iterations[active] = k
        done = np.max(np.abs(gradient), axis=1) < tol
        converged[active[done]] = True
        keep = ~done & np.isfinite(G)
        active, Ta, Pa, za, va, G, gradient = (a[keep] for a in (active, Ta, Pa, za, va, G, gradient))
        if active.size == 0:
            break
        m = active.size
        la = za - va
        h = 1e-7 * np.maximum(np.minimum(va, la), 1e-300)   # inside 0 < v < z
        shifted = np.repeat(va[:, None, :], nc, axis=1) + h[:, :, None] * eye
        _, g_j = _amounts_gibbs(model, np.repeat(Ta, nc), np.repeat(Pa, nc), np.repeat(za, nc, axis=0),
                                shifted.reshape(m * nc, nc))
        H = (g_j.reshape(m, nc, nc) - gradient[:, None, :]) / h[:, :, None]
        H = 0.5 * (H + np.swapaxes(H, 1, 2))
        both = present[active][:, :, None] & present[active][:, None, :]
        H = np.where(both, H, eye)                        # an absent component stays at v = 0
        H = np.where(np.isfinite(H), H, eye)
        w, U = np.linalg.eigh(H)
        floor = 1e-10 * np.maximum(np.abs(w).max(axis=1, keepdims=True), 1e-300)
        w = np.maximum(np.abs(w), floor)                  # positive definite: a descent direction
        with np.errstate(over="ignore", invalid="ignore"):
            delta = -np.einsum("mij,mj,mkj,mk->mi", U, 1.0 / w, U, gradient)
        delta = np.where(np.isfinite(delta), delta, 0.0)
        with np.errstate(divide="ignore", invalid="ignore"):
            room = np.where(delta < 0, -va / delta, np.where(delta > 0, la / delta, np.inf))
        t = np.minimum(1.0, 0.9 * np.min(np.where(present[active], room, np.inf), axis=1))
        moved = np.zeros(m, dtype=bool)
        for _ in range(HALVINGS):
            pending = np.flatnonzero(~moved)
            if pending.size == 0:
                break
            trial = va[pending] + t[pending, None] * delta[pending]
            G_trial, _ = _amounts_gibbs(model, Ta[pending], Pa[pending], za[pending], trial)
            ok = np.isfinite(G_trial) & ~(G_trial > G[pending] + GIBBS_SLACK * np.maximum(np.abs(G[pending]), 1.0))
            v[active[pending[ok]]] = trial[ok]
            moved[pending[ok]] = True
            t[pending[~ok]] *= 0.5
        active = active[moved]   # no step lowered G: that state stops here (not converged)
    with np.errstate(divide="ignore", invalid="ignore"):
        l = z - v
        ratio = (v / v.sum(axis=1, keepdims=True)) / (l / l.sum(axis=1, keepdims=True))
        ln_K = np.where(present & np.isfinite(ratio) & (ratio > 0), np.log(ratio), ln_K)
    return ln_K, converged, iterations


# --------------------------------------------------------------------------- the flash

def flash_tp(model, T, P, z=None, *, tol: float = FLASH_TOLERANCE, maxiter: int = SUBSTITUTION_STEPS) -> FlashResult:
    """The isothermal flash of feeds z at T [K] and P [Pa] with a cubic mixture model, vectorized.

    Parameters
    ----------
    model : CubicModel
        A cubic with components and kᵢⱼ (e.g. ``tr.PengRobinson(mixture, kij=...)``).
    T, P : float or array_like
        Temperature [K] and pressure [Pa] (SI floats), broadcasting to the states' shape.
    z : array_like, shape (..., n_components), optional
        Feed mole fractions [-]; default the model's ``z``.
    tol : float
        Convergence: every |ln Kᵢ − (ln φᵢᴸ − ln φᵢⱽ)| below this [-].
    maxiter : int
        Successive-substitution steps before the Newton stage.

    Returns
    -------
    FlashResult
        Per state the vapour fraction ``beta`` (0 or 1 in one phase, by the rule in the
        module docstring), ``x``, ``y``, ``n_phases``, each phase's Z and v, ``status`` and
        ``reason``. Every state is "converged" or carries a reason.

    References
    ----------
    Michelsen (1982), Fluid Phase Equilib. 9, 1-19 and 21-40; Michelsen & Mollerup (2007),
    ch. 9-10; Crowe & Nishio (1975), AIChE J. 21, 528 (see the module).

    Examples
    --------
    >>> import thermo_roots as tr
    >>> gas = tr.PengRobinson(tr.Mixture({"methane": 0.9, "propane": 0.1}))
    >>> f = flash_tp(gas, 200.0, 3e6)
    >>> int(f.n_phases), round(float(f.beta), 3)
    (2, 0.802)
    """
    shape, Tf, Pf, zf, reasons = read_states(model, T, P, z, "flash_tp")
    return _flash_flat(model, shape, Tf, Pf, zf, reasons, tol, maxiter)


def _flash_flat(model, shape, T, P, z, reasons, tol, maxiter) -> FlashResult:
    """The flash of flat states, in chunks of :data:`CHUNK` (each iteration's arrays stay small:
    2e5 states at once peaked at about 1 GB), shaped back to ``shape``."""
    n = T.size
    if n <= CHUNK:
        return _shaped(shape, _flash_chunk(model, T, P, z, reasons, tol, maxiter))
    pieces = [_flash_chunk(model, T[s:s + CHUNK], P[s:s + CHUNK], z[s:s + CHUNK], reasons[s:s + CHUNK], tol, maxiter)
              for s in range(0, n, CHUNK)]
    return _shaped(shape, {k: np.concatenate([p[k] for p in pieces]) for k in pieces[0]})


def _flash_chunk(model, T, P, z, reasons, tol, maxiter) -> dict:
    """The flash of one chunk of flat states: a dict of flat arrays (the FlashResult fields)."""
    n, nc = z.shape
    test = _test(model, T, P, z, reasons, 1e-8, 200)
    status = np.full(n, NOT_SOLVED, dtype="<U15")
    reason = test["reason"].copy()
    beta = np.full(n, np.nan)
    x, y = np.full((n, nc), np.nan), np.full((n, nc), np.nan)
    n_phases = np.zeros(n, dtype=int)
    Zl, Zv, vl, vv = (np.full(n, np.nan) for _ in range(4))
    iterations = test["iterations"].copy()
    newton = np.zeros(n, dtype=bool)
    one = test["status"] == STABLE
    # near a critical point the trials can creep towards the feed for hundreds of steps with
    # tm > 0: nothing proves instability, so the flash is tried from the lowest trial; a split
    # it finds is kept only where it lowers the Gibbs energy below the feed's
    creeping = test["status"] == NOT_CONVERGED
    near_critical = np.zeros(n, dtype=bool)
    split = np.flatnonzero((test["status"] == UNSTABLE) | creeping)
    if split.size:
        ln_K = np.log(test["K_estimate"][split])
        slow_test = creeping[split]
        if slow_test.any():
            i = split[slow_test]
            ln_K[slow_test] = np.log(_k_from_trial(model, T[i], P[i], z[i], test["trial"][i], test["v_feed"][i]))
        ln_K, ok, steps = _substitution(model, T[split], P[split], z[split], ln_K, tol, maxiter)
        iterations[split] += steps
        slow = np.flatnonzero(~ok)
        if slow.size:
            newton[split[slow]] = True
            K2, ok2, steps2 = _newton(model, T[split[slow]], P[split[slow]], z[split[slow]], ln_K[slow], tol,
                                      NEWTON_STEPS)
            ln_K[slow], ok[slow] = K2, ok2
            iterations[split[slow]] += steps2
        b, xs, ys, liquid, vapour, G, _ = _split(model, T[split], P[split], z[split], ln_K)
        collapsed = np.max(np.abs(ln_K), axis=1) < TRIVIAL_BELOW
        outside = ~((b > 0.0) & (b < 1.0))
        lower = G < test["g_feed"][split] - GIBBS_SLACK * np.maximum(1.0, np.abs(G))
        two = ok & ~collapsed & ~outside & lower
        # the "vapour" is the phase of larger molar volume (a liquid-liquid split of CO2 or N2 at low
        # T can converge with the denser phase in y): swap such splits
        swap = vapour.v < liquid.v
        b = np.where(swap, 1.0 - b, b)
        xs, ys = np.where(swap[:, None], ys, xs), np.where(swap[:, None], xs, ys)
        Z_l, Z_v = np.where(swap, vapour.Z, liquid.Z), np.where(swap, liquid.Z, vapour.Z)
        v_l, v_v = np.where(swap, vapour.v, liquid.v), np.where(swap, liquid.v, vapour.v)
        idx = split[two]
        status[idx], beta[idx], x[idx], y[idx], n_phases[idx] = CONVERGED, b[two], xs[two], ys[two], 2
        Zl[idx], Zv[idx], vl[idx], vv[idx] = Z_l[two], Z_v[two], v_l[two], v_v[two]
        # no split below the feed's Gibbs energy: one phase, at the edge of the test's resolution
        edge = ~two & (ok | slow_test)
        one[split[edge]] = True
        near_critical[split[edge]] = True
        reason[split[edge]] = ""
        for i in split[~two & ~edge]:
            status[i] = NOT_CONVERGED
            reason[i] = (f"the flash did not converge at T = {T[i]:.6g} K, P = {P[i]:.6g} Pa within {maxiter} "
                         f"substitution and {NEWTON_STEPS} Newton steps (a state very near a critical point?); "
                         "try a slightly different T or P")

    one_idx = np.flatnonzero(one)
    phase = np.full(n, "not solved", dtype=object)
    phase[n_phases == 2] = "two-phase"
    if one_idx.size:
        words = feed_phase_words(model, T[one_idx], P[one_idx], z[one_idx], test["v_feed"][one_idx])
        liquid_like = words == LIQUID
        status[one_idx], n_phases[one_idx], phase[one_idx] = CONVERGED, 1, words
        beta[one_idx] = np.where(liquid_like, 0.0, 1.0)
        x[one_idx] = y[one_idx] = z[one_idx]
        Zf, vf = test["Z_feed"][one_idx], test["v_feed"][one_idx]
        Zl[one_idx], vl[one_idx] = np.where(liquid_like, Zf, np.nan), np.where(liquid_like, vf, np.nan)
        Zv[one_idx], vv[one_idx] = np.where(liquid_like, np.nan, Zf), np.where(liquid_like, np.nan, vf)
    v = np.full(n, np.nan)
    v[n_phases == 2] = ((1.0 - beta) * vl + beta * vv)[n_phases == 2]
    v[one_idx] = test["v_feed"][one_idx]
    Z = P * v / (R * T)
    values = dict(T=T, P=P, z=z, beta=beta, x=x, y=y, n_phases=n_phases, phase=phase, Z_liquid=Zl, Z_vapor=Zv,
                  v_liquid=vl, v_vapor=vv, v=v, Z=Z, tpd_min=test["tpd_min"], iterations=iterations, newton=newton,
                  near_critical=near_critical, status=status, reason=reason)
    return values


def _shaped(shape, values) -> FlashResult:
    if shape == ():
        out = {}
        for k, v in values.items():
            item = v[0]
            out[k] = str(item) if k in ("status", "reason", "phase") else (item.item() if np.ndim(item) == 0 else item)
        return FlashResult(**out)
    out = {k: np.asarray(v).reshape(shape + np.shape(v)[1:]) for k, v in values.items()}
    out["reason"] = out["reason"].astype(str)
    out["phase"] = out["phase"].astype(str)
    return FlashResult(**out)
