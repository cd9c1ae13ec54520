"""The energy pairs that call saturation: the same states, with less work.

The outside reference of the round trips is the model's own (T, P) state (its h and s from
the one caloric formula, checked against CoolProp elsewhere); the structural checks say what
work a solve does, never how long it takes (speed lives in benchmarks/).
"""

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.inversion import pairs_energy


def _states(m):
    """Liquid, vapor, supercritical and two-phase states of m [K, Pa, -]."""
    Tc, Pc = m.fluid.Tc, m.fluid.Pc
    single = [tr.solve(m, T=T, P=P) for T, P in ((0.7 * Tc, 0.5 * Pc), (0.9 * Tc, 0.05 * Pc), (1.3 * Tc, 2.0 * Pc))]
    wet = tr.solve(m, P=0.3 * Pc, quality=0.4)
    return single + [wet]


@pytest.mark.parametrize("cls", [tr.PengRobinson, tr.SoaveRedlichKwong, tr.VanDerWaals])
def test_h_s_round_trips_in_every_region(cls, propane):
    m = cls(propane)
    for st in _states(m):
        back = tr.solve(m, h=st.h, s=st.s, errors="raise")
        assert back.T == pytest.approx(st.T, rel=1e-9)
        assert back.P == pytest.approx(st.P, rel=1e-8)


def test_h_s_arrays_give_what_each_state_gives_alone(propane):
    # the few-states path (every doubling in one call) and the one-call-per-doubling path
    # (more states than _DOUBLINGS_AT_ONCE allows) find the same temperatures
    m = tr.PengRobinson(propane)
    states = _states(m)
    h = np.array([st.h for st in states])
    s = np.array([st.s for st in states])
    few = tr.solve(m, h=h, s=s)
    many = tr.solve(m, h=np.tile(h, 20), s=np.tile(s, 20))   # 80 states, 13 doublings each: above the limit
    assert h.size * 20 * 13 > pairs_energy._DOUBLINGS_AT_ONCE
    np.testing.assert_allclose(many.T.reshape(20, -1), np.broadcast_to(few.T, (20, h.size)), rtol=1e-12)
    for k, st in enumerate(states):
        assert few.T[k] == pytest.approx(tr.solve(m, h=st.h, s=st.s).T, rel=1e-12)


def test_h_s_solves_no_isentrope_state_twice(propane, monkeypatch):
    # the fix: the bracket's ends were solved by the bracketing and again by the root
    # finder's start; and each doubling was a (T, s) solve of its own. Now the doublings of
    # a single state are one vectorized (T, s) solve, and no temperature is solved twice
    # (the last solve, at the root, rebuilds the state there and is left out)
    m = tr.PengRobinson(propane)
    st = tr.solve(m, T=320.0, P=1.2e6)
    seen = []
    real = pairs_energy._from_T_energy

    def spy(model, flat, *args, **kwargs):
        seen.append(np.array(flat["T"], dtype=float))
        return real(model, flat, *args, **kwargs)

    monkeypatch.setattr(pairs_energy, "_from_T_energy", spy)
    back = tr.solve(m, h=st.h, s=st.s)
    assert back.T == pytest.approx(st.T, rel=1e-9)
    assert seen[0].size > 1   # every doubling at once
    solved = np.concatenate(seen[:-1])
    assert np.unique(solved).size == solved.size


def test_p_h_solves_each_bracket_end_once(propane, monkeypatch):
    # the fix: the ends of the temperature bracket were solved by the bracket's growth, again
    # for the outside check, and again by the root finder's start; now once each
    m = tr.PengRobinson(propane)
    st = tr.solve(m, T=500.0, P=2.0 * propane.Pc)   # above Pc: one segment, from the coldest T to 4 Tc
    temperatures, brackets = [], []
    real_caloric, real_find_root = pairs_energy._caloric_on_reference, pairs_energy.find_root

    def caloric_spy(model, T, *args, **kwargs):
        temperatures.append(np.array(T, dtype=float).ravel())
        return real_caloric(model, T, *args, **kwargs)

    def find_root_spy(f, bracket=None, **kwargs):
        brackets.append(tuple(np.array(end, dtype=float).ravel() for end in bracket))
        return real_find_root(f, bracket=bracket, **kwargs)

    monkeypatch.setattr(pairs_energy, "_caloric_on_reference", caloric_spy)
    monkeypatch.setattr(pairs_energy, "find_root", find_root_spy)
    back = tr.solve(m, P=st.P, h=st.h)
    assert back.T == pytest.approx(500.0, rel=1e-9)
    assert len(brackets) == 1
    solved = np.concatenate(temperatures)
    for end in brackets[0]:
        assert np.count_nonzero(solved == end[0]) == 1


@pytest.mark.parametrize("cls", [tr.PengRobinson, tr.RedlichKwong])
def test_p_h_and_p_s_round_trip_in_every_region(cls, propane):
    m = cls(propane)
    for st in _states(m):
        for back in (tr.solve(m, P=st.P, h=st.h, errors="raise"), tr.solve(m, P=st.P, s=st.s, errors="raise")):
            assert back.T == pytest.approx(st.T, rel=1e-9)
            assert back.v == pytest.approx(st.v, rel=1e-8)


@pytest.mark.parametrize("name", ["h", "s"])
def test_t_h_and_t_s_root_finders_solve_no_end_again(name, propane, monkeypatch):
    # the fix: the ends of the volume bracket, solved for the bracket check, were solved again
    # by the root finder's start; the (h, s) solve runs one such (T, s) solve per trial T
    m = tr.PengRobinson(propane)
    states = [tr.solve(m, T=T, P=P) for T, P in ((300.0, 3e6), (350.0, 2e5), (500.0, 2.0 * propane.Pc))]
    inside, ends, evaluated = [False], [], []
    real_energy_at, real_find_root = pairs_energy._energy_at, pairs_energy.find_root

    def energy_spy(model, T, x, which):
        if inside[0]:
            evaluated.append(np.array(x, dtype=float).ravel())
        return real_energy_at(model, T, x, which)

    def find_root_spy(f, bracket=None, **kwargs):
        ends.extend(np.array(end, dtype=float).ravel() for end in bracket)
        inside[0] = True
        try:
            return real_find_root(f, bracket=bracket, **kwargs)
        finally:
            inside[0] = False

    monkeypatch.setattr(pairs_energy, "_energy_at", energy_spy)
    monkeypatch.setattr(pairs_energy, "find_root", find_root_spy)
    for st in states:
        ends.clear(), evaluated.clear()
        back = tr.solve(m, T=st.T, **{name: getattr(st, name)})
        assert back.P == pytest.approx(st.P, rel=1e-8)
        assert ends and evaluated
        solved = np.concatenate(evaluated)
        assert not np.any(np.isin(solved, np.concatenate(ends)))
