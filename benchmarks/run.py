"""Speed of thermo_roots side by side with what an engineer would otherwise call.

    python benchmarks/run.py            # full sizes, a few minutes on 2 cores
    python benchmarks/run.py --quick    # tiny sizes: proves the script works; ratios, no verdicts

Every comparison is measured in the same run, on the same states, as the best of several
repeats after a warm-up (time.perf_counter), ours and the alternative taking turns so
that a busy machine slows both alike. Only ratios are compared with targets: absolute
times move from machine to machine and with whatever else runs on it.

Checks (targets in brackets):
  1. (T, P) -> stable molar volume, Peng-Robinson, CO2, 220-500 K, 0.1-20 MPa, random:
     ``solve`` on arrays vs CoolProp's own Peng-Robinson backend called per state
     (>= 5x, goal 10x), and the pure-numpy path with its phase choice vs a plain numpy
     Cardano largest root without any phase choice, the arithmetic floor (<= 2x).
  2. Saturation pressure at 1000 temperatures, Tr 0.6-0.98: ``saturation`` vs CoolProp's
     Peng-Robinson backend per temperature (>= 10x, every temperature converged).
  3. (P, v) -> T at 1e5 states: our root finder vs scipy.optimize.elementwise.find_root
     on the same residual, bracket and tolerances (at least as fast, no more evaluations).
  4. Scaling of the (T, P) solve from 1e3 to 1e7 states: time per state flat (largest
     size within 1.5x of the best) and peak memory <= 300 bytes per state (tracemalloc).
  5. A fresh process: import plus one scalar state, whole-process time (< 2 s).
  6. (P, h) -> T at 1e5 states against CoolProp's own (P, h) solve of its reference equation
     per state (>= 10x, goal 30x, every state round-tripping to 1e-9).
  7. h, s, cp and w of 1e6 (T, P) states: at most 2x the (T, P) solve alone.
"""

from __future__ import annotations

import argparse
import datetime
import os
import platform
import subprocess
import sys
import time
import tracemalloc
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))   # the checkout's package, also when not installed

import thermo_roots as tr  # noqa: E402
from thermo_roots import _accel  # noqa: E402
from thermo_roots.inversion.state import _temperature_at  # noqa: E402

FLUID = "CO2"
T_RANGE, P_RANGE = (220.0, 500.0), (1e5, 2e7)
EPS = np.finfo(float).eps


# --------------------------------------------------------------------------- timing

def best_times(funcs, repeat):
    """Best wall time [s] of each function; one warm-up call each, then they take turns."""
    for f in funcs:
        f()
    best = [np.inf] * len(funcs)
    for _ in range(repeat):
        for i, f in enumerate(funcs):
            t0 = time.perf_counter()
            f()
            best[i] = min(best[i], time.perf_counter() - t0)
    return best


def random_states(n, seed=2024):
    rng = np.random.default_rng(seed)
    return rng.uniform(*T_RANGE, n), rng.uniform(*P_RANGE, n)


# --------------------------------------------------------------------------- alternatives

def coolprop_pr(name):
    import CoolProp

    return CoolProp, CoolProp.AbstractState("PR", name)


def same_equation_model():
    """Our Peng-Robinson with the constants CoolProp's PR backend uses, so both solve one equation."""
    _, ref = coolprop_pr(tr.get_fluid(FLUID).library_name)
    fluid = tr.Fluid(FLUID, ref.T_critical(), ref.p_critical(), ref.acentric_factor(), ref.molar_mass(),
                     tr.get_fluid(FLUID).library_name)
    return tr.PengRobinson(fluid)


def coolprop_densities(T, P):
    """Molar density [mol/m^3] from CoolProp's PR backend, one update per state (NaN on failure).

    The loop is kept as lean as Python allows (bound methods, a list, no numpy item writes),
    so that what is timed is CoolProp's own work.
    """
    CoolProp, state = coolprop_pr(tr.get_fluid(FLUID).library_name)
    update, rho, PT, nan = state.update, state.rhomolar, CoolProp.PT_INPUTS, float("nan")
    out = []
    append = out.append
    for t, p in zip(T.tolist(), P.tolist()):
        try:
            update(PT, p, t)
            append(rho())
        except ValueError:
            append(nan)
    return np.array(out)


def coolprop_saturation(T):
    """Saturation pressure [Pa] from CoolProp's PR backend per temperature (NaN on failure)."""
    CoolProp, state = coolprop_pr(tr.get_fluid(FLUID).library_name)
    update, pressure, QT, nan = state.update, state.p, CoolProp.QT_INPUTS, float("nan")
    out = []
    append = out.append
    for t in T.tolist():
        try:
            update(QT, 0.0, t)
            append(pressure())
        except ValueError:
            append(nan)
    return np.array(out)


def numpy_largest_root(model, T, P):
    """The floor: Peng-Robinson cubic in Z by Cardano / trigonometric form, largest root only.

    Plain whole-array numpy as a user would write it: no polishing, no other roots, no
    phase choice, no checks.
    """
    a, _ = model.attraction(T)
    RT = tr.R * T
    A, B = a * P / (RT * RT), model.b * P / RT
    c2, c1, c0 = B - 1.0, A - 3.0 * B * B - 2.0 * B, -(A * B - B * B - B * B * B)
    p = c1 - c2 * c2 / 3.0
    q = 2.0 * c2 * c2 * c2 / 27.0 - c2 * c1 / 3.0 + c0
    disc = q * q / 4.0 + p * p * p / 27.0
    with np.errstate(invalid="ignore", divide="ignore"):
        s = np.sqrt(np.maximum(disc, 0.0))
        one = np.cbrt(-q / 2.0 + s) + np.cbrt(-q / 2.0 - s)
        m = 2.0 * np.sqrt(np.maximum(-p / 3.0, 0.0))
        three = m * np.cos(np.arccos(np.clip(3.0 * q / (p * m), -1.0, 1.0)) / 3.0)
    Z = np.where(disc > 0.0, one, three) - c2 / 3.0
    return Z * RT / P


# --------------------------------------------------------------------------- the checks

#: Why a --quick run prints no verdicts (one line, printed under its table).
QUICK_NOTE = ("--quick: no PASS/FAIL, because at these sizes start-up and per-call overhead, not the "
              "solves, set the times; run without --quick to check the targets.")


class Table:
    """The result table; ``verdicts=False`` (a --quick run) leaves out the result column."""

    def __init__(self, verdicts=True):
        self.rows = []
        self.verdicts = verdicts

    def add(self, check, ours, other, ratio, target, passed, note=""):
        self.rows.append((check, ours, other, ratio, target, "PASS" if passed else "FAIL", note))

    def print(self):
        head = ("check", "ours", "alternative", "ratio", "target", "result", "note")
        if not self.verdicts:
            drop = head.index("result")
            self.rows = [r[:drop] + r[drop + 1:] for r in self.rows]
            head = head[:drop] + head[drop + 1:]
        widths = [max(len(str(r[i])) for r in self.rows + [head]) for i in range(len(head))]
        line = "  ".join("{:<%d}" % w for w in widths)
        print(line.format(*head))
        print(line.format(*("-" * w for w in widths)))
        for r in self.rows:
            print(line.format(*r))


def speed(ratio):
    """'8.2x faster' or '0.17x (slower)': the alternative's time over ours."""
    return f"{ratio:.2f}x faster" if ratio >= 1.0 else f"{ratio:.2f}x (slower)"


def us(seconds_per_state):
    return f"{seconds_per_state * 1e6:.3f} us"


def check_tp(table, model, n, sample, repeat):
    T, P = random_states(n)
    Ts, Ps = T[:sample], P[:sample]
    t_ours, t_floor = best_times([lambda: tr.solve(model, T=T, P=P),
                                  lambda: numpy_largest_root(model, T, P)], repeat)
    with _accel.disabled():
        t_numpy, = best_times([lambda: tr.solve(model, T=T, P=P)], repeat)
    t_cp, = best_times([lambda: coolprop_densities(Ts, Ps)], max(1, repeat // 2))
    per_ours, per_cp = t_ours / n, t_cp / sample
    ratio = per_cp / per_ours
    rho_cp = coolprop_densities(Ts, Ps)
    rho = tr.solve(model, T=Ts, P=Ps).rho
    ok = np.isfinite(rho_cp)
    agree = np.mean(np.abs(rho[ok] / rho_cp[ok] - 1.0) < 1e-8)
    engine = "compiled loop" if _accel.available() else "numpy (numba absent)"
    table.add(f"1a (T,P)->v, {n:.0e} states", us(per_ours), f"CoolProp PR {us(per_cp)}",
              speed(ratio), ">= 5x (goal 10x)", ratio >= 5.0,
              f"{engine}; " + (f"goal {'met' if ratio >= 10 else 'not met'}; " if table.verdicts else "")
              + f"{agree:.1%} of "
              f"{ok.sum()} CoolProp densities within 1e-8")
    slow = t_numpy / t_floor
    table.add(f"1b numpy path, {n:.0e} states", us(t_numpy / n), f"numpy largest root {us(t_floor / n)}",
              f"{slow:.2f}x the floor", "<= 2x", slow <= 2.0, "ours: all roots, polish, phase choice")


def check_saturation(table, model, n, repeat):
    Tc = model.fluid.Tc
    T = np.linspace(0.6, 0.98, n) * Tc
    t_ours, t_cp = best_times([lambda: tr.saturation(model, T=T), lambda: coolprop_saturation(T)], repeat)
    sat = tr.saturation(model, T=T)
    converged = bool(np.all(sat.convergence.converged)) and bool(np.all(np.isfinite(sat.P)))
    p_cp = coolprop_saturation(T)
    ok = np.isfinite(p_cp)
    diff = np.max(np.abs(sat.P[ok] / p_cp[ok] - 1.0)) if ok.any() else np.nan
    ratio = t_cp / t_ours
    table.add(f"2  Psat, {n} temperatures", us(t_ours / n), f"CoolProp PR {us(t_cp / n)}",
              speed(ratio), ">= 10x, all converged", ratio >= 10.0 and converged,
              f"converged {int(np.sum(sat.convergence.converged))}/{n}; CoolProp failed "
              f"{int((~ok).sum())}; max |dP/P| {diff:.1e}")
    return converged


def check_pv(table, model, n, repeat):
    from scipy.optimize import elementwise

    T, P = random_states(n, seed=7)
    v = tr.solve(model, T=T, P=P).v
    D = model._denominator(v)
    T_lo = P * (v - model.v_min) / tr.R
    a_lo, _ = model.attraction(T_lo)
    T_hi = (P + a_lo / D) * (v - model.v_min) / tr.R * (1.0 + 1e-12)   # the bracket solve() uses

    def gap(Tx, P_target, v_fixed):
        return model.pressure(Tx, v_fixed) / P_target - 1.0

    tol = dict(xatol=0.0, xrtol=4.0 * EPS, fatol=0.0, frtol=0.0)
    ours = lambda: _temperature_at(model, P, v)   # noqa: E731
    theirs = lambda: elementwise.find_root(gap, (T_lo, T_hi), args=(P, v), tolerances=tol, maxiter=200)  # noqa: E731
    t_ours, t_sp = best_times([ours, theirs], repeat)
    (T_ours, _, res_ours), res_sp = ours(), theirs()
    evals_ours, evals_sp = int(np.sum(res_ours.evaluations)), int(np.sum(res_sp.nfev))
    err = np.max(np.abs(T_ours / T - 1.0))
    ratio = t_sp / t_ours
    table.add(f"3  (P,v)->T, {n:.0e} states", us(t_ours / n), f"scipy find_root {us(t_sp / n)}",
              speed(ratio), ">= 1x, evals <= scipy's", ratio >= 1.0 and evals_ours <= evals_sp,
              f"evaluations {evals_ours / n:.2f} vs {evals_sp / n:.2f} per state; "
              f"max |T/T_true - 1| {err:.1e}; scipy converged {int(np.sum(res_sp.success))}/{n}")


def check_scaling(table, model, sizes, repeat):
    per_state, memory = {}, {}
    for n in sizes:
        T, P = random_states(n, seed=n)
        t, = best_times([lambda: tr.solve(model, T=T, P=P)], repeat if n < 10**7 else max(1, repeat // 2))
        per_state[n] = t / n
        tracemalloc.start()
        state = tr.solve(model, T=T, P=P)
        _, peak = tracemalloc.get_traced_memory()
        tracemalloc.stop()
        del state
        memory[n] = peak / n
    best = min(per_state.values())
    flat = per_state[sizes[-1]] <= 1.5 * best
    times = ", ".join(f"{n:.0e}: {per_state[n] * 1e9:.0f}" for n in sizes)
    mems = ", ".join(f"{n:.0e}: {memory[n]:.0f}" for n in sizes)
    table.add("4a scaling, ns/state", f"{per_state[sizes[-1]] * 1e9:.0f} ns at {sizes[-1]:.0e}",
              f"best {best * 1e9:.0f} ns", f"{per_state[sizes[-1]] / best:.2f}x the best",
              "<= 1.5x (flat)", flat, times)
    worst = max(memory.values())
    table.add("4b peak memory, B/state", f"{worst:.0f} B", "-", "-", "<= 300 B", worst <= 300.0, mems)


FIRST_CALL = ("import thermo_roots as tr; m = tr.PengRobinson({fluid}); "
              "s = tr.solve(m, T=300.0, P=5e6); assert s.phase == 'vapor'")


def check_first_call(table, repeat):
    def whole_process(code):
        best = np.inf
        for _ in range(repeat):
            t0 = time.perf_counter()
            subprocess.run([sys.executable, "-c", code], check=True, cwd=HERE.parent)
            best = min(best, time.perf_counter() - t0)
        return best

    library = whole_process(FIRST_CALL.format(fluid="tr.get_fluid('CO2')"))
    own = whole_process(FIRST_CALL.format(fluid="tr.Fluid('CO2', 304.1282, 7377300.0, 0.22394, 0.0440098)"))
    bare = whole_process("import numpy")
    coolprop = whole_process("import CoolProp")
    table.add("5a first call, get_fluid", f"{library:.2f} s", f"bare python+numpy {bare:.2f} s", "-",
              "< 2 s", library < 2.0, f"'import CoolProp' alone takes {coolprop:.2f} s")
    table.add("5b first call, own Fluid", f"{own:.2f} s", f"bare python+numpy {bare:.2f} s", "-",
              "< 2 s", own < 2.0, "constants given, no library lookup")


def check_energy(table, model, n, n_ref, n_caloric, repeat, rows=(6, 7)):
    """6. (P, h) -> T against the reference equation's own (P, h) solve per state (n states),
    and 7. the caloric properties of n_caloric (T, P) states against their solve alone."""
    if 6 in rows:
        T, P = random_states(n, seed=11)
        check_energy_inversion(table, model, T, P, n, n_ref, repeat)
    if 7 in rows:
        T, P = random_states(n_caloric, seed=11)
        check_caloric(table, model, T, P, n_caloric, repeat)


def check_energy_inversion(table, model, T, P, n, n_ref, repeat):
    import CoolProp

    state = tr.solve(model, T=T, P=P)
    h = state.h
    t_ours, = best_times([lambda: tr.solve(model, P=P, h=h)], max(1, repeat // 2))
    back = tr.solve(model, P=P, h=h)
    ref = CoolProp.AbstractState("HEOS", model.fluid.library_name)
    h_ref = []
    for Ti, Pi in zip(T[:n_ref], P[:n_ref]):
        ref.update(CoolProp.PT_INPUTS, Pi, Ti)
        h_ref.append(ref.hmolar())

    def theirs():
        for hi, Pi in zip(h_ref, P[:n_ref]):
            ref.update(CoolProp.HmolarP_INPUTS, hi, Pi)

    t_ref, = best_times([theirs], max(1, repeat // 2))
    ratio = (t_ref / n_ref) / (t_ours / n)
    trips = int(np.count_nonzero(np.isclose(back.T, T, rtol=1e-9)))
    table.add(f"6  (P,h)->T, {n:.0e} states", us(t_ours / n), f"CoolProp HEOS (P,h) {us(t_ref / n_ref)}",
              speed(ratio), ">= 10x (goal 30x), all round trips", ratio >= 10.0 and trips == n,
              f"round trips to 1e-9: {trips}/{n}; CoolProp timed on {n_ref} states")



def check_caloric(table, model, T, P, n, repeat):
    def solve_only():
        return tr.solve(model, T=T, P=P)

    def with_caloric():
        st = tr.solve(model, T=T, P=P)
        return st.h, st.s, st.cp, st.w

    t_solve, t_both = best_times([solve_only, with_caloric], repeat)
    factor = t_both / t_solve
    table.add(f"7  caloric, {n:.0e} states", us(t_both / n), f"(T,P) solve alone {us(t_solve / n)}",
              f"{factor:.2f}x the solve", "<= 2x", factor <= 2.0,
              "h, s, cp, w of every state; " + ("compiled caloric loop" if _accel.available() else "numpy path"))


def check_mixture_flash(table, quick):
    """Row 8: the (T, P) flash of a six-component natural gas (benchmarks/mixture_flash.py)."""
    from mixture_flash import mixture_flash_row

    row = mixture_flash_row(400, 6, 1) if quick else mixture_flash_row()
    table.add(f"8  mixture flash, {row['states']:.0e} states", f"{row['ours_us_per_state']:.1f} us",
              f"CoolProp PR mixture {row['reference_us_per_state_mean']:.0f} us", speed(row["ratio"]),
              f">= {row['target_ratio']:.0f}x", row["ratio"] >= row["target_ratio"] and
              row["converged"] == row["states"],
              f"{row['converged']}/{row['states']} converged, {row['two_phase']} two-phase; CoolProp on "
              f"{row['reference_states']} of them (mean), {row['phase_count_disagreements']} phase-count "
              f"disagreements, beta within {row['max_vapor_fraction_difference']:.1e}")


# --------------------------------------------------------------------------- main

def header():
    import CoolProp
    import scipy

    try:
        import numba
        numba_version = numba.__version__
    except ImportError:
        numba_version = "not installed"
    cpu = platform.processor() or platform.machine()
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    print(f"thermo_roots benchmark, {datetime.datetime.now():%Y-%m-%d %H:%M}")
    print(f"machine: {cpu}, {os.cpu_count()} cores, {platform.system()} {platform.release()}")
    print(f"python {platform.python_version()}, numpy {np.__version__}, scipy {scipy.__version__}, "
          f"CoolProp {CoolProp.__version__}, numba {numba_version}, thermo_roots {tr.__version__}")
    print(f"accelerator: {'compiled loop (numba)' if _accel.available() else 'off, numpy path'}")
    print()


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--quick", action="store_true", help="tiny sizes, for the test suite")
    parser.add_argument("--repeat", type=int, default=None, help="timed repeats per measurement")
    parser.add_argument("--checks", default="1,2,3,4,5,6,7,8",
                        help="comma-separated check numbers to run (default all), e.g. --checks 1,2,3,7")
    args = parser.parse_args(argv)
    try:
        checks = {int(x) for x in args.checks.split(",") if x.strip()}
    except ValueError:
        parser.error(f"--checks takes numbers 1-8 separated by commas, e.g. 1,2,3,7; got {args.checks!r}")
    if not checks or not checks <= set(range(1, 9)):
        parser.error(f"--checks takes numbers 1-8 separated by commas, e.g. 1,2,3,7; got {args.checks!r}")
    quick = args.quick
    repeat = args.repeat or (2 if quick else 5)
    header()
    model = same_equation_model()
    table = Table(verdicts=not quick)
    converged = None
    if 1 in checks:
        check_tp(table, model, n=4000 if quick else 10**6, sample=500 if quick else 20000, repeat=repeat)
    if 2 in checks:
        converged = check_saturation(table, model, n=50 if quick else 1000, repeat=repeat)
    if 3 in checks:
        check_pv(table, model, n=2000 if quick else 10**5, repeat=repeat)
    if 4 in checks:
        check_scaling(table, model, [10**3, 10**4] if quick else [10**3, 10**4, 10**5, 10**6, 10**7], repeat)
    if 5 in checks:
        check_first_call(table, repeat=1 if quick else 3)
    if checks & {6, 7}:
        check_energy(table, tr.PengRobinson(tr.get_fluid(FLUID)), n=2000 if quick else 10**5,
                     n_ref=200 if quick else 2000, n_caloric=2000 if quick else 10**6, repeat=repeat,
                     rows=tuple(sorted(checks & {6, 7})))
    if 8 in checks:
        check_mixture_flash(table, quick)
    table.print()
    print()
    print("Ratios from one run on a shared machine; repeat runs move them by 10-20 %.")
    if quick:
        print(QUICK_NOTE)
    if converged is not None:
        print(f"saturation converged everywhere: {converged}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
