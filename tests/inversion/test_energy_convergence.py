"""The convergence record and the messages of the energy pairs.

Every energy-pair solve iterates somewhere: a single-phase state by the solve for T (or for
v along an isotherm), a two-phase state of (P, h), (P, s), (T, h), (T, s) by the saturation
solve its closed-form quality rests on, (u, v) and (h, s) by the solve for T. State.convergence
carries that record in the caller's shape (a scalar record with its trace for a scalar solve
where the finder keeps one). The record's root is checked against the solved state in the
finder's own variable, so a record of some other iteration would fail.

Messages: an energy that cannot be reached is quoted on both bases (kJ/kg and kJ/mol), so
the value appears as the user typed it, with the limit in the same unit; the limit itself
is checked against the model's energies on a grid of states.
"""

import re

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.roots._result import ScalarTrace
from thermo_roots.widgets import StatePanel

PROPANE = tr.get_fluid("propane")
M = PROPANE.molar_mass
PR = tr.PengRobinson(PROPANE)

# one propane state per region (propane: Tc 369.9 K, Pc 42.5 bar; the regions as the model
# places them, asserted below): knowns from (T, P), or (T, quality) for the two-phase state
_REGIONS = {
    "liquid": dict(T=250.0, P=20e5),
    "vapor": dict(T=320.0, P=2e5),
    "supercritical": dict(T=420.0, P=60e5),
    "two-phase": dict(T=260.0, quality=0.4),
}
_PAIRS = (("P", "h"), ("P", "s"), ("T", "h"), ("T", "s"), ("h", "s"), ("u", "v"), ("u", "rho"))


def _state(region):
    st = tr.solve(PR, **_REGIONS[region])
    assert st.phase == region
    return st


def _knowns(st, pair):
    return {name: getattr(st, name) for name in pair}


def _finder_variable(st, pair):
    """What the record's root is for this state: T for the pairs solved in T and for the
    saturation temperature at P; ln(v - v_min) along an isotherm; ln P_sat for the
    saturation pressure at T (the fast path iterates in ln P)."""
    if set(pair) <= {"T", "h", "s"} and "T" in pair:
        if st.phase == "two-phase":
            return np.log(np.asarray(st.P))
        return np.log(np.asarray(st.v) - PR.v_min)
    return np.asarray(st.T)


@pytest.mark.parametrize("region", list(_REGIONS))
@pytest.mark.parametrize("pair", _PAIRS, ids="-".join)
def test_a_scalar_energy_solve_carries_its_finders_record(pair, region):
    st = _state(region)
    back = tr.solve(PR, **_knowns(st, pair))
    record = back.convergence
    assert record is not None, "an iterated solve must carry its record"
    assert record.is_scalar and record.status == "converged" and record.converged
    assert record.evaluations >= 1 and record.iterations >= 0
    if pair == ("T", "h") and back.phase != st.phase:
        # two pressures give this h at T: the lower is reported, ours is the other (see solve)
        assert back.P_other == pytest.approx(st.P, rel=1e-9)
    else:
        assert back.phase == st.phase
    # the record is the iteration behind this answer: its root is the state's, in the finder's
    # variable (round trip of the solve itself to 1e-9, as issue 9 asks)
    assert record.root == pytest.approx(float(_finder_variable(back, pair)), rel=1e-9, abs=1e-9)
    assert back.T == pytest.approx(st.T, rel=1e-9)
    if record.trace is not None:   # a scalar solve keeps the finder's iterates where it traces
        assert isinstance(record.trace, ScalarTrace) and len(record.trace) >= 1
        assert record.trace[-1].x == pytest.approx(record.root, rel=1e-6, abs=1e-9)


@pytest.mark.parametrize("pair", [("P", "h"), ("T", "s"), ("u", "v"), ("h", "s")], ids="-".join)
def test_a_scalar_single_phase_record_has_the_trace(pair):
    st = _state("vapor")
    record = tr.solve(PR, **_knowns(st, pair)).convergence
    assert isinstance(record.trace, ScalarTrace) and len(record.trace) >= 1
    assert record.trace[-1].x == pytest.approx(record.root, rel=1e-9, abs=1e-12)
    # a bracketed finder never loses the root: every traced bracket holds it (to rounding)
    slack = 1e-12 * abs(record.root) + 1e-15
    for step in record.trace:
        assert step.a - slack <= record.root <= step.b + slack


@pytest.mark.parametrize("pair", _PAIRS, ids="-".join)
def test_an_array_over_every_region_carries_one_record_in_the_callers_shape(pair):
    states = [_state(r) for r in _REGIONS]
    flat = {name: np.array([getattr(s, name) for s in states]) for name in pair}
    back = tr.solve(PR, **{k: x.reshape(2, 2) for k, x in flat.items()})
    record = back.convergence
    assert record is not None
    assert np.shape(record.root) == (2, 2) and np.shape(record.status) == (2, 2)
    assert np.all(record.status == "converged") and np.all(record.converged)
    assert np.all(np.asarray(record.evaluations) >= 1)
    one_by_one = [tr.solve(PR, **_knowns(s, pair)) for s in states]   # each element as a scalar solve
    expected = np.array([_finder_variable(s, pair) for s in one_by_one]).reshape(2, 2)
    np.testing.assert_allclose(record.root, expected, rtol=1e-9, atol=1e-9)
    assert list(np.asarray(back.phase).ravel()) == [s.phase for s in one_by_one]
    assert {s.convergence.method for s in one_by_one} == set(record.method.split("+"))
    if pair in (("P", "h"), ("P", "s"), ("T", "h"), ("T", "s")):
        # two finders reached these states: the record names both
        assert "+" in record.method


def test_a_bad_element_is_not_iterated_and_the_rest_keep_their_records():
    liquid, two = _state("liquid"), _state("two-phase")
    back = tr.solve(PR, P=np.array([liquid.P, np.nan, two.P]), h=np.array([liquid.h, 0.0, two.h]))
    record = back.convergence
    assert list(record.status) == ["converged", "not iterated", "converged"]
    assert list(record.converged) == [True, False, True]
    assert record.root[2] == pytest.approx(two.T, rel=1e-9)


def test_an_all_two_phase_array_is_the_saturation_record():
    qualities = np.array([0.1, 0.5, 0.9])
    st = tr.solve(PR, T=260.0, quality=qualities)
    back = tr.solve(PR, P=st.P, s=st.s)
    record = back.convergence
    assert record is not None and np.all(record.status == "converged")
    np.testing.assert_allclose(record.root, 260.0, rtol=1e-9)   # the saturation temperature at P
    np.testing.assert_allclose(back.quality, qualities, rtol=1e-9)


# --------------------------------------------------------------------------- messages


def _refusal(**knowns):
    with pytest.raises(tr.DomainError) as err:
        tr.solve(PR, **knowns)
    return str(err.value)


def _kj_per_kg(text, after):
    """The first number in kJ/kg after the words ``after``."""
    found = re.search(re.escape(after) + r"\D*?(-?[\d.]+(?:e[+-]?\d+)?) kJ/kg", text)
    assert found, text
    return float(found.group(1))


def test_a_T_h_refusal_quotes_the_typed_kJ_per_kg_and_the_minimum_in_kJ_per_kg():
    text = _refusal(T=300.0, h="-2000 kJ/kg")
    assert "-2000 kJ/kg" in text
    h_min = _kj_per_kg(text, "at least")
    # the isotherm's lowest h, from the model along a fine grid of volumes on the dense side
    # (h has one minimum along an isotherm, where mu_JT = 0: see pairs_energy)
    v = PR.v_min * (1.0 + np.geomspace(1e-3, 3.0, 4000))
    grid = tr.solve(PR, T=np.full(v.size, 300.0), v=v)
    lowest = np.nanmin(np.where(grid.phase != "two-phase", grid.h_mass, np.nan)) / 1e3
    assert h_min == pytest.approx(lowest, rel=1e-4)
    assert h_min <= lowest + 1e-5 * abs(lowest)   # the grid's lowest is never below the minimum (6 digits quoted)


def test_a_molar_value_is_quoted_as_typed_too():
    text = _refusal(T=300.0, h="-90 kJ/mol")
    assert "(-90 kJ/mol)" in text and "kJ/kg" in text


@pytest.mark.parametrize("knowns, typed", [
    (dict(P="5 bar", h="-3000 kJ/kg"), "-3000 kJ/kg"),
    (dict(P="5 bar", h_mass=-3.0e6), "-3000 kJ/kg"),
    (dict(P="5 bar", s="-50 kJ/(kg K)"), "-50 kJ/(kg K)"),
    (dict(T=300.0, s="30 kJ/(kg K)"), "30 kJ/(kg K)"),
    (dict(u="-5000 kJ/kg", rho_mass="500 kg/m3"), "-5000 kJ/kg"),
    (dict(h="-2000 kJ/kg", s="1 kJ/(kg K)"), "-2000 kJ/kg"),
], ids=["P-h", "P-h_mass", "P-s", "T-s", "u-rho", "h-s"])
def test_every_energy_refusal_quotes_the_value_as_typed(knowns, typed):
    text = _refusal(**knowns)
    assert typed in text, text


def test_the_P_h_range_quoted_is_the_models_between_the_bracket_ends():
    text = _refusal(P="5 bar", h="-3000 kJ/kg")
    assert "5 bar" in text
    ends = re.search(r"between ([\d.]+) K and ([\d.]+) K \(from (-?[\d.]+) kJ/kg .*? to (-?[\d.]+) kJ/kg", text)
    assert ends, text
    T_lo, T_hi, h_lo, h_hi = (float(x) for x in ends.groups())
    # the liquid segment ends at the saturation temperature at 5 bar: h there is the
    # saturated liquid's; at the cold end the liquid root's h
    sat = tr.solve(PR, P=5e5, quality=0.0)
    assert T_hi == pytest.approx(sat.T, rel=1e-3)
    assert h_hi == pytest.approx(sat.h_mass / 1e3, rel=1e-5)
    cold = tr.solve(PR, T=T_lo, P=5e5, branch="liquid")
    assert h_lo == pytest.approx(cold.h_mass / 1e3, rel=1e-3, abs=0.5)


def test_an_array_reason_quotes_both_bases():
    st = tr.solve(PR, T=np.array([300.0, 300.0]), h=np.array([-88e3, _state("vapor").h]))
    assert "kJ/kg" in st.reason[0] and "(-88 kJ/mol)" in st.reason[0]
    assert st.reason[1] == ""


# --------------------------------------------------------------------------- the state panel


def _panel(pair, **typed):
    panel = StatePanel(fluid="propane", model="PR")
    panel.pair.value = pair
    for name, text in typed.items():
        panel.fields[name].text.value = text
    state = panel.solve()
    return panel, state, re.sub(r"\s+", " ", re.sub("<[^>]+>", " ", panel.output.value))


@pytest.mark.parametrize("pair, typed, what", [
    (("P", "h"), dict(P="5 bar", h="300 kJ/kg"), "saturation"),
    (("T", "s"), dict(T="0 degC", s="1.5 kJ/(kg K)"), "saturation"),
    (("u", "rho"), dict(u="300 kJ/kg", rho="50 kg/m^3"), "the state with this u and rho"),
    (("P", "h"), dict(P="5 bar", h="700 kJ/kg"), "the state with this P and h"),
    (("u", "v"), dict(u="300 kJ/kg", v="0.5 L/mol"), "the state with this u and v"),
], ids=["P-h-two-phase", "T-s-two-phase", "u-rho-two-phase", "P-h-vapor", "u-v"])
def test_the_state_panel_shows_the_record(pair, typed, what):
    panel, state, text = _panel(pair, **typed)
    assert panel.error is None, panel.error
    record = state.convergence
    assert record is not None and record.status == "converged"
    assert "no iteration record" not in text
    assert f"Iterative ({what}): {record.method}," in text
    assert f"{record.evaluations} evaluation" in text and "converged" in text


def test_the_state_panel_message_quotes_the_typed_unit():
    panel, _, _ = _panel(("T", "h"), T="300 K", h="100 kJ/kg")   # below the isotherm's minimum of h
    assert panel.error is not None and "100 kJ/kg" in panel.error


@pytest.mark.parametrize("pair", [("P", "h"), ("P", "s"), ("T", "s"), ("h", "s"), ("u", "v")], ids="-".join)
def test_the_ideal_gas_solves_carry_their_record_too(pair):
    # the ideal gas has no saturation: one segment, solved in T (or in v along an isotherm)
    gas = tr.IdealGas(PROPANE)
    st = tr.solve(gas, T=320.0, P=2e5)
    back = tr.solve(gas, **_knowns(st, pair))
    record = back.convergence
    assert record is not None and record.status == "converged"
    assert back.T == pytest.approx(320.0, rel=1e-9) and back.P == pytest.approx(2e5, rel=1e-9)
    arrays = tr.solve(gas, **{k: np.full(3, v) for k, v in _knowns(st, pair).items()})
    assert np.shape(arrays.convergence.status) == (3,) and np.all(arrays.convergence.status == "converged")
