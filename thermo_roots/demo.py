"""A terminal tour: solve the state points of an invented site and print them with their
roots and their distance from the reference equation.

Run as ``thermo-roots-demo`` (installed with the package) or ``python -m thermo_roots.demo``.
The site, its company and its equipment tags are invented for illustration.
"""

from __future__ import annotations

import argparse
import sys

import numpy as np

from . import CAUTION, MODELS, get_fluid, solve
from .errors import ThermoRootsError
from .reference import cross_check

#: Invented scenario: Harrowgate Cold Chain Ltd, Brannock Point terminal.
SITE = "Harrowgate Cold Chain Ltd, Brannock Point terminal (invented for illustration)"
DUTIES = (
    ("V-212 propane accumulator", "propane", dict(T="20 degC", P="7 barg")),
    ("TK-401 CO2 buffer tank", "CO2", dict(T="-20 degC", P="18 barg")),
    ("E-105 ammonia condenser outlet", "ammonia", dict(T="35 degC", quality=0.0)),
    ("PV-330 sample cylinder, 0.5 L with 0.2 kg CO2", "CO2", dict(T="40 degC", rho_mass="400 kg/m^3")),
)


def describe(tag: str, fluid_name: str, knowns: dict, model_name: str) -> str:
    """Text block for one duty: knowns, state, roots and the reference cross-check."""
    model = MODELS[model_name](get_fluid(fluid_name))
    state = solve(model, **knowns)
    given = ", ".join(f"{k} = {v}" for k, v in knowns.items())
    lines = [f"{tag} — {model.fluid.name}, {model.name}", f"  given: {given}"]
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
    return "\n".join(lines)


def _root_note(state, root) -> str:
    if len(state.roots) < 2 or root.kind == "unstable":
        return ""
    if state.phase == "two-phase":
        return "  <- saturated liquid" if root.kind == "liquid-like" else "  <- saturated vapour"
    return "  <- lowest Gibbs energy (the state)" if root.stable else "  (metastable here)"


def _deviations(check) -> str:
    parts = [(check.deviation_rho_percent, "density {:+.2f} %"),
             (check.deviation_P_percent, "pressure {:+.2f} %"),
             (check.deviation_T_K, "temperature {:+.2f} K")]
    shown = [fmt.format(value) for value, fmt in parts if np.isfinite(value)]
    return ", ".join(shown) if shown else "no comparable quantity"


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description="Solve and print the demo site's state points.")
    parser.add_argument("--model", default="PR", choices=sorted(MODELS),
                        help="equation of state (default PR, Peng-Robinson)")
    args = parser.parse_args(argv)
    print(SITE)
    print("=" * len(SITE))
    for tag, fluid_name, knowns in DUTIES:
        try:
            print(describe(tag, fluid_name, knowns, args.model))
        except ThermoRootsError as err:
            print(f"{tag}: {err}")
        print()
    print("CAUTION: " + CAUTION)
    return 0


if __name__ == "__main__":
    np.set_printoptions(precision=5)
    sys.exit(main())
