"""A terminal tour: solve the state points of an invented site and print them with their
roots and their distance from the reference equation; with ``--lab``, then open the
notebooks in JupyterLab from a working copy.

Run as ``thermo-roots-demo`` (installed with the package) or ``python -m thermo_roots.demo``.
The site, its company and its equipment tags are invented for illustration. The site's
equipment data live here, in :data:`EQUIPMENT`, and nowhere else: the tour and the
notebooks read them from this module.
"""

from __future__ import annotations

import argparse
import os
import shutil
import subprocess
import sys
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from . import CAUTION, MODELS, get_fluid, solve
from .errors import InputError, ThermoRootsError
from .units import to_si

#: Invented scenario: Harrowgate Cold Chain Ltd, Brannock Point terminal.
SITE = "Harrowgate Cold Chain Ltd, Brannock Point terminal (invented for illustration)"


@dataclass(frozen=True)
class Equipment:
    """One item of the invented site: what it holds and the state it runs at.

    Parameters
    ----------
    tag, service : str
        Equipment tag ("V-212") and what it is ("propane accumulator").
    fluid : str
        Library name of the content (:func:`thermo_roots.get_fluid`).
    duty : dict
        The two knowns of its operating point, as text with units (``solve`` keywords).
    volume, charge : str, optional
        Internal volume and mass charged, for a closed vessel ("0.5 L", "0.30 kg").
    rated_pressure : str, optional
        The pressure the vessel is rated for (invented), gauge or absolute as written.
    highest_temperature : str, optional
        The warmest the vessel can get in service (invented).
    outlet_pressure : str, optional
        Where a valve, vent or compressor delivers to (invented).
    efficiency : float, optional
        Isentropic efficiency of a compressor or expander (invented).
    """

    tag: str
    service: str
    fluid: str
    duty: dict = field(default_factory=dict)
    volume: str | None = None
    charge: str | None = None
    rated_pressure: str | None = None
    highest_temperature: str | None = None
    outlet_pressure: str | None = None
    efficiency: float | None = None

    @property
    def title(self) -> str:
        return f"{self.tag} {self.service}"

    @property
    def fill_density(self) -> float:
        """Charged mass over internal volume [kg/m^3] (closed vessels only)."""
        if self.volume is None or self.charge is None:
            raise InputError(f"{self.tag} is not a closed vessel: it has no volume and charge.")
        return _in_si(self.charge, "kg") / _in_si(self.volume, "m**3")

    def knowns(self) -> dict:
        """The ``solve`` keywords of the operating point."""
        return dict(self.duty)


def _in_si(text: str, unit: str) -> float:
    from .units import registry

    return float(registry()(text).to(unit).magnitude)


#: The invented site's equipment, by tag: the one source for the tour and the notebooks.
EQUIPMENT = {
    "V-212": Equipment("V-212", "propane accumulator", "propane", dict(T="20 degC", P="7 barg")),
    "TK-401": Equipment("TK-401", "CO2 buffer tank", "CO2", dict(T="-20 degC", P="18 barg")),
    "E-105": Equipment("E-105", "ammonia condenser outlet", "ammonia", dict(T="35 degC", quality=0.0)),
    "PV-330": Equipment("PV-330", "CO2 sample cylinder", "CO2", dict(T="20 degC"),
                        volume="0.5 L", charge="0.30 kg", rated_pressure="100 barg",
                        highest_temperature="50 degC"),
    "XV-517": Equipment("XV-517", "CO2 vent valve on the liquid line", "CO2", dict(P="20 barg", quality=0.0),
                        outlet_pressure="1.01325 bar"),
    "K-101": Equipment("K-101", "propane refrigeration compressor", "propane", dict(P="2 bar", quality=1.0),
                       outlet_pressure="15 bar", efficiency=0.75),
}


@dataclass(frozen=True)
class MixtureDuty:
    """One item of the invented site that holds a mixture.

    Parameters
    ----------
    tag, service : str
        Equipment tag and what it is.
    composition : dict
        {library name: fraction}; mole fractions, or mass fractions where ``by_mass``.
    duty : dict
        The knowns of its operating point, as text with units.
    by_mass : bool
        The composition is in mass fractions (how refrigerant blends are specified).
    outlet_pressure : str, optional
        Where a valve or regulator delivers to (invented).
    """

    tag: str
    service: str
    composition: dict
    duty: dict = field(default_factory=dict)
    by_mass: bool = False
    outlet_pressure: str | None = None

    @property
    def title(self) -> str:
        return f"{self.tag} {self.service}"

    def mixture(self):
        """The content as a :class:`~thermo_roots.mixtures.Mixture` (mole fractions)."""
        from .mixtures import Mixture

        return Mixture.from_mass_fractions(self.composition) if self.by_mass else Mixture(self.composition)


#: The invented site's mixture duties, by tag (compositions invented, not a real gas analysis).
MIXTURE_EQUIPMENT = {
    "PCV-610": MixtureDuty("PCV-610", "fuel-gas letdown regulator to the boiler house",
                           {"methane": 0.882, "ethane": 0.061, "propane": 0.023, "n-butane": 0.009,
                            "isobutane": 0.005, "nitrogen": 0.012, "CO2": 0.008},
                           dict(T="8 degC", P="62 barg"), outlet_pressure="4.5 barg"),
    "V-640": MixtureDuty("V-640", "LPG flash drum", {"ethane": 0.05, "propane": 0.62, "isobutane": 0.09,
                                                    "n-butane": 0.24}, dict(T="22 degC", P="6.5 bar")),
    "E-220": MixtureDuty("E-220", "blast-freezer evaporator on R-407C", {"R32": 0.23, "R125": 0.25, "R134a": 0.52},
                         dict(P="2.6 bar"), by_mass=True),
}


def _duty(item: Equipment) -> tuple[str, str, dict]:
    knowns = item.knowns()
    title = item.title
    if item.volume is not None:
        knowns["rho_mass"] = item.fill_density
        title += f", {item.volume} with {item.charge}"
    return title, item.fluid, knowns


#: (title, fluid, knowns) of every item, in the order the tour prints them.
DUTIES = tuple(_duty(item) for item in EQUIPMENT.values())

_SHOWN_UNITS = {"degC": "°C", "kg/m^3": "kg/m³", "m^3": "m³"}


def _shown(value) -> str:
    if isinstance(value, str):
        for raw, nice in _SHOWN_UNITS.items():
            value = value.replace(raw, nice)
        return value
    return f"{value:.4g}"


def _given(knowns: dict) -> str:
    units = {"rho_mass": " kg/m³"}
    return ", ".join(f"{k} = {_shown(v)}{units.get(k, '') if not isinstance(v, str) else ''}"
                     for k, v in knowns.items())


def describe(tag: str, fluid_name: str, knowns: dict, model_name: str) -> str:
    """Text block for one duty: knowns, state, roots and the reference cross-check."""
    from .reference import cross_check

    model = MODELS[model_name](get_fluid(fluid_name))
    state = solve(model, **knowns)
    lines = [f"{tag} — {model.fluid.name}, {model.name}", f"  given: {_given(knowns)}"]
    lines += [f"  {label:<34} {value}" for label, value in state.summary()]
    for root in state.roots:
        lines.append(f"  root v = {root.v * 1e3:10.5g} L/mol   Z = {root.Z:8.5f}   {root.kind}"
                     f"{_root_note(state, root)}")
    check = cross_check(state)
    if check.available:
        lines.append(f"  reference (multiparameter equation): {check.reference_rho_mass:.5g} kg/m³, "
                     f"{check.reference_P / 1e5:.5g} bar, {check.reference_phase}")
        lines.append(f"  model deviates from it: {_deviations(check)}")
    else:
        lines.append(f"  reference unavailable: {check.reason}")
    item = EQUIPMENT.get(tag.split(" ", 1)[0])
    if item is not None and item.rated_pressure and "rho_mass" in knowns:
        lines.append("  " + rated_pressure_text(item, model))
    return "\n".join(lines)


def rated_pressure_temperature(item: Equipment, model) -> tuple[float, float]:
    """Temperature [K] at which the closed vessel's content reaches the rated pressure on heating,
    by the model and by the reference equation (NaN where the reference is unavailable).

    The content's density stays the fill density, so this is the (P, rho) -> T inversion
    of the model at the rated pressure.
    """
    from .reference import reference_state

    state = solve(model, P=item.rated_pressure, rho_mass=item.fill_density)
    ref = reference_state(model.fluid, P=state.P, v=model.fluid.molar_mass / item.fill_density,
                          with_saturation=False)
    return float(state.T), float(ref.T) if bool(ref.available) else float("nan")


def rated_pressure_text(item: Equipment, model) -> str:
    """One line: where the rated pressure is reached, against the warmest service temperature."""
    T, T_ref = rated_pressure_temperature(item, model)
    text = f"rated {_shown(item.rated_pressure)} is reached at {T - 273.15:.1f} °C on heating ({model.short_name}"
    text += f"; reference equation {T_ref - 273.15:.1f} °C)" if np.isfinite(T_ref) else ")"
    if item.highest_temperature:
        T_max = float(to_si(item.highest_temperature, "T"))
        verdict = "BELOW" if T < T_max else "above"
        text += f", {verdict} the warmest it can see ({_shown(item.highest_temperature)})"
    return text


# --------------------------------------------------------------------------- JupyterLab

#: The folder, beside the shipped notebooks, that JupyterLab opens: your copies, ignored by git.
WORK_FOLDER = "my-notebooks"
FIRST_NOTEBOOK = "01_state_point.ipynb"


def shipped_notebooks() -> Path:
    """The checkout's ``notebooks/`` folder (the package's parent, or the current folder)."""
    for base in (Path(__file__).resolve().parents[1], Path.cwd()):
        folder = base / "notebooks"
        if folder.is_dir() and any(folder.glob("*.ipynb")):
            return folder
    raise InputError("No notebooks/ folder found beside the package or in the current folder; "
                     "run thermo-roots-demo --lab from a clone of the repository.")


def working_copy(source: Path | None = None, target: Path | None = None) -> tuple[Path, list[str], list[str]]:
    """Copy the shipped notebooks into the working folder, never overwriting a copy there.

    Returns (the working folder, the notebooks copied now, the notebooks kept as they were).
    Running and editing the copies leaves the tracked notebooks untouched.
    """
    source = source or shipped_notebooks()
    target = target or source.parent / WORK_FOLDER
    target.mkdir(parents=True, exist_ok=True)
    copied, kept = [], []
    for notebook in sorted(source.glob("*.ipynb")):
        mine = target / notebook.name
        if mine.exists():
            kept.append(notebook.name)
        else:
            shutil.copy2(notebook, mine)
            copied.append(notebook.name)
    return target, copied, kept


def running_as_root() -> bool:
    return hasattr(os, "geteuid") and os.geteuid() == 0


def lab_command(notebook: str = FIRST_NOTEBOOK, extra=()) -> list[str]:
    """The JupyterLab command line; as root (e.g. in a container) JupyterLab needs --allow-root.
    ``extra`` options go to JupyterLab as given (e.g. ``--ip=0.0.0.0`` to reach a container)."""
    root = ["--allow-root"] if running_as_root() and "--allow-root" not in extra else []
    return [sys.executable, "-m", "jupyterlab", notebook, *root, *extra]


def start_lab(folder: Path, extra=()) -> int:
    """Start JupyterLab in ``folder`` and wait until it is stopped (Ctrl-C)."""
    command = lab_command(extra=tuple(extra))
    print("Starting JupyterLab: python " + " ".join(command[1:]) + f"   (in {folder}; Ctrl-C stops it)")
    try:
        return subprocess.call(command, cwd=folder)
    except KeyboardInterrupt:
        return 0


def _open_lab(extra=()) -> int:
    try:
        folder, copied, kept = working_copy()
    except (InputError, OSError) as err:
        print(f"Cannot open the notebooks: {err}")
        return 1
    print(f"Notebooks: working copies in {folder} (git ignores this folder; the tracked notebooks stay clean).")
    if copied:
        print("  copied: " + ", ".join(copied))
    if kept:
        print("  kept your copies of: " + ", ".join(kept)
              + f" (delete one from {folder.name}/ to get the shipped version back)")
    return start_lab(folder, extra)


def _root_note(state, root) -> str:
    if len(state.roots) < 2 or root.kind == "unstable":
        return ""
    if state.phase == "two-phase":
        return "  <- saturated liquid" if root.kind == "liquid-like" else "  <- saturated vapor"
    return "  <- lowest Gibbs energy (the state)" if root.stable else "  (metastable here)"


def _deviations(check) -> str:
    parts = [(check.deviation_rho_percent, "density {:+.2f} %"),
             (check.deviation_P_percent, "pressure {:+.2f} %"),
             (check.deviation_T_K, "temperature {:+.2f} K")]
    shown = [fmt.format(value) for value, fmt in parts if np.isfinite(value)]
    return ", ".join(shown) if shown else "no comparable quantity"


def run_step(item: Equipment, model_name: str = "PR"):
    """The process step of a valve or compressor of the site: a steps.StepResult, or None."""
    if item.outlet_pressure is None:
        return None
    from . import steps

    model = MODELS[model_name](get_fluid(item.fluid))
    inlet = solve(model, **item.knowns())
    if item.efficiency is None:
        return steps.throttle(model, inlet, item.outlet_pressure)
    return steps.compress(model, inlet, item.outlet_pressure, efficiency=item.efficiency)


def step_text(item: Equipment, model_name: str = "PR") -> str:
    """Two lines on the item's step (outlet beside the reference's, work), its warnings."""
    result = run_step(item, model_name)
    if result is None:
        return ""
    out, ref = result.outlet, result.reference
    kind = "through the valve" if item.efficiency is None else f"compressed at efficiency {item.efficiency:g}"
    line = f"  {kind} to {item.outlet_pressure}: {out.T - 273.15:.1f} °C, {out.phase}"
    if out.phase == "two-phase":
        line += f", quality {out.quality:.3f}"
    if ref.available:
        line += f" (reference {ref.outlet.T - 273.15:.1f} °C)"
    if item.efficiency is not None:
        line += f"; work {result.work_mass / 1e3:.1f} kJ/kg"
    notes = [w for w in result.warnings if "two-phase region" not in w]
    return "\n".join([line] + [f"  warning: {w}" for w in notes])


def mixture_text(item: MixtureDuty, model_name: str = "PR") -> str:
    """Text block for one mixture duty: the letdown's outlet (with the reference mixture model's
    outlet beside it and the dew point), the drum's split, or the blend's glide."""
    from . import bubble_point, dew_point
    from .steps import throttle

    cls = MODELS[model_name]
    if not cls.takes_mixtures:
        return f"{item.title}: {model_name} has no mixing rule; the mixture duties use a cubic."
    model = cls(item.mixture(), kij="fitted")
    lines = [f"{item.title} — {' + '.join(model.components.names)}, {model.name} (fitted kij)"]
    if item.outlet_pressure is not None:
        inlet = solve(model, **item.duty)
        step = throttle(model, inlet, item.outlet_pressure)
        out, ref = step.outlet, step.reference
        dew = dew_point(model, P=out.P)
        lines.append(f"  {_given(item.duty)} -> {item.outlet_pressure}: outlet {out.T - 273.15:.1f} °C, {out.phase}"
                     + (f" (reference mixture model {ref.outlet.T - 273.15:.1f} °C)" if ref.available else ""))
        if dew.status == "converged":
            lines.append(f"  dew point at the outlet pressure {dew.T - 273.15:.1f} °C: "
                         f"{out.T - dew.T:+.1f} K of margin against liquid dropping out")
    elif "T" in item.duty:
        state = solve(model, **item.duty)
        lines.append(f"  {_given(item.duty)}: {state.phase}, vapor fraction {state.vapor_fraction:.3f}, "
                     f"{state.rho_mass:.4g} kg/m³ as a whole")
    else:
        bubble, dew = bubble_point(model, **item.duty), dew_point(model, **item.duty)
        lines.append(f"  {_given(item.duty)}: bubble point {bubble.T - 273.15:.1f} °C, dew point "
                     f"{dew.T - 273.15:.1f} °C, glide {dew.T - bubble.T:.1f} K")
    return "\n".join(lines)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description="Solve and print the demo site's state points; "
                                                 "with --lab, then open the notebooks in JupyterLab.")
    parser.add_argument("--model", default="PR", choices=sorted(MODELS),
                        help="equation of state (default PR, Peng-Robinson)")
    parser.add_argument("--lab", action="store_true",
                        help=f"after the tour, start JupyterLab on working copies of the notebooks "
                             f"(in {WORK_FOLDER}/, copied once, never overwritten); options after "
                             f"-- go to JupyterLab, e.g. -- --ip=0.0.0.0")
    argv = list(sys.argv[1:] if argv is None else argv)
    extra = argv[argv.index("--") + 1:] if "--" in argv else []
    args = parser.parse_args(argv[:argv.index("--")] if "--" in argv else argv)
    if extra and not args.lab:
        parser.error("options after -- are for JupyterLab: give them with --lab")
    print(SITE)
    print("=" * len(SITE))
    for tag, fluid_name, knowns in DUTIES:
        try:
            print(describe(tag, fluid_name, knowns, args.model))
            step = step_text(EQUIPMENT[tag.split(" ", 1)[0]], args.model)
            if step:
                print(step)
        except ThermoRootsError as err:
            print(f"{tag}: {err}")
        print()
    for item in MIXTURE_EQUIPMENT.values():
        try:
            print(mixture_text(item, args.model))
        except ThermoRootsError as err:
            print(f"{item.title}: {err}")
        print()
    print("CAUTION: " + CAUTION)
    if args.lab:
        print()
        return _open_lab(extra)
    return 0


if __name__ == "__main__":
    np.set_printoptions(precision=5)
    sys.exit(main())
