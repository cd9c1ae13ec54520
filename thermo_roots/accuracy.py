"""Layer 7: how accurate each model is, region by region, against the reference equation.

:func:`accuracy_map` solves every model on one (T, P) grid, evaluates the fluid's
reference equation once on the same grid, and returns the deviations of one quantity
(``quantity=``: the molar volume, the enthalpy, the entropy, the isobaric heat capacity or
the speed of sound) point by point and summarised per region.

How each quantity's deviation is measured (:data:`MEASURES`):

* v, cp, w: relative, 100 (model - reference) / reference [%]. These never cross zero in a
  single phase, so the percentage is always meaningful.
* h: the difference model - reference per kilogram [kJ/kg]. An enthalpy's zero is a
  convention (the reference state), and h crosses it inside the map; a percentage of h would
  grow without bound there and change with the choice of zero, while the difference does
  neither: with the model on the reference equation's own zero (the default) and the same
  ideal-gas part, it is the cubic's error in the residual (departure) enthalpy.
* s: likewise the difference per kilogram, in J/(kg K) (an error of 5 kJ/kg in h at 300 K
  goes with about 17 J/(kg K) in s).

The summary's ``percent_within_1`` and ``percent_within_5`` are the percentage of a region's
points within 1 and 5 of the measure's unit: 1 % and 5 % for v, cp, w; 1 kJ/kg and 5 kJ/kg
for h; 1 and 5 J/(kg K) for s.

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
from .quantities import QUANTITIES
from .inversion import CAUTION, solve
from .models import MODELS, Model, peneloux_shift
from .reference import _check_run_options, _given, constant_warnings, evaluate_reference, reference_limits
from .sweeps import _values, check_log, check_points

#: Regions of the summary, by the reference's phase.
REGIONS = ("liquid", "vapor", "supercritical")


@dataclass(frozen=True)
class Measure:
    """How the deviation of one quantity from the reference is measured on a map.

    Attributes
    ----------
    quantity : str
        A name of the table of quantities ("v", "h", "s", "cp", "w").
    what : str
        The quantity in words, for titles ("molar volume").
    relative : bool
        True: 100 (model - reference) / reference [%]; False: model - reference in ``unit``.
    unit : str
        The deviation's unit as shown ("%", "kJ/kg").
    scale : float
        Multiplies the SI difference into ``unit`` (per mole to per kilogram is done first).
    sign : str
        What a positive deviation means, for the colour bar.
    """

    quantity: str
    what: str
    relative: bool
    unit: str
    scale: float = 1.0
    sign: str = ""

    def deviation(self, model, reference, molar_mass):
        """The deviation of model values from reference values (arrays, SI, per mole)."""
        model, reference = np.asarray(model, dtype=float), np.asarray(reference, dtype=float)
        with np.errstate(invalid="ignore", divide="ignore"):
            if self.relative:
                return 100.0 * (model - reference) / reference
            return (model - reference) / molar_mass * self.scale

    @property
    def label(self) -> str:
        """The colour bar's label: "Molar volume deviation from reference [%]"."""
        what = self.what[:1].upper() + self.what[1:]
        return f"{what} deviation [{self.unit}]" if self.relative else f"{what}, model − reference [{self.unit}]"


#: The measure of each quantity an accuracy map takes (``quantity=``); see the module's notes.
MEASURES = {
    "v": Measure("v", "molar volume", True, "%", sign="+ : model volume too large, density too low"),
    "h": Measure("h", "enthalpy", False, "kJ/kg", 1e-3, sign="+ : model enthalpy too high"),
    "s": Measure("s", "entropy", False, "J/(kg K)", 1.0, sign="+ : model entropy too high"),
    "cp": Measure("cp", "isobaric heat capacity", True, "%", sign="+ : model cp too large"),
    "w": Measure("w", "speed of sound", True, "%", sign="+ : model speed of sound too high"),
}


def measure(quantity) -> Measure:
    """The :class:`Measure` of ``quantity``; an InputError naming the allowed ones otherwise."""
    if isinstance(quantity, str) and quantity in MEASURES:
        return MEASURES[quantity]
    raise InputError(f"quantity={quantity!r} is not one an accuracy map measures; allowed: "
                     f"{', '.join(map(repr, MEASURES))} (molar volume, enthalpy, entropy, isobaric heat "
                     "capacity, speed of sound). Try quantity='cp'.")


def point_columns(quantity: str = "v") -> tuple:
    """Columns of :attr:`AccuracyMap.points` of a map of ``quantity``, in order:
    ``deviation`` in the measure's unit, and ``deviation_percent`` (the same values) where the
    measure is a percentage."""
    percent = ("deviation_percent",) if measure(quantity).relative else ()
    return ("model", "T", "P", f"{quantity}_model", f"{quantity}_reference", "deviation") + percent + (
        "phase_model", "phase_reference")


#: Columns of :attr:`AccuracyMap.points` of a molar-volume map, in order.
POINT_COLUMNS = point_columns("v")
#: Columns of :attr:`AccuracyMap.summary`, in order: the mean and largest |deviation| in the
#: measure's unit (``summary.attrs["units"]``), then the percentages (0-100) of a region's
#: points within 1 and 5 of that unit.
SUMMARY_COLUMNS = ("model", "region", "points", "phase_disagreements", "mean_abs_deviation", "max_abs_deviation",
                   "percent_within_1", "percent_within_5")


def model_label(model) -> str:
    """A short label that tells translated models apart: "PR", "PR + Péneloux",
    "SRK + c=3.1 cm³/mol"."""
    label = model.short_name or model.name
    c = float(model.c)
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
    if isinstance(models, (str, type, Model)):
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
        elif isinstance(item, type) and issubclass(item, Model):
            out.append(item(fluid))
        elif isinstance(item, Model):
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
        phase; columns :func:`point_columns` (for v: ``model, T, P, v_model, v_reference,
        deviation, deviation_percent, phase_model, phase_reference``; SI, units in
        ``attrs["units"]``). ``deviation`` is in the measure's unit (``attrs["deviation_unit"]``):
        100 (model - reference) / reference [%] for v, cp, w; (h_model - h_reference) / M in
        kJ/kg for h (see the module's notes).
    summary : pandas.DataFrame
        Per model and region (the reference's phase): ``points``,
        ``phase_disagreements``, ``mean_abs_deviation`` and ``max_abs_deviation`` in the
        measure's unit (over the points whose phase agrees: where the phases differ the
        deviation measures the saturation line's position, not the quantity),
        ``percent_within_1`` and ``percent_within_5`` (the percentage, 0 to 100, of all points
        in the region whose |deviation| is at most 1 and 5 of that unit; a point with the
        wrong phase counts as outside).
    models : tuple of str
        The model labels, in the order given.
    model_objects : tuple
        The models themselves, in the same order (plots draw their saturation curves).
    quantity : str
        The quantity mapped ("v", "h", "s", "cp", "w"); :attr:`measure` says how.
    """

    fluid: Fluid
    points: pd.DataFrame = field(repr=False)
    summary: pd.DataFrame = field(repr=False)
    models: tuple = ()
    model_objects: tuple = field(default=(), repr=False, compare=False)
    quantity: str = "v"

    @property
    def measure(self) -> Measure:
        """How this map's deviation is measured (its unit, relative or not)."""
        return measure(self.quantity)

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
        return cls(fluid=first.fluid, points=points, summary=_summarise(points, list(first.models), first.measure),
                   models=first.models, model_objects=first.model_objects, quantity=first.quantity)

    def best_by_region(self) -> pd.DataFrame:
        """The model of lowest mean |deviation| in each region (index: region; columns model,
        mean_abs_deviation [the measure's unit], percent_within_5 [% of the region's points], points)."""
        table = self.summary.dropna(subset=["mean_abs_deviation"])
        rows = table.loc[table.groupby("region", sort=False)["mean_abs_deviation"].idxmin()]
        rows = rows.set_index("region").reindex([r for r in REGIONS if r in set(rows["region"])])
        return rows[["model", "mean_abs_deviation", "percent_within_5", "points"]]

    def __repr__(self):
        return (f"AccuracyMap({self.fluid.name!r}, {self.measure.what}, models={list(self.models)}, "
                f"{len(self.points)} points, {self.points.attrs.get('excluded_points', 0)} grid points excluded)")

    def _repr_html_(self):
        title = html.escape(f"Accuracy of {', '.join(self.models)} for {self.fluid.name} against the reference "
                            f"equation ({self.measure.what}, deviation in {self.measure.unit})")
        table = self.summary.to_html(index=False, float_format=lambda x: f"{x:.3g}")
        return (f"<div><p><b>{title}</b></p>{table}"
                f"<p style='font-size:smaller'><b>Caution.</b> {html.escape(CAUTION)}</p></div>")


def accuracy_map(fluid, models=("PR", "SRK"), T=None, P=None, *, quantity="v", n=25, log=None, progress="auto",
                 executor=None, chunk_size=None) -> AccuracyMap:
    """Deviation of one quantity of each model from the reference equation over a (T, P) grid.

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
    quantity : {"v", "h", "s", "cp", "w"}
        What to compare: molar volume (default), enthalpy, entropy, isobaric heat capacity or
        speed of sound; the deviation is in % for v, cp, w, in kJ/kg for h and in J/(kg K)
        for s (see :data:`MEASURES`). For h and s the models must keep the reference
        equation's own zero (``reference_state="reference"``, the default).
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
    how = measure(quantity)
    check_points(n)
    check_log(log)
    _check_run_options(progress=progress, executor=executor, chunk_size=chunk_size)
    if not fluid.library_name:
        raise InputError(f"Fluid {fluid.name!r} has no reference equation (no library_name); an accuracy map "
                         "needs a library fluid (get_fluid).")
    instances = resolve_models(fluid, models)
    if not how.relative:
        other_zero = [model_label(m) for m in instances if m.reference_state != "reference"]
        if other_zero:
            raise InputError(f"An accuracy map of {how.what} compares it with the reference equation's at the same "
                             f"(T, P), so the models need its zero; {', '.join(other_zero)} use another "
                             "reference_state. Build them with reference_state='reference' (the default).")
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
    q = how.quantity
    reference_values = ref[q][keep]
    for label, model in zip(labels, instances):
        state = solve(model, T=TT[keep], P=PP[keep])
        values = np.atleast_1d(np.asarray(getattr(state, q), dtype=float))
        deviation = how.deviation(values, reference_values, fluid.molar_mass)
        frames.append(pd.DataFrame({
            "model": label, "T": TT[keep], "P": PP[keep], f"{q}_model": values, f"{q}_reference": reference_values,
            "deviation": deviation, "deviation_percent": deviation,
            "phase_model": np.atleast_1d(state.phase).astype(object),
            "phase_reference": ref["phase"][keep].astype(object),
        }))
    points = pd.concat(frames, ignore_index=True)[list(point_columns(q))]
    points.attrs.update(_attrs(fluid, labels, Ts, Ps, int((~keep).sum()), ref, how))
    notes = constant_warnings(fluid)
    points.attrs["reference_warnings"] = list(notes)
    for note in notes:
        warnings.warn(note, UserWarning, stacklevel=2)
    return AccuracyMap(fluid=fluid, points=points, summary=_summarise(points, labels, how), models=tuple(labels),
                       model_objects=tuple(instances), quantity=q)


def _attrs(fluid, labels, Ts, Ps, excluded, ref, how):
    from . import __version__

    reasons = pd.Series(ref["reason"][ref["reason"] != ""]).str.split(":").str[0].value_counts()
    two_phase = int(np.sum((ref["reason"] == "") & (ref["phase"] == "two-phase")))
    return {
        "fluid": fluid.name,
        "fluid_constants": {"Tc": fluid.Tc, "Pc": fluid.Pc, "omega": fluid.omega, "molar_mass": fluid.molar_mass,
                            "library_name": fluid.library_name},
        "models": list(labels),
        "quantity": how.quantity,
        "deviation_unit": how.unit,
        "units": {c: ("%" if c.endswith("_percent") else how.unit if c == "deviation" else
                      QUANTITIES[c.rsplit("_", 1)[0]].si_label if c.endswith(("_model", "_reference"))
                      and c not in ("phase_model", "phase_reference") else {"T": "K", "P": "Pa"}.get(c, ""))
                  for c in point_columns(how.quantity)},
        "T_grid": Ts.tolist(),
        "P_grid": Ps.tolist(),
        "excluded_points": excluded,
        "excluded_two_phase": two_phase,
        "excluded_reasons": {str(k): int(v) for k, v in reasons.items()},
        "version": __version__,
        "caution": CAUTION,
    }


def _summarise(points: pd.DataFrame, labels, how: Measure) -> pd.DataFrame:
    rows = []
    for label in labels:
        of_model = points[points["model"] == label]
        for region in REGIONS:
            part = of_model[of_model["phase_reference"] == region]
            if part.empty:
                continue
            agree = part["phase_model"] == part["phase_reference"]
            dev = part.loc[agree, "deviation"].abs()
            inside = part["deviation"].abs().where(agree, np.inf)
            rows.append({
                "model": label, "region": region, "points": len(part),
                "phase_disagreements": int((~agree).sum()),
                "mean_abs_deviation": float(dev.mean()) if len(dev) else math.nan,
                "max_abs_deviation": float(dev.max()) if len(dev) else math.nan,
                "percent_within_1": 100.0 * float((inside <= 1.0).mean()),
                "percent_within_5": 100.0 * float((inside <= 5.0).mean()),
            })
    summary = pd.DataFrame(rows, columns=list(SUMMARY_COLUMNS))
    summary.attrs["units"] = {"points": "", "phase_disagreements": "", "mean_abs_deviation": how.unit,
                              "max_abs_deviation": how.unit, "percent_within_1": "%", "percent_within_5": "%"}
    summary.attrs["quantity"] = how.quantity
    return summary
