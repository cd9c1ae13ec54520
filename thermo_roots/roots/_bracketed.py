"""Bracketed methods: bisection, Illinois false position and Chandrupatla's hybrid.

All three keep two points with f of opposite sign: ``x`` (the newest iterate) and
``xo`` (the other end). Each step puts the next point at ``x + t (xo - x)`` with a
method-specific fraction ``t`` in (0, 1), so the bracket can never be lost. The
fraction is kept at least tol/2 away from both ends: when the bracket is nearly
as narrow as the tolerance, this makes the next point land on the far side of a
root that sits close to an end, so the width test can be met (the same safeguard
as the minimum step in Brent's method).
"""

from __future__ import annotations

import numpy as np

from thermo_roots.roots._engine import CONVERGED, DIVERGED, NO_SIGN_CHANGE, POLE, as_codes, between, mark_poles


def evaluate_ends(work) -> np.ndarray:
    """Evaluate f at both bracket ends (stored as fa, fb); where the signs differ."""
    v = work.v
    v["fa"] = work.evaluate(v["a"])
    v["fb"] = work.evaluate(v["b"])
    v["f0"] = np.maximum(np.abs(v["fa"]), np.abs(v["fb"]))  # for the pole test at the end
    return ((v["fa"] < 0) & (v["fb"] > 0)) | ((v["fa"] > 0) & (v["fb"] < 0))


def bracket_test(v: dict, opts) -> np.ndarray:
    """Codes for the brackets (x, xo) after an update; stores v["margin"] for the next step.

    Converged where the width is within tol (taken at the end nearer zero, the
    stricter choice) or f at the newest point is small enough (the other end was
    tested when it was new).
    """
    width = np.abs(v["xo"] - v["x"])
    tol = opts.tol(np.minimum(np.abs(v["x"]), np.abs(v["xo"])))
    # the smallest step is sized at the newest point x, where it is taken: sized at a far
    # end nearer zero it can fall below the float spacing at x and re-evaluate the same point
    v["margin"] = 0.5 * opts.tol(np.abs(v["x"])) / width
    return as_codes((width <= tol) | opts.small_f(v["fx"]))


def best_end(v: dict, done: np.ndarray) -> np.ndarray:
    """The bracket end with the smaller |f|, for the problems in ``done``."""
    x, fx, xo, fo = (v[k][done] for k in ("x", "fx", "xo", "fo"))
    return np.where(np.abs(fx) <= np.abs(fo), x, xo)


class Bracketed:
    """Shared start, step and update of the bracketed methods."""

    bracketed = True
    needs_fprime = False
    name = ""
    summary = ""

    def fraction(self, v: dict) -> np.ndarray:
        """Where to put the next point, as a fraction of the way from x to xo."""
        raise NotImplementedError

    def remember(self, v: dict, fz: np.ndarray, flip: np.ndarray) -> None:
        """Method-specific bookkeeping before the new point enters the bracket."""

    def setup(self, v: dict) -> None:
        """Method-specific state at the start."""

    def start(self, work, opts):
        v = work.v
        change = evaluate_ends(work)
        # x starts at the upper end: Illinois' first step then follows its published rule.
        v["x"], v["fx"], v["xo"], v["fo"] = v.pop("b"), v.pop("fb"), v.pop("a"), v.pop("fa")
        self.setup(v)
        codes = bracket_test(v, opts) | as_codes(opts.small_f(v["fo"]))
        codes[~change] = NO_SIGN_CHANGE
        x_zero, xo_zero = v["fx"] == 0, v["fo"] == 0  # an exact zero at an end is a root
        codes[x_zero | xo_zero] = CONVERGED

        def roots(done):
            best = best_end(v, done)
            best[xo_zero[done]] = v["xo"][done & xo_zero]
            best[x_zero[done]] = v["x"][done & x_zero]
            best[~change[done] & ~(x_zero | xo_zero)[done]] = np.nan
            return best

        return codes, roots

    def propose(self, work, opts):
        v = work.v
        t = self.fraction(v)
        t[~np.isfinite(t)] = 0.5
        np.clip(t, v["margin"], 1.0 - v["margin"], out=t)
        v["xn"] = between(v["x"], t, v["xo"], bisect_wide=True)
        return None

    def accept(self, work, fz, opts):
        v = work.v
        flip = (fz > 0) != (v["fx"] > 0)  # z lies across the root from x: x becomes the other end
        self.remember(v, fz, flip)
        v["xo"], v["fo"] = np.where(flip, v["x"], v["xo"]), np.where(flip, v["fx"], v["fo"])
        v["x"], v["fx"] = v.pop("xn"), fz
        codes = bracket_test(v, opts)
        pole = mark_poles(codes, fz, v["fo"], v["f0"])
        bad = ~np.isfinite(fz)
        if bad.any():
            infinite = np.isinf(fz)  # infinite between two finite values of opposite sign: a pole
            codes[bad] = DIVERGED  # NaN: f gave no usable value inside the bracket
            codes[infinite] = POLE
            pole |= infinite

        def roots(done):
            best = best_end(v, done)
            best[(bad | pole)[done]] = np.nan
            return best

        return codes, roots

    def best(self, v: dict) -> np.ndarray:
        return best_end(v, slice(None))

    def snapshot(self, v: dict):
        return v["x"], v["fx"], np.minimum(v["x"], v["xo"]), np.maximum(v["x"], v["xo"])


class Bisection(Bracketed):
    """Halve the bracket every step.

    References
    ----------
    .. [1] Burden, R. L., Faires, J. D., *Numerical Analysis*, 9th ed., Brooks/Cole, 2011, sec. 2.1.
    """

    name = "bisect"
    summary = "bisection: halves the bracket each step; slow, certain"

    def fraction(self, v):
        return np.full(v["x"].shape, 0.5)


class Illinois(Bracketed):
    """False position with the Illinois modification.

    The secant through the two ends gives the next point; when two new iterates in
    a row fall on the same side, the f value kept for the other end is halved, which
    stops one end from staying fixed.

    References
    ----------
    .. [1] Dowell, M., Jarratt, P., "A modified regula falsi method for computing the
       root of an equation", BIT 11(2):168-174, 1971.
    """

    name = "illinois"
    summary = "false position with the Illinois modification"

    def setup(self, v):
        v["go"] = v["fo"]  # the (possibly halved) f value used for the other end

    def fraction(self, v):
        d = v["fx"] - v["go"]
        return np.where(np.isfinite(d), v["fx"] / d, np.nan)  # an overflowed difference: bisect

    def remember(self, v, fz, flip):
        v["go"] = np.where(flip, v["fx"], 0.5 * v["go"])


class Chandrupatla(Bracketed):
    """Chandrupatla's hybrid of inverse quadratic interpolation and bisection.

    Keeps the bracket (x, xo) and the point x3 dropped last. Inverse quadratic
    interpolation through the three is used only where it is safe: with
    xi = (x - xo)/(x3 - xo) and phi = (f - fo)/(f3 - fo), when
    phi**2 < xi and (1 - phi)**2 < 1 - xi; otherwise the step is a bisection.
    One evaluation per iteration, the bracket always kept.

    References
    ----------
    .. [1] Chandrupatla, T. R., "A new hybrid quadratic/bisection algorithm for finding
       the zero of a nonlinear function without using derivatives", Advances in
       Engineering Software 28(3):145-149, 1997.
    .. [2] Brent, R. P., *Algorithms for Minimization without Derivatives*,
       Prentice-Hall, 1973, ch. 4 (the minimum step near the ends).
    """

    name = "chandrupatla"
    summary = "Chandrupatla's inverse quadratic / bisection hybrid (default)"

    def setup(self, v):
        v["x3"], v["f3"] = np.full(v["x"].shape, np.nan), np.full(v["x"].shape, np.nan)  # first step bisects

    def fraction(self, v):
        x1, f1, x2, f2, x3, f3 = v["x"], v["fx"], v["xo"], v["fo"], v["x3"], v["f3"]
        f12, f32 = f1 - f2, f3 - f2
        xi = (x1 - x2) / (x3 - x2)
        phi = f12 / f32
        safe = phi * phi < xi
        safe &= (1.0 - phi) ** 2 < 1.0 - xi
        # Inverse quadratic interpolation, as a fraction of x2 - x1; (x3 - x1)/(x2 - x1) = 1 - 1/xi.
        t = f3 / f12
        t += (1.0 - 1.0 / xi) * f2 / (f3 - f1)
        t *= f1 / f32
        t[~safe] = 0.5
        return t

    def remember(self, v, fz, flip):
        # The point leaving the trio: the old other end if z flips, else the old x.
        v["x3"], v["f3"] = np.where(flip, v["xo"], v["x"]), np.where(flip, v["fo"], v["fx"])
