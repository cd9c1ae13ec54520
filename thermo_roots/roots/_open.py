"""Open methods: secant and Newton-Raphson, with escape checks and a bracket fallback.

Without a bracket (or with one where f does not change sign) an open method stops:

* "diverged" when the step cannot be formed (zero derivative or zero secant slope),
  the new point or f there is not finite, or the step has grown GROWTH_LIMIT
  iterations in a row;
* "left the domain" when the new point lies outside ``domain=(lo, hi)`` (closed);
  f is never called there;
* "cycling" when the new point is within the tolerance of an earlier one without
  the step being short (Brent's cycle detection: the point of the last iteration
  that was a power of two is kept and compared, so a cycle of any period is found
  within about twice its period once the iterates have settled on it).

With a bracket whose ends have f of opposite sign, a step that fails any of these
checks or lands outside the bracket is replaced by a bisection step, and the bracket
is updated with every new point, so the method converges where bisection would.
"""

from __future__ import annotations

import numpy as np

from thermo_roots.roots._bracketed import evaluate_ends
from thermo_roots.roots._engine import (
    ACTIVE, CONVERGED, CYCLING, DIVERGED, LEFT_DOMAIN, POLE, as_codes, between, mark_poles,
)

GROWTH_LIMIT = 4  # consecutive growing steps taken as divergence (common practice)


class Open:
    """Shared start, escape checks and update of the open methods."""

    bracketed = False
    needs_fprime = False
    name = ""
    summary = ""

    def raw_step(self, work):
        """The method's next point and where it could not be formed."""
        raise NotImplementedError

    def first_points(self, work, opts) -> None:
        """Set x, fx (and any older point) from x0 or the bracket."""
        raise NotImplementedError

    def shift(self, v, z, fz) -> None:
        """Make (z, fz) the current point."""
        v["x"], v["fx"] = z, fz

    def start(self, work, opts):
        v = work.v
        n = work.size
        if "a" in v:
            v["br"] = evaluate_ends(work)
        else:
            v["br"] = np.zeros(n, dtype=bool)
            v["a"] = v["b"] = v["fa"] = v["fb"] = np.full(n, np.nan)
            v["f0"] = np.full(n, np.inf)
        self.first_points(work, opts)
        v["step"], v["grow"] = np.full(n, np.inf), np.zeros(n, dtype=np.int64)
        v["verify"] = np.zeros(n, dtype=bool)
        v["anchor"] = v["x"]  # for the cycle test
        return self._start_codes(v, opts)

    def _start_codes(self, v, opts):
        codes = as_codes(opts.small_f(v["fx"])).copy()
        roots = v["x"]
        ends = (("a", "fa"), ("b", "fb"), ("xp", "fp"))[: 3 if "xp" in v else 2]
        for end, f_end in ends:  # an exact zero at a bracket end or at x0
            zero = v[f_end] == 0
            codes[zero], roots = CONVERGED, np.where(zero, v[end], roots)
        bad = (codes == ACTIVE) & ~np.isfinite(v["fx"])
        codes[bad] = DIVERGED
        return codes, np.where(bad, np.nan, roots)

    def propose(self, work, opts):
        v = work.v
        z, broke = self.raw_step(work)
        formed = np.isfinite(z) & ~broke
        in_domain = (z >= v["lo"]) & (z <= v["hi"]) if "lo" in v else np.ones(z.shape, dtype=bool)
        # A final step within tol may round to or just past a bracket end: let it through.
        in_bracket = ((z > v["a"]) & (z < v["b"])) | (np.abs(z - v["x"]) <= opts.tol(v["x"]))
        bisect = v["br"] & ~(formed & in_domain & in_bracket)
        z = np.where(bisect, between(v["a"], 0.5, v["b"]), z)
        z = np.where(v["verify"], self._verification_point(v, opts), z)
        step = np.abs(z - v["x"])
        v["grow"] = np.where(step > v["step"], v["grow"] + 1, 0)
        v["step"], v["xn"] = step, z
        free = ~v["br"]
        codes = np.zeros(z.shape, dtype=np.int8)
        codes[free & (v["grow"] >= GROWTH_LIMIT)] = DIVERGED
        codes[free & ~in_domain] = LEFT_DOMAIN
        codes[free & ~formed] = DIVERGED
        return codes

    def accept(self, work, fz, opts):
        v = work.v
        z = v.pop("xn")
        self.shift(v, z, fz)
        self._update_bracket(v, z, fz)
        tol = opts.tol(z)
        width_ok = v["br"] & (v["b"] - v["a"] <= tol)
        short_step = v["step"] <= tol
        done = (short_step & ~v["br"]) | opts.small_f(fz) | width_ok
        # With a bracket a short step is no proof (a huge f at one end makes the first
        # secant step tiny far from any root): probe one tolerance beyond it first.
        v["verify"] = short_step & v["br"] & ~done & ~v["verify"]
        codes = as_codes(done).copy()
        pole = mark_poles(as_codes(width_ok).copy(), v["fa"], v["fb"], v["f0"]) if width_ok.any() else width_ok
        codes[pole] = POLE
        free = ~done & ~v["br"]
        cycling = free
        if free.any():  # with a bracket there is no cycle: the bracket shrinks every step
            cycling = free & (np.abs(z - v["anchor"]) <= opts.tol(v["anchor"]))
            codes[cycling] = CYCLING
        n = work.iteration
        if n & (n - 1) == 0:  # a power of two: this point becomes the one compared with
            v["anchor"] = z
        bad = ~np.isfinite(fz)
        if bad.any():
            codes[bad] = DIVERGED
            codes[v["br"] & np.isinf(fz)] = POLE  # infinite between two finite values of opposite sign
        root = np.where(width_ok, self._best_end(v)[1], z) if width_ok.any() else z
        return codes, np.where(bad | pole | cycling, np.nan, root)

    @staticmethod
    def _verification_point(v, opts):
        """One tolerance from x towards the far bracket end, where the sign must change."""
        far = np.where(np.abs(v["x"] - v["a"]) <= np.abs(v["x"] - v["b"]), v["b"], v["a"])
        return v["x"] + np.copysign(np.minimum(opts.tol(v["x"]), 0.5 * np.abs(far - v["x"])), far - v["x"])

    @staticmethod
    def _update_bracket(v, z, fz) -> None:
        # z lies inside the bracket wherever there is one; it replaces the end of its sign.
        if not v["br"].any():
            return
        lower = v["br"] & ((fz > 0) == (v["fa"] > 0))
        upper = v["br"] & ~lower
        v["a"], v["fa"] = np.where(lower, z, v["a"]), np.where(lower, fz, v["fa"])
        v["b"], v["fb"] = np.where(upper, z, v["b"]), np.where(upper, fz, v["fb"])

    def best(self, v):
        return v["x"]

    def snapshot(self, v):
        has = v["br"].any()
        return v["x"], v["fx"], (v["a"] if has else None), (v["b"] if has else None)

    @staticmethod
    def _best_end(v):
        """The bracket end with the smaller |f| (the start when no x0 is given)."""
        pick_a = np.abs(v["fa"]) <= np.abs(v["fb"])
        return pick_a, np.where(pick_a, v["a"], v["b"]), np.where(pick_a, v["fa"], v["fb"])


class Newton(Open):
    """Newton-Raphson: x_new = x - f(x)/f'(x), with the analytic derivative ``fprime``.

    Starts at ``x0``, or at the bracket end with the smaller |f| when no x0 is given.
    ``fprime`` is called once per iteration; these calls are not in ``evaluations``.

    References
    ----------
    .. [1] Burden, R. L., Faires, J. D., *Numerical Analysis*, 9th ed., Brooks/Cole, 2011, sec. 2.3.
    .. [2] Press, W. H. et al., *Numerical Recipes*, 3rd ed., Cambridge University Press, 2007, sec. 9.4.
    """

    name = "newton"
    needs_fprime = True
    summary = "Newton-Raphson with the analytic derivative fprime"

    def first_points(self, work, opts):
        v = work.v
        if "x0" in v:
            v["x"], v["fx"] = v["x0"], work.evaluate(v["x0"])
        else:
            _, v["x"], v["fx"] = self._best_end(v)

    def raw_step(self, work):
        v = work.v
        slope = work.call(work.fprime, v["x"])
        return v["x"] - v["fx"] / slope, (slope == 0) | ~np.isfinite(slope)


class Secant(Open):
    """Secant method: the line through the last two iterates gives the next one.

    Starts from ``x0`` and a second point ``x0 ± 1e-4 (1 + |x0|)`` (towards the
    inside of the domain and bracket), or from the two bracket ends when no x0 is
    given (the end with the smaller |f| taken as the newer point).

    References
    ----------
    .. [1] Burden, R. L., Faires, J. D., *Numerical Analysis*, 9th ed., Brooks/Cole, 2011, sec. 2.3.
    .. [2] Press, W. H. et al., *Numerical Recipes*, 3rd ed., Cambridge University Press, 2007, sec. 9.2.
    """

    name = "secant"
    summary = "secant method from two starting points"

    def first_points(self, work, opts):
        v = work.v
        if "x0" in v:
            x0 = v["x0"]
            h = 1e-4 * (1.0 + np.abs(x0))
            room = np.minimum(v.get("hi", np.inf), np.where(v["br"], v["b"], np.inf))
            x1 = np.where(x0 + h <= room, x0 + h, x0 - h)
            v["xp"], v["fp"] = x0, work.evaluate(x0)
            v["x"], v["fx"] = x1, work.evaluate(x1)
        else:
            pick_a, v["x"], v["fx"] = self._best_end(v)
            v["xp"], v["fp"] = np.where(pick_a, v["b"], v["a"]), np.where(pick_a, v["fb"], v["fa"])

    def raw_step(self, work):
        v = work.v
        slope_den = v["fx"] - v["fp"]
        return v["x"] - v["fx"] * (v["x"] - v["xp"]) / slope_den, slope_den == 0

    def shift(self, v, z, fz):
        v["xp"], v["fp"] = v["x"], v["fx"]
        v["x"], v["fx"] = z, fz
