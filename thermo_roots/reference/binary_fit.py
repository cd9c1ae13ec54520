"""Binary interaction parameters kᵢⱼ fitted to the reference mixture model's bubble points.

A cubic with kᵢⱼ = 0 puts the bubble pressure of many pairs several percent off (methane +
CO2, nitrogen + the alkanes, CO2 + the refrigerants: 5-30 %). :func:`fit_kij` finds the
one constant kᵢⱼ of a pair that brings a cubic's bubble pressures closest to the reference
mixture model's (CoolProp's HEOS backend, GERG-2008 type, see :mod:`.mixture`) at a small
grid of temperatures and liquid compositions:

    minimise  rms over the grid of ln(P_bubble,model(T, x; k) / P_bubble,reference(T, x))

by a coarse scan of k over |k| ≤ :data:`K_BOUND` and then Brent's bounded method
(``scipy.optimize.minimize_scalar``) between the best scan point's neighbours.
The grid (:func:`fit_grid`): reduced temperatures 0.60, 0.70 and 0.80 of the heavier
component (raised above both triple points), liquid mole fractions 0.10, 0.25 and 0.40 of
the lighter one; points where either model has no bubble point (beyond the mixture's
critical point, a reference solver failure) are left out and counted.

The shipped table (``thermo_roots/binary_parameters.json``, read by
:func:`thermo_roots.mixtures.fitted_binary_parameters` and by ``kij="fitted"`` on a model)
holds, per pair and cubic, the fitted k, the rms deviation in ln P at that k and at k = 0,
and the points used. It is regenerated, with the versions it was made with, by::

    python -m thermo_roots.reference.binary_fit

References
----------
Brent, R. P. (1973), Algorithms for Minimization without Derivatives, Prentice-Hall, ch. 5.
Kunz, O. & Wagner, W. (2012), J. Chem. Eng. Data 57, 3032-3091 (GERG-2008).
Michelsen, M. L. & Mollerup, J. M. (2007), Thermodynamic Models: Fundamentals and
Computational Aspects, 2nd ed., ch. 3 (kᵢⱼ of the classical mixing rule).
"""

from __future__ import annotations

import json
import math
import sys
from dataclasses import dataclass, field
from datetime import date

import numpy as np

from ..errors import InputError, WrongTypeError
from ..fluids import as_fluid
from ..mixtures import BINARY_TABLE_PATH, Mixture
from ..models import MODELS, Model

#: |kᵢⱼ| searched (published kᵢⱼ of cubics for these pairs lie within about ±0.2, common practice).
K_BOUND = 0.3
#: Points of the coarse scan of k over [-K_BOUND, K_BOUND] before Brent's method (k = 0 among them).
SCAN_POINTS = 13
#: The grid: reduced temperatures of the heavier component, liquid fractions of the lighter.
FIT_REDUCED_TEMPERATURES = (0.60, 0.70, 0.80)
FIT_LIGHT_FRACTIONS = (0.10, 0.25, 0.40)
#: Cubics the shipped table covers (every cubic family of :data:`thermo_roots.models.MODELS`).
FIT_MODELS = ("vdW", "RK", "SRK", "PR", "PR78")
#: Pairs in the shipped table: natural gas, LPG, CO2 streams, refrigerant blends.
TABLE_PAIRS = (
    ("methane", "ethane"), ("methane", "propane"), ("methane", "n-butane"), ("methane", "isobutane"),
    ("methane", "n-pentane"), ("methane", "nitrogen"), ("methane", "CO2"), ("methane", "hydrogen sulfide"),
    ("ethane", "propane"), ("ethane", "n-butane"), ("ethane", "nitrogen"), ("ethane", "CO2"),
    ("propane", "n-butane"), ("propane", "isobutane"), ("propane", "nitrogen"), ("propane", "CO2"),
    ("n-butane", "isobutane"), ("n-butane", "n-pentane"), ("nitrogen", "CO2"), ("CO2", "hydrogen sulfide"),
    ("ethane", "isobutane"), ("nitrogen", "n-butane"), ("CO2", "n-butane"), ("nitrogen", "isobutane"),
    ("CO2", "isobutane"), ("isobutane", "n-pentane"), ("nitrogen", "n-pentane"), ("CO2", "n-pentane"),
    ("R32", "R125"), ("R32", "R134a"), ("R125", "R134a"), ("R125", "R143a"), ("R32", "R1234yf"),
    ("R134a", "R1234yf"), ("R32", "R1234ze(E)"), ("CO2", "R32"), ("propane", "R134a"),
)


@dataclass(frozen=True)
class KijFit:
    """A fitted kᵢⱼ of one pair for one cubic, with how well it fits.

    Attributes
    ----------
    model : str
        The cubic's short name ("PR", "SRK", ...).
    pair : tuple of str
        The two components' library names, lighter (lower Tc) first.
    k : float
        The fitted kᵢⱼ [-].
    rms_ln_P : float
        rms of ln(P_model / P_reference) over the points at ``k`` [-] (0.01 is about 1 % in pressure).
    rms_ln_P_zero : float
        The same at kᵢⱼ = 0 [-], for comparison.
    T, x_light : ndarray
        The points used: temperature [K] and the lighter component's liquid mole fraction [-].
    P_reference, P_model : ndarray
        The reference's and the fitted model's bubble pressures there [Pa].
    dropped : int
        Grid points without a bubble point in one of the two models.
    at_bound : bool
        The minimum lies at ±K_BOUND: the pair is poorly described by one constant k.
    """

    model: str
    pair: tuple
    k: float
    rms_ln_P: float
    rms_ln_P_zero: float
    T: np.ndarray = field(repr=False)
    x_light: np.ndarray = field(repr=False)
    P_reference: np.ndarray = field(repr=False)
    P_model: np.ndarray = field(repr=False)
    dropped: int = 0
    at_bound: bool = False

    def __repr__(self) -> str:
        return (f"KijFit({self.model}, {self.pair[0]} + {self.pair[1]}: k = {self.k:.4f}, "
                f"rms ln P {self.rms_ln_P:.4f} (k = 0: {self.rms_ln_P_zero:.4f}), {len(self.T)} points)")

    def table_entry(self) -> dict:
        """The row of the shipped table for this fit (plain JSON types)."""
        return {"k": round(self.k, 6), "rms_ln_P": round(self.rms_ln_P, 6),
                "rms_ln_P_at_zero": round(self.rms_ln_P_zero, 6), "points": int(len(self.T)),
                "dropped": int(self.dropped), "at_bound": bool(self.at_bound)}


def _model_class(model):
    if isinstance(model, str):
        if model not in MODELS or not MODELS[model].takes_mixtures:
            cubics = [name for name, cls in MODELS.items() if cls.takes_mixtures]
            raise InputError(f"fit_kij: model={model!r} is not a cubic; give one of {', '.join(cubics)}.")
        return MODELS[model]
    if isinstance(model, type) and issubclass(model, Model) and model.takes_mixtures:
        return model
    raise WrongTypeError(f"fit_kij: model must be a cubic's class or short name ('PR', 'SRK', ...), not {model!r}.")


def _ordered(a, b):
    """The pair's Fluids, lighter (lower Tc) first."""
    fa, fb = as_fluid(a, "fit_kij"), as_fluid(b, "fit_kij")
    if fa.library_name is None or fb.library_name is None:
        raise InputError("fit_kij fits to the reference mixture model, which knows only library fluids; "
                         f"got {fa.name!r} and {fb.name!r}.")
    if fa.library_name == fb.library_name:
        raise InputError(f"fit_kij: {a!r} and {b!r} are one fluid; a pair needs two.")
    return (fa, fb) if fa.Tc <= fb.Tc else (fb, fa)


def fit_grid(light, heavy):
    """The (T [K], x_light [-]) points of a pair's fit (see the module docstring)."""
    floor = max(f.T_triple if f.T_triple is not None and math.isfinite(f.T_triple) else 0.0
                for f in (light, heavy)) + 5.0
    T = sorted({max(round(tr * heavy.Tc, 2), floor) for tr in FIT_REDUCED_TEMPERATURES})
    grid = [(t, x) for t in T for x in FIT_LIGHT_FRACTIONS]
    return np.array([g[0] for g in grid]), np.array([g[1] for g in grid])


def reference_bubble_pressures(light, heavy, T, x_light):
    """The reference mixture model's bubble pressures [Pa] at each (T, x_light); NaN where it fails."""
    from .mixture import reference_bubble_point

    P = np.full(len(T), np.nan)
    for i, (t, x) in enumerate(zip(T, x_light)):
        point = reference_bubble_point(Mixture([(light, x), (heavy, 1.0 - x)]), T=float(t))
        if point.available:
            P[i] = float(point.P)
    return P


def model_bubble_pressures(model_class, light, heavy, k, T, x_light):
    """A cubic's bubble pressures [Pa] with kᵢⱼ = k at each (T, x_light); NaN where it has none."""
    from ..equilibrium.saturation_points import bubble_point

    P = np.full(len(T), np.nan)
    for x in np.unique(x_light):
        rows = np.flatnonzero(x_light == x)
        model = model_class(Mixture([(light, float(x)), (heavy, 1.0 - float(x))]), kij=np.array([[0.0, k], [k, 0.0]]))
        point = bubble_point(model, T=T[rows])
        P[rows] = np.where(np.asarray(point.status) == "converged", point.P, np.nan)
    return P


def _rms_ln(P, P_ref):
    return float(np.sqrt(np.mean(np.log(P / P_ref) ** 2)))


def fit_kij(model, a, b, *, T=None, x_light=None, P_reference=None) -> KijFit:
    """Fit one cubic's kᵢⱼ of the pair (a, b) to the reference mixture model's bubble pressures.

    Parameters
    ----------
    model : str or CubicModel subclass
        "PR", "SRK", "PR78", "RK", "vdW" or the class.
    a, b : str or Fluid
        The pair (library fluids; the order does not matter).
    T, x_light : array_like, optional
        Temperatures [K] and liquid mole fractions [-] of the lighter component (lower Tc)
        to fit at; default :func:`fit_grid`.
    P_reference : array_like, optional
        The reference bubble pressures [Pa] at those points (to reuse them between cubics);
        default: computed by the reference mixture model (4-40 ms a point).

    Returns
    -------
    KijFit

    Raises
    ------
    InputError
        Fewer than three points where both models have a bubble point.
    """
    model_class = _model_class(model)
    light, heavy = _ordered(a, b)
    if (T is None) != (x_light is None):
        raise InputError("fit_kij: give both T and x_light, or neither (the default grid).")
    if T is None:
        T, x_light = fit_grid(light, heavy)
    T, x_light = np.asarray(T, dtype=float).ravel(), np.asarray(x_light, dtype=float).ravel()
    if T.shape != x_light.shape:
        raise InputError(f"fit_kij: T has {T.size} values and x_light {x_light.size}; give one x per T.")
    P_ref = (reference_bubble_pressures(light, heavy, T, x_light) if P_reference is None
             else np.asarray(P_reference, dtype=float).ravel())
    usable = np.isfinite(P_ref) & np.isfinite(model_bubble_pressures(model_class, light, heavy, 0.0, T, x_light))
    if usable.sum() < 3:
        raise InputError(f"fit_kij: {light.name} + {heavy.name} with {model_class.short_name}: only "
                         f"{int(usable.sum())} of {T.size} points have a bubble point in both models; give "
                         "temperatures and compositions below the mixture's critical line.")
    T_fit, x_fit, P_fit = T[usable], x_light[usable], P_ref[usable]

    def objective(k):
        P = model_bubble_pressures(model_class, light, heavy, k, T_fit, x_fit)
        # a point that loses its bubble point at this k (passes the critical line) is penalised, not dropped
        return _rms_ln(np.where(np.isfinite(P), P, 10.0 * P_fit), P_fit)

    from scipy.optimize import minimize_scalar

    # the rms need not be unimodal in k (a point crossing the critical line): a coarse scan
    # first, then Brent's bounded method between the best scan point's neighbours
    scan = np.linspace(-K_BOUND, K_BOUND, SCAN_POINTS)
    values = np.array([objective(k) for k in scan])
    i = int(np.argmin(values))
    best = minimize_scalar(objective, bounds=(scan[max(i - 1, 0)], scan[min(i + 1, scan.size - 1)]),
                           method="bounded", options={"xatol": 1e-5})
    k, rms = (float(best.x), float(best.fun)) if best.fun <= values[i] else (float(scan[i]), float(values[i]))
    P_model = model_bubble_pressures(model_class, light, heavy, k, T_fit, x_fit)
    return KijFit(model_class.short_name, (light.library_name, heavy.library_name), k, rms,
                  objective(0.0), T_fit, x_fit, P_fit, P_model, int(T.size - usable.sum()),
                  bool(abs(k) > K_BOUND - 1e-3))


def _versions() -> dict:
    import CoolProp
    import scipy

    from .. import __version__

    return {"thermo_roots": __version__, "CoolProp": CoolProp.__version__, "scipy": scipy.__version__}


def build_table(pairs=TABLE_PAIRS, models=FIT_MODELS, stream=sys.stdout) -> dict:
    """Fit every pair for every cubic; the table as written to ``binary_parameters.json``."""
    rows = []
    for a, b in pairs:
        light, heavy = _ordered(a, b)
        T, x = fit_grid(light, heavy)
        P_ref = reference_bubble_pressures(light, heavy, T, x)
        row = {"pair": [light.library_name, heavy.library_name], "fits": {}}
        for name in models:
            try:
                fit = fit_kij(name, light, heavy, T=T, x_light=x, P_reference=P_ref)
            except InputError as error:
                row["fits"][name] = {"failed": str(error)}
                print(f"{light.name} + {heavy.name} {name}: not fitted ({error})", file=stream)
                continue
            row["fits"][name] = fit.table_entry()
            print(repr(fit), file=stream)
        rows.append(row)
    return {"about": ("k_ij of the van der Waals one-fluid rule per cubic, fitted by a coarse scan and Brent's bounded method "
                      "to the reference mixture model's bubble pressures (CoolProp HEOS, GERG-2008 type): "
                      "minimum rms of ln(P_model/P_reference) over reduced temperatures "
                      f"{', '.join(f'{t:.2f}' for t in FIT_REDUCED_TEMPERATURES)} of the heavier component and "
                      f"liquid fractions {', '.join(f'{x:.2f}' for x in FIT_LIGHT_FRACTIONS)} of the lighter; "
                      "rms_ln_P 0.01 is about 1 % in pressure."),
            "command": "python -m thermo_roots.reference.binary_fit",
            "generated": date.today().isoformat(), "versions": _versions(), "pairs": rows}


def write_table(path=BINARY_TABLE_PATH, **options) -> dict:
    """Regenerate the shipped table (about a minute) and write it to ``path``."""
    table = build_table(**options)
    with open(path, "w", encoding="utf-8") as f:
        json.dump(table, f, indent=1)
        f.write("\n")
    return table


if __name__ == "__main__":
    write_table()
    print(f"written: {BINARY_TABLE_PATH}")
