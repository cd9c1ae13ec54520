"""How far a cubic's mixture state is from the reference mixture model at the same (T, P).

:func:`cross_check_mixture` takes a solved mixture state (``thermo_roots.solve`` on a
mixture model) and evaluates the reference mixture model (:mod:`.mixture`, CoolProp's HEOS
backend) at the same temperature, pressure and feed: density, Z, phase, vapor fraction and
the phase compositions side by side, with the deviations. ``cross_check`` hands mixture
states here.

The reference calls are slow (about 30-500 ms per state, see :mod:`.mixture`): an array of
states takes ``progress=`` and ``executor=`` like every reference batch.

References
----------
Kunz, O. & Wagner, W. (2012), J. Chem. Eng. Data 57, 3032-3091 (GERG-2008).
Bell, I. H. et al. (2014), Ind. Eng. Chem. Res. 53, 2498-2508 (CoolProp).
"""

from __future__ import annotations

import html
import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import WrongTypeError
from .comparison import LARGE_DEVIATION_LEGEND, LARGE_DEVIATION_PERCENT, LARGE_DEVIATION_STYLE
from .mixture import REFERENCE_MIXTURE_CAUTION, ReferenceMixtureState, reference_mixture_state

#: A vapor fraction or a mole fraction further than this from the reference's is marked (absolute) [-].
LARGE_FRACTION_DEVIATION = 0.05


def is_mixture_state(state) -> bool:
    """True for a solved state of a mixture model (what :func:`cross_check_mixture` takes)."""
    from ..equilibrium import MixtureState

    return isinstance(state, MixtureState)


@dataclass(frozen=True)
class MixtureCrossCheck:
    """A mixture state beside the reference mixture model's at the same T, P and feed.

    Shapes are the state's (compositions with one more axis, last). Deviations are model
    minus reference: densities and Z in percent of the reference, the vapor fraction and
    mole fractions as absolute differences (largest over the components for x and y).

    Attributes
    ----------
    state : the model's state
    reference : ReferenceMixtureState
    deviation_rho_percent, deviation_Z_percent : [%]
    phase_agrees : bool (False where either side is unavailable)
    deviation_vapor_fraction : [-] (NaN where either is one-phase supercritical or unavailable)
    deviation_x, deviation_y : largest |x_model - x_reference| over the components [-] (two
        phases on both sides only; NaN elsewhere)
    available : where the reference answered; reason : why not ("" where it did)
    """

    state: object = field(repr=False)
    reference: ReferenceMixtureState = field(repr=False)
    deviation_rho_percent: object
    deviation_Z_percent: object
    phase_agrees: object
    deviation_vapor_fraction: object
    deviation_x: object = field(repr=False)
    deviation_y: object = field(repr=False)
    available: object = field(repr=False)
    reason: object = field(repr=False)
    caution: str = field(repr=False, default=REFERENCE_MIXTURE_CAUTION)

    def to_frame(self):
        """One row per state: the model's and the reference's values and the deviations."""
        import pandas as pd

        s, r = self.state, self.reference
        columns = {
            "T_K": s.T, "P_Pa": s.P, "phase": s.phase, "reference_phase": r.phase,
            "rho_mol_m3": 1.0 / np.asarray(s.v), "reference_rho_mol_m3": r.rho,
            "deviation_rho_percent": self.deviation_rho_percent, "Z": s.Z, "reference_Z": r.Z,
            "deviation_Z_percent": self.deviation_Z_percent, "vapor_fraction": s.vapor_fraction,
            "reference_vapor_fraction": r.vapor_fraction, "deviation_vapor_fraction": self.deviation_vapor_fraction,
            "deviation_x": self.deviation_x, "deviation_y": self.deviation_y, "reason": self.reason,
        }
        return pd.DataFrame({k: np.ravel(np.asarray(v, dtype=object if k in ("phase", "reference_phase", "reason")
                                                    else float)) for k, v in columns.items()})

    def large_deviations(self) -> list[bool]:
        """Per row of :meth:`_rows` (a scalar check): beyond :data:`LARGE_DEVIATION_PERCENT` or
        :data:`LARGE_FRACTION_DEVIATION`, or phases that differ."""
        return [large for *_, large in self._rows()]

    def _rows(self):
        """(quantity, model, reference, deviation text, large) for a scalar check."""
        s, r = self.state, self.reference

        def pct(x):
            x = float(x)
            return ("-" if not math.isfinite(x) else f"{x:+.3g} %"), math.isfinite(x) and abs(x) > LARGE_DEVIATION_PERCENT

        def absolute(x):
            x = float(x)
            return ("-" if not math.isfinite(x) else f"{x:+.3g}"), math.isfinite(x) and abs(x) > LARGE_FRACTION_DEVIATION

        rows = [("phase", str(s.phase), str(r.phase) or "-", "same" if self.phase_agrees else "differs",
                 not bool(self.phase_agrees))]
        for label, mine, theirs, (text, large) in (
                ("density [kg/m³]", float(s.rho_mass), float(r.rho_mass), pct(self.deviation_rho_percent)),
                ("Z [-]", float(s.Z), float(r.Z), pct(self.deviation_Z_percent)),
                ("vapor fraction [-]", float(s.vapor_fraction), float(r.vapor_fraction),
                 absolute(self.deviation_vapor_fraction)),
                ("liquid x, largest difference", math.nan, math.nan, absolute(self.deviation_x)),
                ("vapor y, largest difference", math.nan, math.nan, absolute(self.deviation_y))):
            rows.append((label, _number(mine), _number(theirs), text, large))
        return rows

    def __repr__(self) -> str:
        if np.ndim(self.deviation_rho_percent) > 0:
            return (f"MixtureCrossCheck({np.size(self.deviation_rho_percent)} states, "
                    f"{int(np.sum(self.available))} with a reference)")
        if not self.available:
            return f"MixtureCrossCheck(reference unavailable: {self.reason})"
        lines = ["MixtureCrossCheck at the same T, P and feed (model vs reference mixture model)"]
        lines += [f"  {q:<30} {m:>12} {ref:>12} {d:>10}{'  <- large' if large else ''}"
                  for q, m, ref, d, large in self._rows()]
        return "\n".join(lines + [self.caution])

    def _repr_html_(self) -> str:
        if np.ndim(self.deviation_rho_percent) > 0:
            return self.to_frame()._repr_html_()
        if not self.available:
            return f"<p>Reference mixture model unavailable: {html.escape(str(self.reason))}</p>"
        cells = []
        for q, m, ref, d, large in self._rows():
            style = f" style='{LARGE_DEVIATION_STYLE}'" if large else ""
            cells.append(f"<tr><td>{html.escape(q)}</td><td>{html.escape(m)}</td><td>{html.escape(ref)}</td>"
                         f"<td{style}>{html.escape(d)}</td></tr>")
        return ("<table><caption>Model against the reference mixture model at the same T, P and feed</caption>"
                "<tr><th>quantity</th><th>model</th><th>reference</th><th>deviation</th></tr>"
                f"{''.join(cells)}</table><p style='font-size:smaller'>{html.escape(LARGE_DEVIATION_LEGEND)} "
                f"{html.escape(self.caution)}</p>")


def _number(x) -> str:
    return "-" if not math.isfinite(x) else f"{x:.5g}"


def _percent(model, reference):
    with np.errstate(invalid="ignore", divide="ignore"):
        return 100.0 * (np.asarray(model, dtype=float) / np.asarray(reference, dtype=float) - 1.0)


def _scalar(x):
    x = np.asarray(x)
    return x.item() if x.ndim == 0 else x


def cross_check_mixture(state, *, progress=False, executor=None, chunk_size=None,
                        on_interrupt="raise") -> MixtureCrossCheck:
    """Compare a mixture state with the reference mixture model at the same T, P and feed.

    Parameters
    ----------
    state : MixtureState
        From :func:`thermo_roots.solve` on a mixture model, scalar or array.
    progress, executor, chunk_size, on_interrupt
        As in :func:`thermo_roots.reference.reference_mixture_state` (the reference calls
        take 30-500 ms each).

    Returns
    -------
    MixtureCrossCheck
        Unavailable where the reference mixture model has no answer (a pair it lacks, a
        flash of its own that fails), with the reason; never raises for such states.
    """
    if not is_mixture_state(state):
        raise WrongTypeError(f"cross_check_mixture takes a solved mixture state (thermo_roots.solve on a mixture "
                             f"model); got {type(state).__name__}.")
    reference = reference_mixture_state(state.model.components, state.T, state.P, progress=progress,
                                        executor=executor, chunk_size=chunk_size, on_interrupt=on_interrupt)
    available = np.asarray(reference.available, dtype=bool)
    mine_phase, their_phase = np.asarray(state.phase, dtype=object), np.asarray(reference.phase, dtype=object)
    agrees = available & (mine_phase == their_phase)
    two_both = available & (mine_phase == "two-phase") & (their_phase == "two-phase")
    with np.errstate(invalid="ignore"):
        d_beta = np.asarray(state.vapor_fraction, dtype=float) - np.asarray(reference.vapor_fraction, dtype=float)
        d_x = np.max(np.abs(np.asarray(state.x, dtype=float) - np.asarray(reference.x, dtype=float)), axis=-1)
        d_y = np.max(np.abs(np.asarray(state.y, dtype=float) - np.asarray(reference.y, dtype=float)), axis=-1)
    rho_model = 1.0 / np.asarray(state.v, dtype=float)
    return MixtureCrossCheck(
        state=state, reference=reference,
        deviation_rho_percent=_scalar(np.where(available, _percent(rho_model, reference.rho), np.nan)),
        deviation_Z_percent=_scalar(np.where(available, _percent(state.Z, reference.Z), np.nan)),
        phase_agrees=_scalar(agrees),
        deviation_vapor_fraction=_scalar(np.where(available, d_beta, np.nan)),
        deviation_x=_scalar(np.where(two_both, d_x, np.nan)),
        deviation_y=_scalar(np.where(two_both, d_y, np.nan)),
        available=_scalar(available), reason=reference.reason)
