"""Bubble and dew points of a mixture at a given temperature or pressure, vectorized.

A bubble point is a liquid of the feed composition z in equilibrium with a first bubble of
vapor y; a dew point a vapor of composition z with a first drop of liquid x. Both are one
system of equations in u = (ln K₁ … ln Kₙ, ln T, ln P), with Kᵢ = yᵢ/xᵢ and, for a vapor
fraction β of the feed (0 at a bubble point, 1 at a dew point),

    xᵢ = zᵢ / (1 + β (Kᵢ − 1)),   yᵢ = Kᵢ xᵢ,
    Fᵢ = ln Kᵢ + ln φᵢ(y, vapor root) − ln φᵢ(x, liquid root) = 0   (equal fugacity),
    Fₙ₊₁ = Σ (yᵢ − xᵢ) = 0,
    Fₙ₊₂ = u_s − S = 0                                              (the specification),

where u_s is ln T or ln P (here) or any other variable (the phase envelope, :mod:`.envelope`,
which shares this system). The solution is found in three stages:

1. Wilson's K-values (:func:`~thermo_roots.equilibrium.wilson_k`) give the start: at fixed T
   the pressure where Σ zᵢKᵢ = 1 (bubble) or Σ zᵢ/Kᵢ = 1 (dew) in closed form; at fixed P the
   temperature where it holds, by bracketed root finding in ln T (the Wilson sums are
   monotone in T, so the bracket comes from the correlation itself).
2. Successive substitution: Kᵢ ← φᵢ(liquid)/φᵢ(vapor) at the current point, then the free
   variable is moved so that the sum is 1: P ← P Σ zᵢKᵢ (bubble) or P ← P / Σ zᵢ/Kᵢ (dew)
   at fixed T; at fixed P a Newton step in T on the log of the sum with Wilson's slope.
   Far from the critical point this converges in a handful of steps.
3. Newton's method on the whole system where substitution is slow (near the critical
   point its rate tends to 1) or has not finished: the Jacobian by forward differences of
   the model's own ln φ (``CubicModel.component_ln_phi`` through
   :func:`~.fugacity.phase_fugacity`; no second fugacity formula), all states and all
   columns evaluated in one batch, steps limited in every log variable.

The trivial solution (K = 1 for all components: the two phases the same) satisfies every
equation; an answer with max |ln Kᵢ| below :data:`TRIVIAL_LN_K` is refused with a reason,
and so is an answer on the wrong side of the envelope (a "bubble" whose incipient phase is
denser than the feed is a dew point; this happens above the mixture's critical
temperature, where the bubble equations converge onto the dew curve).

The upper branch (the retrograde dew point above the critical temperature, the second
bubble or dew temperature near the cricondenbar) is started from the phase envelope traced
for the feed (:func:`~.envelope.phase_envelope`): the envelope's points give the start for
Newton's method at each requested T or P.

References
----------
.. [1] Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
   Computational Aspects, 2nd ed., Tie-Line Publications, ch. 12 (saturation points,
   successive substitution and the Newton system in ln K, ln T, ln P).
.. [2] Michelsen, M. L. (1980), Calculation of phase envelopes and critical points for
   multicomponent mixtures, Fluid Phase Equilib. 4, 1-10.
.. [3] Wilson, G. M. (1968), A modified Redlich-Kwong equation of state, application to
   general physical data calculations, AIChE 65th National Meeting, paper 15c.
"""

from __future__ import annotations

import html
from dataclasses import dataclass, field
from typing import Any, NamedTuple

import numpy as np

from thermo_roots.errors import ConvergenceError, DomainError, InputError, WrongTypeError
from thermo_roots.equilibrium.fugacity import PhaseFugacity, phase_fugacity
from thermo_roots.equilibrium.k_values import WILSON_CONSTANT
from thermo_roots.inversion._problems import Problems, check_errors_option, si_array
from thermo_roots.inversion.display import CAUTION
from thermo_roots.models import CubicModel
from thermo_roots.roots import find_root
from thermo_roots.units import to_si

#: The two kinds of saturation point and the two branches.
KINDS = ("bubble", "dew")
BRANCHES = ("lower", "upper")
#: Statuses of a :class:`SaturationPoint` element.
CONVERGED = "converged"
TRIVIAL = "trivial solution"
WRONG_SIDE = "other side"
NOT_CONVERGED = "not converged"
NOT_SOLVED = "not solved"          # bad input: not finite, not positive
NO_BRANCH = "no such branch"       # the envelope has no point of that branch at this T or P
OUTSIDE = "outside envelope"       # the traced envelope does not reach this T or P on this side
STATUSES = (CONVERGED, TRIVIAL, WRONG_SIDE, NOT_CONVERGED, NOT_SOLVED, NO_BRANCH, OUTSIDE)

#: An answer with max |ln Kᵢ| below this is the trivial solution (both phases the feed).
TRIVIAL_LN_K = 1e-4
#: Convergence: every Newton step component below this [-] (log units) and |F| below 1e-9.
STEP_TOL = 1e-10
RESIDUAL_TOL = 1e-9
#: Forward-difference step in the log variables for the Jacobian [-].
JACOBIAN_STEP = 1e-7
#: Largest Newton step in ln T and ln P, and in any ln Kᵢ [-]: keeps the iterate in the
#: basin (a full step from a poor start can jump onto the trivial solution).
MAX_STEP_TP = 0.15
MAX_STEP_K = 1.0
#: Successive-substitution iterations before Newton takes over, and the max |ln Kᵢ| below
#: which substitution hands over at once (it creeps onto the trivial solution there).
SUBSTITUTION_STEPS = 12
HANDOVER_LN_K = 0.1
#: An answer with max |ln Kᵢ| below NEAR_TRIVIAL_LN_K that took Newton SLOW_NEWTON iterations
#: or more (linear, not quadratic, convergence: a singular Jacobian) is a point of the feed's
#: spinodal approached along the trivial solution, not a saturation point (measured: CoolProp's
#: cubic backend returns such a "bubble point" for a natural gas at 200 K, 4.25 MPa, max |ln K|
#: 1e-3, where the true one is at 5.2 MPa).
NEAR_TRIVIAL_LN_K = 1e-2
SLOW_NEWTON = 15

#: A caution shown with bubble and dew points (they decide how a vessel or line is run).
SATURATION_CAUTION = (CAUTION + " Near the critical point and the cricondenbar a cubic's bubble and dew "
                      "points can be several bar off; keep a margin.")


# --------------------------------------------------------------------------- the equations

class Phases(NamedTuple):
    """The two phases of a point of the system: compositions and fugacity of each."""

    x: np.ndarray      #: liquid-side composition (the feed at a bubble point) [-]
    y: np.ndarray      #: vapor-side composition (the feed at a dew point) [-]
    liquid: Any        #: PhaseFugacity of x
    vapor: Any         #: PhaseFugacity of y


def split_compositions(ln_K, z, beta):
    """x = z/(1 + β(K − 1)) and y = K x [-] (components on the last axis; β broadcasts)."""
    K = np.exp(ln_K)
    x = z / (1.0 + np.asarray(beta, dtype=float)[..., None] * (K - 1.0))
    return x, K * x


def equilibrium_residuals(model, u, z, beta, flipped=False):
    """F₁…Fₙ₊₁ of the system (module docstring) at u = (ln K, ln T, ln P), shape (..., n + 2).

    ``flipped``: the x phase takes the vapor root and y the liquid root (past the critical
    point of an envelope traced at fixed β, where the phase labelled x becomes the lighter).
    Returns (F of shape (..., n + 1), Phases).
    """
    n = u.shape[-1] - 2
    ln_K, T, P = u[..., :n], np.exp(u[..., n]), np.exp(u[..., n + 1])
    x, y = split_compositions(ln_K, z, beta)
    root_x, root_y = ("vapor", "liquid") if flipped else ("liquid", "vapor")
    liquid = phase_fugacity(model, T, P, x, root=root_x)
    vapor = phase_fugacity(model, T, P, y, root=root_y)
    F = np.concatenate([ln_K + vapor.ln_phi - liquid.ln_phi, np.sum(y - x, axis=-1)[..., None]], axis=-1)
    return F, Phases(x, y, liquid, vapor)


def equilibrium_jacobian(model, u, z, beta, flipped=False):
    """F and dF/du by forward differences, every state and column in one evaluation.

    u : shape (m, n + 2); z : (n,) or (m, n); beta : (m,). Returns F (m, n + 1), J (m, n + 1,
    n + 2) and the Phases at u.
    """
    m, k = u.shape
    shifted = u[:, None, :] + np.concatenate([np.zeros((1, k)), JACOBIAN_STEP * np.eye(k)])[None]
    z_b = np.broadcast_to(z, (m, k - 2))[:, None, :]
    beta_b = np.broadcast_to(np.asarray(beta, dtype=float), (m,))[:, None]
    F_all, phases = equilibrium_residuals(model, shifted, np.broadcast_to(z_b, (m, k + 1, k - 2)),
                                          np.broadcast_to(beta_b, (m, k + 1)), flipped)
    F = F_all[:, 0]
    J = np.swapaxes(F_all[:, 1:] - F[:, None, :], 1, 2) / JACOBIAN_STEP
    at_u = Phases(phases.x[:, 0], phases.y[:, 0], _first(phases.liquid), _first(phases.vapor))
    return F, J, at_u


def _first(fugacity):
    """The unshifted state (index 0 on the column axis) of a batched PhaseFugacity."""
    return type(fugacity)(*(a[:, 0] for a in fugacity))


class NewtonResult(NamedTuple):
    u: np.ndarray              #: the solution (m, n + 2)
    converged: np.ndarray      #: bool (m,)
    iterations: np.ndarray     #: Newton iterations used (m,)
    phases: Phases             #: at the solution
    sensitivity: np.ndarray    #: du/dS at the solution (m, n + 2): the continuation's predictor


def newton_solve(model, u0, z, beta, spec_index, spec_value, flipped=False, maxiter=30):
    """Newton's method on the system with the specification u[spec_index] = spec_value.

    u0 : (m, n + 2) starts; spec_index : int or (m,) ints; spec_value : (m,). Steps are
    limited to :data:`MAX_STEP_TP` in ln T, ln P and :data:`MAX_STEP_K` in ln K (the whole
    step scaled, keeping its direction). Converged where every step component is below
    :data:`STEP_TOL` and |F| below :data:`RESIDUAL_TOL`. Returns a :class:`NewtonResult`;
    the sensitivity du/dS solves J du/dS = e_{n+2} with the Jacobian at the solution.

    References: Michelsen & Mollerup (2007) ch. 12; Michelsen (1980).
    """
    u = np.array(u0, dtype=float)
    m, k = u.shape
    n = k - 2
    spec_index = np.broadcast_to(np.asarray(spec_index, dtype=int), (m,))
    spec_value = np.broadcast_to(np.asarray(spec_value, dtype=float), (m,))
    z = np.broadcast_to(np.asarray(z, dtype=float), (m, n))
    beta = np.broadcast_to(np.asarray(beta, dtype=float), (m,))
    converged = np.zeros(m, dtype=bool)
    iterations = np.zeros(m, dtype=int)
    rows = np.arange(m)
    active = np.isfinite(u).all(axis=1)
    limit = np.r_[np.full(n, MAX_STEP_K), MAX_STEP_TP, MAX_STEP_TP]
    sensitivity = np.full((m, k), np.nan)
    x_out = np.full((m, n), np.nan)
    y_out = np.full((m, n), np.nan)
    fields = [np.full((m, n), np.nan), np.full(m, np.nan), np.full(m, np.nan), np.full(m, np.nan),
              np.zeros(m, dtype=int)]
    liquid_out, vapor_out = [f.copy() for f in fields], [f.copy() for f in fields]
    for _ in range(maxiter + 1):
        idx = rows[active]
        if idx.size == 0:
            break
        with np.errstate(all="ignore"):
            F, J, phases = equilibrium_jacobian(model, u[idx], z[idx], beta[idx], flipped)
        full_J = np.zeros((idx.size, k, k))
        full_J[:, :k - 1] = J
        full_J[np.arange(idx.size), k - 1, spec_index[idx]] = 1.0
        full_F = np.concatenate([F, (u[idx, spec_index[idx]] - spec_value[idx])[:, None]], axis=1)
        good = np.isfinite(full_F).all(axis=1) & np.isfinite(full_J).all(axis=(1, 2))
        step = np.full((idx.size, k), np.nan)
        e_last = np.zeros((idx.size, k))
        e_last[:, k - 1] = 1.0
        sens = np.full((idx.size, k), np.nan)
        if good.any():
            try:
                solved = np.linalg.solve(full_J[good], np.stack([-full_F[good], e_last[good]], axis=-1))
                step[good], sens[good] = solved[..., 0], solved[..., 1]
            except np.linalg.LinAlgError:
                for j in np.flatnonzero(good):
                    try:
                        solved = np.linalg.solve(full_J[j], np.stack([-full_F[j], e_last[j]], axis=-1))
                        step[j], sens[j] = solved[:, 0], solved[:, 1]
                    except np.linalg.LinAlgError:
                        pass
        done = (np.abs(step).max(axis=1) <= STEP_TOL) & (np.abs(full_F[:, :k - 1]).max(axis=1) <= RESIDUAL_TOL)
        done |= (np.abs(full_F).max(axis=1) <= 1e-13)
        fail = ~np.isfinite(step).all(axis=1) & ~done
        finished = idx[done]
        converged[finished] = True
        sensitivity[finished] = sens[done]
        x_out[finished], y_out[finished] = phases.x[done], phases.y[done]
        for out, ph in ((liquid_out, phases.liquid), (vapor_out, phases.vapor)):
            for f, value in zip(out, ph):
                f[finished] = value[done]
        active[idx[done | fail]] = False
        move = ~(done | fail)
        if not move.any():
            continue
        s = step[move]
        scale = np.max(np.abs(s) / limit, axis=1)
        s = s / np.maximum(scale, 1.0)[:, None]
        u[idx[move]] += s
        iterations[idx[move]] += 1
    result_phases = Phases(x_out, y_out, PhaseFugacity(*liquid_out), PhaseFugacity(*vapor_out))
    return NewtonResult(u, converged, iterations, result_phases, sensitivity)


# --------------------------------------------------------------------------- starts and substitution

def _wilson_ln_k(model, T, P):
    """Wilson's ln Kᵢ at T, P (shape (m,)) for the model's components: (m, n)."""
    Tc, Pc, omega = model.components.Tc, model.components.Pc, model.components.omega
    return np.log(Pc / P[:, None]) + WILSON_CONSTANT * (1.0 + omega) * (1.0 - Tc / T[:, None])


def wilson_pressure(model, z, T, kind):
    """The pressure [Pa] where Wilson's K make Σ zK = 1 (bubble) or Σ z/K = 1 (dew) at T [K]."""
    Tc, Pc, omega = model.components.Tc, model.components.Pc, model.components.omega
    p_i = Pc * np.exp(WILSON_CONSTANT * (1.0 + omega) * (1.0 - Tc / T[:, None]))   # K_i P
    if kind == "bubble":
        return np.sum(z * p_i, axis=1)
    return 1.0 / np.sum(z / p_i, axis=1)


def wilson_temperature(model, z, P, kind):
    """The temperature [K] where Wilson's K make the bubble or dew sum 1 at P [Pa]: bracketed
    root finding in ln T (each Kᵢ rises with T, so ln Σ zK rises and ln Σ z/K falls).

    NaN where no bracket is found between 0.05 min Tc and 20 max Tc (P above what the
    correlation can reach)."""
    Tc = model.components.Tc
    rows = np.arange(P.size)

    def g(lnT, i):
        T = np.exp(lnT)
        ln_K = _wilson_ln_k(model, T, P[i])
        if kind == "bubble":
            return np.log(np.sum(z[i] * np.exp(ln_K), axis=1))
        return -np.log(np.sum(z[i] * np.exp(-ln_K), axis=1))

    lo = np.full(P.size, np.log(0.05 * Tc.min()))
    hi = np.full(P.size, np.log(20.0 * Tc.max()))
    reach = (g(lo, rows) < 0) & (g(hi, rows) > 0)
    T = np.full(P.size, np.nan)
    if reach.any():
        result = find_root(g, bracket=(lo[reach], hi[reach]), args=(rows[reach],), xtol=1e-12, trace=False)
        T[reach] = np.where(np.asarray(result.converged), np.exp(result.root), np.nan)
    return T


def _substitute(model, ln_K, T, P, z, kind, spec, steps):
    """Successive substitution on ln K with the free variable moved so the sum is 1 (stage 2).

    Returns ln_K, T, P after ``steps`` iterations (or fewer where converged) and the
    iteration counts."""
    m, n = ln_K.shape
    beta = 0.0 if kind == "bubble" else 1.0
    counts = np.zeros(m, dtype=int)
    active = np.isfinite(ln_K).all(axis=1) & np.isfinite(T) & np.isfinite(P)
    slope_i = WILSON_CONSTANT * (1.0 + model.components.omega) * model.components.Tc   # d ln K / d(−1/T)
    for _ in range(steps):
        if not active.any():
            break
        i = np.flatnonzero(active)
        x, y = split_compositions(ln_K[i], z[i], beta)
        with np.errstate(all="ignore"):
            liquid = phase_fugacity(model, T[i], P[i], x, root="liquid")
            vapor = phase_fugacity(model, T[i], P[i], y, root="vapor")
            new = liquid.ln_phi - vapor.ln_phi
            if kind == "bubble":
                w = z[i] * np.exp(new)
                ln_sum = np.log(np.sum(w, axis=1))
            else:
                w = z[i] * np.exp(-new)
                ln_sum = -np.log(np.sum(w, axis=1))
        ok = np.isfinite(new).all(axis=1) & np.isfinite(ln_sum)
        change = np.where(ok, np.abs(new - ln_K[i]).max(axis=1), np.inf)
        ln_K[i[ok]] = new[ok]
        ln_sum = np.clip(ln_sum, -0.5, 0.5)   # one step moves ln P (or ln T's share) by at most 0.5
        if spec == "T":
            P[i[ok]] *= np.exp(ln_sum[ok])
        else:
            weights = w[ok] / np.sum(w[ok], axis=1, keepdims=True)
            slope = np.sum(weights * slope_i, axis=1) / T[i[ok]] ** 2    # d(ln sum)/dT by Wilson
            # both sums' logs (ln Σ zK, −ln Σ z/K) rise with T: one Newton step in T on them
            T[i[ok]] -= np.clip(ln_sum[ok] / slope, -0.1 * T[i[ok]], 0.1 * T[i[ok]])
        counts[i] += 1
        # near the critical point (and near the feed's spinodal) substitution creeps towards the
        # trivial solution: hand those to Newton's method while the K still differ from 1
        stop = ~ok | ((change < 1e-10) & (np.abs(ln_sum) < 1e-12)) | (np.abs(ln_K[i]).max(axis=1) < HANDOVER_LN_K)
        active[i[stop]] = False
    return ln_K, T, P, counts


# --------------------------------------------------------------------------- the result

@dataclass(frozen=True)
class SaturationPoint:
    """Bubble or dew points of a mixture model. Scalars for a scalar T or P, arrays otherwise.

    Attributes
    ----------
    kind : "bubble" or "dew"
    branch : "lower" or "upper" (the lower or higher of two answers for the free variable)
    T : temperature [K]
    P : pressure [Pa]
    z : feed composition [-], shape (n,)
    incipient : composition of the phase that appears [-] (the first bubble's vapor at a
        bubble point, the first drop's liquid at a dew point), shape (..., n)
    v_feed, Z_feed : molar volume [m³/mol] and compressibility factor [-] of the feed phase
    v_incipient, Z_incipient : the same of the incipient phase
    iterations : substitution plus Newton iterations per point
    status : one of :data:`STATUSES` per point ("converged" where there is an answer)
    reason : why a point has no answer ("" where it has one; those points are NaN)
    """

    model: object = field(repr=False)
    kind: str
    branch: str
    T: Any
    P: Any
    z: Any = field(repr=False)
    incipient: Any = field(repr=False)
    v_feed: Any = field(repr=False)
    Z_feed: Any = field(repr=False)
    v_incipient: Any = field(repr=False)
    Z_incipient: Any = field(repr=False)
    iterations: Any = field(repr=False)
    status: Any = field(repr=False)
    reason: Any = field(repr=False)
    warnings: tuple = field(repr=False, default=())

    @property
    def converged(self):
        """True where the point was found."""
        return np.asarray(self.status) == CONVERGED

    @property
    def K(self):
        """Kᵢ = yᵢ/xᵢ [-] (vapor over liquid) at each point."""
        z, w = np.asarray(self.z, dtype=float), np.asarray(self.incipient, dtype=float)
        with np.errstate(divide="ignore", invalid="ignore"):
            return w / z if self.kind == "bubble" else z / w

    def _label(self):
        names = self.model.components.names
        return " + ".join(f"{n} {zi:.4g}" for n, zi in zip(names, np.asarray(self.z)))

    def __repr__(self):
        head = f"SaturationPoint({self.kind}, {self.branch} branch, {self.model.name}, {self._label()}"
        if np.ndim(self.status) == 0:
            if self.status != CONVERGED:
                return f"{head}: {self.status}: {self.reason})"
            return f"{head}: T={float(self.T):.6g} K, P={float(self.P):.6g} Pa)"
        status = np.asarray(self.status)
        counts = ", ".join(f"{int(np.sum(status == s))} {s}" for s in STATUSES if np.any(status == s))
        return f"{head}: {status.size} points, {counts})"

    def _repr_html_(self):
        title = html.escape(f"{self.kind.capitalize()} point ({self.branch} branch), {self.model.name}: {self._label()}")
        caution = f"<p style='font-size:smaller'><b>Caution.</b> {html.escape(SATURATION_CAUTION)}</p>"
        notes = "".join(f"<p><b>Warning.</b> {html.escape(w)}</p>" for w in self.warnings)
        T, P = np.atleast_1d(self.T), np.atleast_1d(self.P)
        status, reason = np.atleast_1d(self.status), np.atleast_1d(self.reason)
        Zf, Zi = np.atleast_1d(self.Z_feed), np.atleast_1d(self.Z_incipient)
        limit = 12
        head = ("<tr><th>T [K]</th><th>P [bar]</th><th>Z feed</th><th>Z incipient</th><th>status</th>"
                "<th>note</th></tr>")
        body = "".join(f"<tr><td>{_cell(T[i])}</td><td>{_cell(P[i] / 1e5)}</td><td>{_cell(Zf[i])}</td>"
                       f"<td>{_cell(Zi[i])}</td><td>{html.escape(str(status[i]))}</td>"
                       f"<td>{html.escape(str(reason[i]))}</td></tr>" for i in range(min(T.size, limit)))
        more = f"<p>… {T.size - limit} more points</p>" if T.size > limit else ""
        comp = ""
        if np.ndim(self.status) == 0 and self.status == CONVERGED:
            which = "incipient vapor y" if self.kind == "bubble" else "incipient liquid x"
            rows = "".join(f"<tr><td style='text-align:left'>{html.escape(n)}</td><td>{zi:.6g}</td><td>{wi:.6g}</td></tr>"
                           for n, zi, wi in zip(self.model.components.names, np.asarray(self.z),
                                                np.asarray(self.incipient)))
            comp = f"<table><tr><th>component</th><th>feed z</th><th>{which}</th></tr>{rows}</table>"
        return f"<div><b>{title}</b><table>{head}{body}</table>{more}{comp}{notes}{caution}</div>"


def _cell(value) -> str:
    value = float(value)
    return "–" if value != value else f"{value:.6g}"


# --------------------------------------------------------------------------- public entry points

def bubble_point(model, T=None, P=None, *, z=None, branch="lower", errors="nan", maxiter=40):
    """Bubble point of a mixture: the pressure at T, or the temperature at P, where the feed
    liquid z is in equilibrium with a first bubble of vapor.

    Parameters
    ----------
    model : CubicModel
        A cubic with its components and kᵢⱼ (a pure fluid is the one-component case, but
        :func:`thermo_roots.saturation` is the better tool there).
    T : float, array_like or str, optional
        Temperature [K] ("250 K", "-20 °C" accepted). Give exactly one of T and P.
    P : float, array_like or str, optional
        Pressure [Pa] ("20 bar", "3 MPa", "5 barg" accepted).
    z : array_like, optional
        Feed mole fractions [-] in the model's component order; default the model's own.
    branch : {"lower", "upper"}
        Which answer where there are two: the lower or the higher pressure (at T) or
        temperature (at P). "upper" is started from the traced phase envelope.
    errors : {"nan", "raise"}
        "nan" (default): a point without an answer gets NaN, a status and a reason;
        "raise": raise at the first such point.
    maxiter : int
        Most Newton iterations per point (after :data:`SUBSTITUTION_STEPS` substitutions).

    Returns
    -------
    SaturationPoint

    Raises
    ------
    InputError
        Both or neither of T and P, a bad branch, z of the wrong length, or (for a scalar)
        a T or P that is not positive and finite.

    References
    ----------
    Michelsen & Mollerup (2007) ch. 12; Michelsen (1980); Wilson (1968) (see the module).
    """
    return _saturation_point("bubble", model, T, P, z, branch, errors, maxiter)


def dew_point(model, T=None, P=None, *, z=None, branch="lower", errors="nan", maxiter=40):
    """Dew point of a mixture: the pressure at T, or the temperature at P, where the feed
    vapor z is in equilibrium with a first drop of liquid.

    Parameters and result as :func:`bubble_point`. Between the mixture's critical
    temperature and its cricondentherm a dew-point isotherm meets the envelope twice:
    ``branch="upper"`` gives the retrograde (upper) dew pressure. Above the cricondentherm
    there is no dew point: the point's reason says so.

    References
    ----------
    Michelsen & Mollerup (2007) ch. 12; Michelsen (1980); Wilson (1968) (see the module).
    """
    return _saturation_point("dew", model, T, P, z, branch, errors, maxiter)


def _check_model(model, who):
    if not isinstance(model, CubicModel):
        raise WrongTypeError(f"{who} needs a cubic mixture model, e.g. PengRobinson(Mixture({{'methane': 0.9, "
                             f"'ethane': 0.1}})); got {model!r} ({type(model).__name__}).")


def feed_composition(model, z, who):
    """The feed z [-] as a checked array of the model's component count (default: the model's)."""
    if z is None:
        return np.asarray(model.z, dtype=float)
    if isinstance(z, (str, bytes)):
        raise WrongTypeError(f"{who}: z must be {model.n_components} mole fractions, not the text {z!r}.")
    try:
        arr = np.asarray(z, dtype=float)
    except (TypeError, ValueError):
        raise WrongTypeError(f"{who}: z must be {model.n_components} mole fractions; got {z!r}.") from None
    if arr.shape != (model.n_components,) or not np.all(np.isfinite(arr)) or np.any(arr < 0) or arr.sum() <= 0:
        raise InputError(f"{who}: z must be {model.n_components} finite mole fractions >= 0 in the order "
                         f"{', '.join(model.components.names)}; got {z!r}.")
    if abs(arr.sum() - 1.0) > 1e-9:
        raise InputError(f"{who}: z sums to {arr.sum():.12g}, not 1; normalise it (z / sum(z)) if that is meant.")
    return arr


def _saturation_point(kind, model, T, P, z, branch, errors, maxiter, fallback=True):
    who = f"{kind}_point"
    _check_model(model, who)
    if (T is None) == (P is None):
        raise InputError(f"{who}() needs exactly one of T= or P= (got {'both' if T is not None else 'neither'}); "
                         f"e.g. {who}(model, T='250 K') or {who}(model, P='20 bar').")
    if branch not in BRANCHES:
        raise InputError(f"{who}: branch={branch!r} is not one of {', '.join(map(repr, BRANCHES))}.")
    check_errors_option(errors)
    z = feed_composition(model, z, who)
    spec = "T" if T is not None else "P"
    unit = "K" if spec == "T" else "Pa"
    given = np.asarray(si_array(to_si, T if spec == "T" else P, spec), dtype=float)
    shape = given.shape
    flat = np.atleast_1d(given).ravel()
    problems = Problems(flat.size, shape, strict=errors == "raise")
    if shape == ():
        if not (np.isfinite(flat[0]) and flat[0] > 0):
            raise InputError(f"{who}: {spec} must be positive and finite; got {flat[0]!r} {unit}.")
    problems.flag(~(np.isfinite(flat) & (flat > 0)),
                  lambda i: f"{spec} = {float(flat[i])!r} is not a positive finite number [{unit}].", InputError)
    good = np.flatnonzero(problems.ok)
    solved = _solve(model, z, flat[good], kind, spec, branch, maxiter, fallback)
    n = model.n_components
    out = {key: np.full(flat.size, np.nan) for key in ("T", "P", "v_feed", "Z_feed", "v_incipient", "Z_incipient")}
    incipient = np.full((flat.size, n), np.nan)
    iterations = np.zeros(flat.size, dtype=int)
    status = np.full(flat.size, NOT_SOLVED, dtype=object)
    status[good] = solved["status"]
    iterations[good] = solved["iterations"]
    ok = good[solved["status"] == CONVERGED]
    keep = solved["status"] == CONVERGED
    for key in out:
        out[key][ok] = solved[key][keep]
    incipient[ok] = solved["incipient"][keep]
    note = np.full(flat.size, "", dtype=object)
    note[good] = solved["note"]
    for code in (TRIVIAL, WRONG_SIDE, NOT_CONVERGED, NO_BRANCH, OUTSIDE):
        where = good[solved["status"] == code]
        mask = np.zeros(flat.size, dtype=bool)
        mask[where] = True
        problems.flag(mask, lambda i, code=code: note[i] or _reason(kind, spec, flat[i], code, branch),
                      ConvergenceError if code == NOT_CONVERGED else DomainError)
    reason = problems.reason

    def shaped(a, extra=()):
        a = np.asarray(a).reshape(shape + extra)
        return a.item() if a.ndim == 0 else a

    return SaturationPoint(model, kind, branch, shaped(out["T"]), shaped(out["P"]), z,
                           incipient.reshape(shape + (n,)), shaped(out["v_feed"]), shaped(out["Z_feed"]),
                           shaped(out["v_incipient"]), shaped(out["Z_incipient"]), shaped(iterations),
                           shaped(status.astype(str)), shaped(np.asarray(reason).astype(str)), problems.summary())


def _reason(kind, spec, value, code, branch):
    at = f"{spec} = {value:.6g} {'K' if spec == 'T' else 'Pa'}"
    other = "pressure" if spec == "T" else "temperature"
    if code == TRIVIAL:
        where = ("above the mixture's critical temperature (no bubble point)" if kind == "bubble" and spec == "T"
                 else "above the cricondentherm" if spec == "T" else "above the cricondenbar")
        return (f"no {kind} point at this {'temperature' if spec == 'T' else 'pressure'} ({at}): the iteration "
                f"went to the trivial solution (both phases the feed, K = 1); the feed is likely {where}. "
                "Trace the envelope with phase_envelope(model) to see where it has one.")
    if code == WRONG_SIDE:
        other_kind = "dew" if kind == "bubble" else "bubble"
        return (f"no {kind} point at this {'temperature' if spec == 'T' else 'pressure'} ({at}): the only "
                f"answer found is a {other_kind} point (its incipient phase is "
                f"{'denser' if kind == 'bubble' else 'lighter'} than the feed). Try {other_kind}_point, or "
                "phase_envelope(model) to see the whole curve.")
    if code == NO_BRANCH:
        return (f"no {kind} point on the {branch} branch at {at}: the traced phase envelope meets this "
                f"{'isotherm' if spec == 'T' else 'isobar'} on the {kind} side "
                f"{'only once or not at all' if branch == 'upper' else 'nowhere'}. Try branch='lower' "
                "or look at phase_envelope(model).")
    return (f"the {kind} {other} did not converge at {at} (substitution and Newton's method); near the "
            "critical point try phase_envelope(model), which passes through it.")


def _solve(model, z, values, kind, spec, branch, maxiter, fallback=True):
    """Every stage for the good points (1-D ``values`` of T [K] or P [Pa]).

    ``fallback``: where the lower branch's own stages find nothing, trace the envelope and
    start from it (off inside the envelope's own starting points, which would recurse)."""
    m, n = values.size, model.n_components
    zz = np.broadcast_to(z, (m, n))
    beta = np.full(m, 0.0 if kind == "bubble" else 1.0)
    spec_index = n if spec == "T" else n + 1
    empty = {key: np.full(m, np.nan) for key in ("T", "P", "v_feed", "Z_feed", "v_incipient", "Z_incipient")}
    empty.update(incipient=np.full((m, n), np.nan), iterations=np.zeros(m, dtype=int),
                 status=np.full(m, NOT_CONVERGED, dtype=object), note=np.full(m, "", dtype=object))
    if m == 0:
        return empty
    envelope = None
    if branch == "upper":
        envelope, why = _envelope_for(model, z)
        if envelope is None:
            empty["status"][:] = NO_BRANCH
            empty["note"][:] = why
            return empty
        u0, found = _envelope_starts(model, z, kind, spec, values, "upper", envelope)
        counts = np.zeros(m, dtype=int)
    else:
        if spec == "T":
            T = values.copy()
            P = wilson_pressure(model, zz, T, kind)
        else:
            P = values.copy()
            T = wilson_temperature(model, zz, P, kind)
        with np.errstate(all="ignore"):
            ln_K = _wilson_ln_k(model, T, P)
        ln_K, T, P, counts = _substitute(model, ln_K, T, P, zz, kind, spec, SUBSTITUTION_STEPS)
        u0 = np.concatenate([ln_K, np.log(T)[:, None], np.log(P)[:, None]], axis=1)
        found = np.isfinite(u0).all(axis=1)
    u0[:, spec_index] = np.log(values)
    result = newton_solve(model, u0, zz, beta, spec_index, np.log(values), maxiter=maxiter)
    out = empty
    out["iterations"] = counts + result.iterations
    _fill(out, result, kind, n)
    if branch == "lower":
        # substitution that ran onto (or towards) the trivial solution: Newton from Wilson's start
        retry = np.flatnonzero(np.isin(out["status"], (TRIVIAL, NOT_CONVERGED)) & found)
        if retry.size:
            _retry_from_wilson(model, zz, values, kind, spec, spec_index, beta, retry, out, maxiter)
        lost = np.flatnonzero(np.isin(out["status"], (TRIVIAL, NOT_CONVERGED, WRONG_SIDE)))
        if fallback and lost.size:
            _from_the_envelope(model, z, values, kind, spec, spec_index, beta, lost, out, maxiter)
    else:
        out["status"][~found] = NO_BRANCH
    return out


def _envelope_for(model, z):
    """The feed's traced envelope, or (None, why) where it cannot be traced."""
    from thermo_roots.equilibrium.envelope import phase_envelope   # the envelope builds on this module

    try:
        return phase_envelope(model, z=z), ""
    except InputError as error:
        return None, f"the phase envelope could not be traced for this feed: {error}"


def _envelope_starts(model, z, kind, spec, values, branch, envelope):
    """Starts from the envelope; near the critical point the points themselves, bracketed along
    it (:func:`~.envelope.near_critical_points`), where Newton's method at fixed T or P would
    fall onto the trivial solution."""
    from thermo_roots.equilibrium.envelope import NEAR_CRITICAL_LN_K, envelope_starts, near_critical_points

    u0, found, segments = envelope_starts(model, z, kind, spec, values, branch, envelope=envelope)
    n = model.n_components
    with np.errstate(invalid="ignore"):
        near = found & (np.abs(segments[:, :, :n]).max(axis=(1, 2)) < NEAR_CRITICAL_LN_K)
    if near.any():
        u_near, ok = near_critical_points(model, z, kind, spec, values[near], segments[near])
        rows = np.flatnonzero(near)
        u0[rows[ok]] = u_near[ok]
    return u0, found


def _from_the_envelope(model, z, values, kind, spec, spec_index, beta, rows, out, maxiter):
    """Lower-branch points the Wilson start could not reach: Newton from the traced envelope
    where it meets the given T or P on the ``kind`` side; where it does not meet it, the
    reason names the envelope's reach (its cricondentherm, cricondenbar, critical point)."""
    envelope, why = _envelope_for(model, z)
    if envelope is None:
        return
    u0, found = _envelope_starts(model, z, kind, spec, values[rows], "lower", envelope)
    if found.any():
        take = rows[found]
        result = newton_solve(model, u0[found], np.broadcast_to(z, (take.size, z.size)), beta[take], spec_index,
                              np.log(values[take]), maxiter=maxiter)
        trial = {key: np.array(val[take]) for key, val in out.items()}
        _fill(trial, result, kind, model.n_components)
        better = trial["status"] == CONVERGED
        for key in out:
            out[key][take[better]] = trial[key][better]
        out["iterations"][take] += result.iterations
    critical = envelope.critical
    unsolved = rows[found][out["status"][rows[found]] != CONVERGED]
    if critical is not None and unsolved.size:
        c = critical[0] if spec == "T" else critical[1]
        close = unsolved[np.abs(np.log(values[unsolved] / c)) < 2e-3]
        out["note"][close] = [
            f"no {kind} point found at {spec} = {v:.6g} {'K' if spec == 'T' else 'Pa'}: that is within "
            f"{abs(v - c) / c:.1e} (relative) of the mixture's critical point ({critical[0]:.6g} K, "
            f"{critical[1] / 1e5:.6g} bar), where bubble and dew point meet and the two phases cannot be told "
            "apart; use the critical point (phase_envelope(model).critical)." for v in values[close]]
    missing = rows[~found]
    out["status"][missing] = OUTSIDE
    out["note"][missing] = [_outside_reason(kind, spec, v, envelope) for v in values[missing]]


def _outside_reason(kind, spec, value, envelope):
    """Why there is no point: how far the envelope's ``kind`` side reaches in T or P."""
    on_side = envelope.side == kind
    T, P = envelope.T[on_side], envelope.P[on_side]
    what = "temperature" if spec == "T" else "pressure"
    at = f"T = {value:.6g} K" if spec == "T" else f"P = {value / 1e5:.6g} bar"
    if not np.isfinite(T).any():
        return f"no {kind} point at this {what} ({at}): the traced envelope has no {kind} side."
    if spec == "T":
        reach = f"{np.nanmin(T):.6g} K to {np.nanmax(T):.6g} K"
        special = (f"cricondentherm {envelope.cricondentherm[0]:.6g} K" if kind == "dew" else
                   "critical point " + ("–" if envelope.critical is None else f"{envelope.critical[0]:.6g} K"))
    else:
        reach = f"{np.nanmin(P) / 1e5:.6g} bar to {np.nanmax(P) / 1e5:.6g} bar"
        special = f"cricondenbar {envelope.cricondenbar[1] / 1e5:.6g} bar"
    return (f"no {kind} point at this {what} ({at}): the {kind} side of the phase envelope traced for this feed "
            f"spans {reach} ({special}). The feed is single-phase at every "
            f"{'pressure' if spec == 'T' else 'temperature'} there.")


def _fill(out, result, kind, n, where=None):
    """Statuses and values of a Newton result into ``out`` (at rows ``where``)."""
    where = np.arange(result.u.shape[0]) if where is None else where
    u, conv = result.u, result.converged
    ln_K = u[:, :n]
    size = np.abs(ln_K).max(axis=1)
    trivial = conv & ((size < TRIVIAL_LN_K) | ((size < NEAR_TRIVIAL_LN_K) & (result.iterations >= SLOW_NEWTON)))
    with np.errstate(invalid="ignore"):
        # no convergence with the K close to 1: the iteration wandering near the trivial solution,
        # where there is no saturation point (measured: dew points above the cricondentherm)
        trivial |= ~conv & (size < HANDOVER_LN_K)
    feed, inc = (result.phases.liquid, result.phases.vapor) if kind == "bubble" else \
        (result.phases.vapor, result.phases.liquid)
    with np.errstate(invalid="ignore"):
        # a bubble point's vapor is lighter than its liquid; a dew point's drop denser than its vapor
        wrong = conv & ~trivial & ((inc.v < feed.v) if kind == "bubble" else (inc.v > feed.v))
    good = conv & ~trivial & ~wrong
    status = np.where(good, CONVERGED, np.where(trivial, TRIVIAL, np.where(wrong, WRONG_SIDE, NOT_CONVERGED)))
    out["status"][where] = status
    out["T"][where] = np.exp(u[:, n])
    out["P"][where] = np.exp(u[:, n + 1])
    out["v_feed"][where], out["Z_feed"][where] = feed.v, feed.Z
    out["v_incipient"][where], out["Z_incipient"][where] = inc.v, inc.Z
    w = result.phases.y if kind == "bubble" else result.phases.x
    out["incipient"][where] = w / np.sum(w, axis=1, keepdims=True)


def _retry_from_wilson(model, zz, values, kind, spec, spec_index, beta, rows, out, maxiter):
    """Newton straight from Wilson's start where substitution ran onto the trivial solution."""
    v = values[rows]
    if spec == "T":
        T, P = v, wilson_pressure(model, zz[rows], v, kind)
    else:
        T, P = wilson_temperature(model, zz[rows], v, kind), v
    with np.errstate(all="ignore"):
        u0 = np.concatenate([_wilson_ln_k(model, T, P), np.log(T)[:, None], np.log(P)[:, None]], axis=1)
    result = newton_solve(model, u0, zz[rows], beta[rows], spec_index, np.log(v), maxiter=maxiter)
    trial = {key: np.array(val[rows]) for key, val in out.items()}
    _fill(trial, result, kind, model.n_components)
    better = trial["status"] == CONVERGED
    for key in out:
        out[key][rows[better]] = trial[key][better]
    out["iterations"][rows] += result.iterations
