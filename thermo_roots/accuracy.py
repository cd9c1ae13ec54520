"""Layer 7: how accurate each model is, region by region, against the reference equation.

:func:`accuracy_map` solves every model on one (T, P) grid, evaluates the fluid's
reference equation once on the same grid, and returns the deviations of the molar volume
(equivalently of the density) point by point and summarised per region.

References
----------
Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp, the reference).
Peneloux, A., Rauzy, E. & Freze, R. (1982), Fluid Phase Equilib. 8, 7-23 (volume translation).
"""

from __future__ import annotations

import html
import math
import warnings
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from .errors import InputError
from .fluids import Fluid, get_fluid
from .inversion import CAUTION, solve
from .models import MODELS, CubicModel, IdealGas, peneloux_shift
from .reference import _check_run_options, _given, constant_warnings, evaluate_reference, reference_limits
from .sweeps import _values, check_log, check_points

#: Regions of the summary, by the reference's phase.
REGIONS = ("liquid", "vapor", "supercritical")
#: Columns of :attr:`AccuracyMap.points`, in order.
POINT_COLUMNS = ("model", "T", "P", "v_model", "v_reference", "deviation_percent", "phase_model", "phase_reference")
#: Columns of :attr:`AccuracyMap.summary`, in order; the last two are percentages (0-100) of a
#: region's points within 1 % and 5 % of the reference.
SUMMARY_COLUMNS = ("model", "region", "points", "phase_disagreements", "mean_abs_percent", "max_abs_percent",
                   "percent_within_1", "percent_within_5")
_POINT_UNITS = {"model": "", "T": "K", "P": "Pa", "v_model": "m3/mol", "v_reference": "m3/mol",
                "deviation_percent": "%", "phase_model": "", "phase_reference": ""}


def model_label(model) -> str:
    """A short label that tells translated models apart: "PR", "PR + Péneloux",
    "SRK + c=3.1 cm³/mol"."""
    label = model.short_name or model.name
    c = float(getattr(model, "c", 0.0))
    if not c:
        return label
    try:
        standard = peneloux_shift(model.family, model.fluid)
    except InputError:
        standard = math.nan
    if math.isclose(c, standard, rel_tol=1e-12):
        return f"{label} + Péneloux"
    return f"{label} + c={c * 1e6:.4g} cm³/mol"


def resolve_models(fluid, models) -> list:
    """Model instances for the fluid from classes, instances or short names ("PR", "SRK")."""
    if isinstance(models, (str, type, CubicModel, IdealGas)):
        models = [models]
    if not isinstance(models, (list, tuple)) and not hasattr(models, "__iter__"):
        raise TypeError(f"models must be a model or a list of them (classes, instances or short names such as "
                        f"['PR', 'SRK']); got {_given(models)}.")
    by_name = {k.lower(): cls for k, cls in MODELS.items()}
    out = []
    for item in models:
        if isinstance(item, str):
            cls = by_name.get(item.lower())
            if cls is None:
                raise InputError(f"Unknown model {item!r}; allowed: {', '.join(MODELS)} (or a model class or instance).")
            out.append(cls(fluid))
        elif isinstance(item, type) and issubclass(item, (CubicModel, IdealGas)):
            out.append(item(fluid))
        elif isinstance(item, (CubicModel, IdealGas)):
            if (item.fluid.Tc, item.fluid.Pc, item.fluid.omega) != (fluid.Tc, fluid.Pc, fluid.omega):
                raise InputError(f"The model {item!r} is for {item.fluid.name}, not {fluid.name}; build it for "
                                 f"{fluid.name} or pass its class.")
            out.append(item)
        else:
            raise InputError(f"{item!r} is not a model: give a class (PengRobinson), an instance or a short name.")
    if not out:
        raise InputError("accuracy_map needs at least one model.")
    return out


def _unique_labels(models):
    labels, seen = [], {}
    for m in models:
        label = model_label(m)
        seen[label] = seen.get(label, 0) + 1
        labels.append(label if seen[label] == 1 else f"{label} #{seen[label]}")
    return labels


@dataclass(frozen=True)
class AccuracyMap:
    """Deviations of models from the reference equation on a (T, P) grid.

    Attributes
    ----------
    fluid : Fluid
    points : pandas.DataFrame
        One row per model and grid point where the reference is available and single
        phase; columns ``model, T, P, v_model, v_reference, deviation_percent,
        phase_model, phase_reference`` (SI; units in ``attrs["units"]``).
        deviation_percent = 100 (v_model - v_reference) / v_reference.
    summary : pandas.DataFrame
        Per model and region (the reference's phase): ``points``,
        ``phase_disagreements``, ``mean_abs_percent`` and ``max_abs_percent`` (over the
        points whose phase agrees: where the phases differ the deviation measures the
        saturation line's position, not the density), ``percent_within_1`` and
        ``percent_within_5`` (the percentage, 0 to 100, of all points in the region whose
        |deviation| is at most 1 % and 5 %; a point with the wrong phase counts as outside).
    models : tuple of str
        The model labels, in the order given.
    model_objects : tuple
        The models themselves, in the same order (plots draw their saturation curves).
    """

    fluid: Fluid
    points: pd.DataFrame = field(repr=False)
    summary: pd.DataFrame = field(repr=False)
    models: tuple = ()
    model_objects: tuple = field(default=(), repr=False, compare=False)

    @classmethod
    def combine(cls, parts) -> "AccuracyMap":
        """One map from maps over consecutive temperature rows on the same pressures and models
        (as a panel computes a map chunk by chunk); the summary is worked out afresh."""
        first = parts[0]
        points = pd.concat([p.points for p in parts], ignore_index=True)
        points.attrs = dict(first.points.attrs)
        points.attrs["T_grid"] = [T for p in parts for T in p.points.attrs["T_grid"]]
        for key in ("excluded_points", "excluded_two_phase"):
            points.attrs[key] = sum(p.points.attrs.get(key, 0) for p in parts)
        reasons = {}
        for p in parts:
            for reason, count in p.points.attrs.get("excluded_reasons", {}).items():
                reasons[reason] = reasons.get(reason, 0) + count
        points.attrs["excluded_reasons"] = reasons
        return cls(fluid=first.fluid, points=points, summary=_summarise(points, list(first.models)),
                   models=first.models, model_objects=first.model_objects)

    def best_by_region(self) -> pd.DataFrame:
        """The model of lowest mean |deviation| in each region (index: region; columns model,
        mean_abs_percent, percent_within_5 [% of the region's points], points)."""
        table = self.summary.dropna(subset=["mean_abs_percent"])
        rows = table.loc[table.groupby("region", sort=False)["mean_abs_percent"].idxmin()]
        rows = rows.set_index("region").reindex([r for r in REGIONS if r in set(rows["region"])])
        return rows[["model", "mean_abs_percent", "percent_within_5", "points"]]

    def __repr__(self):
        return (f"AccuracyMap({self.fluid.name!r}, models={list(self.models)}, "
                f"{len(self.points)} points, {self.points.attrs.get('excluded_points', 0)} grid points excluded)")

    def _repr_html_(self):
        title = html.escape(f"Accuracy of {', '.join(self.models)} for {self.fluid.name} against the reference "
                            "equation (molar volume deviation, %)")
        table = self.summary.to_html(index=False, float_format=lambda x: f"{x:.3g}")
        return (f"<div><p><b>{title}</b></p>{table}"
                f"<p style='font-size:smaller'><b>Caution.</b> {html.escape(CAUTION)}</p></div>")


def accuracy_map(fluid, models=("PR", "SRK"), T=None, P=None, *, n=25, log=None, progress="auto",
                 executor=None, chunk_size=None) -> AccuracyMap:
    """Deviation of each model's molar volume from the reference equation over a (T, P) grid.

    Parameters
    ----------
    fluid : Fluid or str
        A library fluid (or its name).
    models : sequence of model classes, instances or short names
        E.g. ``("PR", "SRK", PengRobinson(fluid, volume_shift="peneloux"))``.
    T : range, optional
        Temperatures [K] (list, array, (start, stop) tuple or :func:`~thermo_roots.sweeps.between`);
        default from 0.5 Tc or the triple point, whichever is higher, to 1.5 Tc.
    P : range, optional
        Pressures [Pa]; default Pc/100 to 3 Pc, logarithmic.
    n : int
        Points per (start, stop) range.
    log : bool, optional
        Spacing of the ranges (default: logarithmic in P, linear in T).
    progress, executor, chunk_size
        For the reference evaluations, as in :mod:`thermo_roots.sweeps`.

    Returns
    -------
    AccuracyMap

    References
    ----------
    Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
    """
    if isinstance(fluid, str):
        fluid = get_fluid(fluid)
    if not isinstance(fluid, Fluid):
        raise TypeError(f"accuracy_map(fluid, ...) needs a library fluid or its name, e.g. get_fluid('propane') "
                        f"or 'propane'; got {_given(fluid)}.")
    check_points(n)
    check_log(log)
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size)
    if not getattr(fluid, "library_name", None):
        raise InputError(f"Fluid {fluid.name!r} has no reference equation (no library_name); an accuracy map "
                         "needs a library fluid (get_fluid).")
    instances = resolve_models(fluid, models)
    labels = _unique_labels(instances)
    limits = reference_limits(fluid)
    if T is None:
        T = (max(0.5 * fluid.Tc, limits["T_min"]), 1.5 * fluid.Tc)
    if P is None:
        P = (fluid.Pc / 100.0, 3.0 * fluid.Pc)
    Ts = _values(T, "T", molar_mass=None, n=n, log=log)
    Ps = _values(P, "P", molar_mass=None, n=n, log=log)
    TT, PP = (x.ravel() for x in np.meshgrid(Ts, Ps, indexing="ij"))
    ref, _ = evaluate_reference(fluid.library_name, "T,P", TT, PP, with_saturation=False, progress=progress,
                                executor=executor, chunk_size=chunk_size)
    keep = (ref["reason"] == "") & (ref["phase"] != "two-phase")
    frames = []
    for label, model in zip(labels, instances):
        state = solve(model, T=TT[keep], P=PP[keep])
        v_model = np.atleast_1d(state.v)
        frames.append(pd.DataFrame({
            "model": label, "T": TT[keep], "P": PP[keep], "v_model": v_model, "v_reference": ref["v"][keep],
            "deviation_percent": 100.0 * (v_model - ref["v"][keep]) / ref["v"][keep],
            "phase_model": np.atleast_1d(state.phase).astype(object),
            "phase_reference": ref["phase"][keep].astype(object),
        }))
    points = pd.concat(frames, ignore_index=True)[list(POINT_COLUMNS)]
    points.attrs.update(_attrs(fluid, labels, Ts, Ps, int((~keep).sum()), ref))
    notes = constant_warnings(fluid)
    points.attrs["reference_warnings"] = list(notes)
    for note in notes:
        warnings.warn(note, UserWarning, stacklevel=2)
    return AccuracyMap(fluid=fluid, points=points, summary=_summarise(points, labels), models=tuple(labels),
                       model_objects=tuple(instances))


def _attrs(fluid, labels, Ts, Ps, excluded, ref):
    from . import __version__

    reasons = pd.Series(ref["reason"][ref["reason"] != ""]).str.split(":").str[0].value_counts()
    two_phase = int(np.sum((ref["reason"] == "") & (ref["phase"] == "two-phase")))
    return {
        "fluid": fluid.name,
        "fluid_constants": {"Tc": fluid.Tc, "Pc": fluid.Pc, "omega": fluid.omega, "molar_mass": fluid.molar_mass,
                            "library_name": fluid.library_name},
        "models": list(labels),
        "units": dict(_POINT_UNITS),
        "T_grid": Ts.tolist(),
        "P_grid": Ps.tolist(),
        "excluded_points": excluded,
        "excluded_two_phase": two_phase,
        "excluded_reasons": {str(k): int(v) for k, v in reasons.items()},
        "version": __version__,
        "caution": CAUTION,
    }


def _summarise(points: pd.DataFrame, labels) -> pd.DataFrame:
    rows = []
    for label in labels:
        of_model = points[points["model"] == label]
        for region in REGIONS:
            part = of_model[of_model["phase_reference"] == region]
            if part.empty:
                continue
            agree = part["phase_model"] == part["phase_reference"]
            dev = part.loc[agree, "deviation_percent"].abs()
            inside = part["deviation_percent"].abs().where(agree, np.inf)
            rows.append({
                "model": label, "region": region, "points": len(part),
                "phase_disagreements": int((~agree).sum()),
                "mean_abs_percent": float(dev.mean()) if len(dev) else math.nan,
                "max_abs_percent": float(dev.max()) if len(dev) else math.nan,
                "percent_within_1": 100.0 * float((inside <= 1.0).mean()),
                "percent_within_5": 100.0 * float((inside <= 5.0).mean()),
            })
    summary = pd.DataFrame(rows, columns=list(SUMMARY_COLUMNS))
    summary.attrs["units"] = {"points": "", "phase_disagreements": "", "mean_abs_percent": "%",
                              "max_abs_percent": "%", "percent_within_1": "%", "percent_within_5": "%"}
    return summary
