"""solve() on a mixture: MixtureState, the phase-word rule, the dispatch of thermo_roots.solve.

Outside checks: the ideal-gas limit of h and s against the pure fluids' own solves
(the ideal mixture: h = Σ zᵢ hᵢ, s = Σ zᵢ sᵢ − R Σ zᵢ ln zᵢ at the same T and P; common
practice, e.g. Smith, Van Ness & Abbott, Introduction to Chemical Engineering
Thermodynamics, 7th ed., ch. 11); the lever rule against each equilibrium phase solved as
a feed of its own; the phase-identification parameter against the pure fluid's liquid and
vapour (Venkatarathnam & Oellrich 2011, Fluid Phase Equilib. 301, 225: Π > 1 liquid).
"""

from __future__ import annotations

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.equilibrium import phase_words as pw
from thermo_roots.equilibrium.mixture_state import MixtureState, solve_mixture
from thermo_roots.errors import ConvergenceError, InputError
from thermo_roots.inversion import solve as pure_solve
from thermo_roots.models import R

GAS6 = {"methane": 0.85, "ethane": 0.06, "propane": 0.03, "n-butane": 0.02, "nitrogen": 0.02, "CO2": 0.02}


@pytest.fixture(scope="module")
def gas6():
    return tr.PengRobinson(tr.Mixture(GAS6))


def test_solve_dispatches_a_mixture_and_leaves_a_pure_fluid_alone(gas6):
    s = tr.solve(gas6, T=200.0, P=3e6)
    assert isinstance(s, MixtureState) and s.phase == "two-phase"
    propane = tr.PengRobinson(tr.get_fluid("propane"))
    a, b = tr.solve(propane, T=300.0, P=1e6), pure_solve(propane, T=300.0, P=1e6)
    assert type(a) is type(b) and a.v == b.v and a.phase == b.phase
    assert "Mixtures" in tr.solve.__doc__ and "(P, h)" in tr.solve.__doc__


def test_units_as_text_equal_si(gas6):
    a = tr.solve(gas6, T="-40 degC", P="30 bar")
    b = tr.solve(gas6, T=233.15, P=3e6)
    assert a.vapor_fraction == pytest.approx(b.vapor_fraction, rel=1e-12)
    np.testing.assert_allclose(a.x, b.x, rtol=1e-12)
    assert a.knowns == {"T": pytest.approx(233.15), "P": pytest.approx(3e6)}


def test_natural_gas_above_its_cricondentherm_is_not_liquid(gas6):
    # issue 10: the reference library's cubic backend calls this state "liquid"
    s = tr.solve(gas6, T=300.0, P=5e6)
    assert s.phase in ("vapor", "supercritical")
    assert s.vapor_fraction == 1.0
    np.testing.assert_array_equal(s.x, gas6.z)
    np.testing.assert_array_equal(s.y, gas6.z)


def test_ideal_gas_limit_of_h_and_s_against_the_pure_solves(gas6):
    T, P = 320.0, 1e3   # 1 kPa: residual parts below 0.05 J/mol
    s = tr.solve(gas6, T=T, P=P)
    assert s.phase == "vapor"
    parts = [pure_solve(tr.PengRobinson(f), T=T, P=P) for f in gas6.components.fluids]
    z = gas6.z
    h = sum(zi * p.h for zi, p in zip(z, parts))
    entropy = sum(zi * p.s for zi, p in zip(z, parts)) - R * np.sum(z * np.log(z))
    assert s.h == pytest.approx(h, abs=0.05)
    assert s.s == pytest.approx(entropy, abs=1e-3)
    assert s.u == pytest.approx(s.h - P * s.v, abs=1e-6 * abs(s.h) + 1e-6)
    assert s.g == pytest.approx(s.h - T * s.s, abs=1e-6 * abs(s.h) + 1e-6)


def test_lever_rule_against_each_phase_solved_as_a_feed(gas6):
    s = tr.solve(gas6, T=210.0, P=3e6)
    assert s.phase == "two-phase"
    liquid = tr.solve(tr.PengRobinson(gas6.components.with_fractions(s.x, normalize=True)), T=210.0, P=3e6)
    vapour = tr.solve(tr.PengRobinson(gas6.components.with_fractions(s.y, normalize=True)), T=210.0, P=3e6)
    assert liquid.v == pytest.approx(s.v_liquid, rel=1e-8)
    assert vapour.v == pytest.approx(s.v_vapor, rel=1e-8)
    beta = s.vapor_fraction
    for name in ("h", "s", "u", "g"):
        expected = (1 - beta) * getattr(liquid, name) + beta * getattr(vapour, name)
        assert getattr(s, name) == pytest.approx(expected, rel=1e-8, abs=1e-6)
    assert s.v == pytest.approx((1 - beta) * s.v_liquid + beta * s.v_vapor, rel=1e-14)
    assert s.rho_mass == pytest.approx(float(gas6.z @ gas6.components.molar_masses) / s.v, rel=1e-12)
    assert s.h_mass == pytest.approx(s.h / float(gas6.z @ gas6.components.molar_masses), rel=1e-12)


def test_array_caloric_equals_the_one_composition_path(gas6):
    """h, s, cp, w of an array (each phase at its own composition, one call) equal
    properties.caloric of the model at that one composition, state by state."""
    from thermo_roots.properties import caloric

    T, P = np.meshgrid(np.linspace(190.0, 300.0, 4), np.linspace(1e6, 8e6, 4))
    s = tr.solve(gas6, T=T, P=P)
    assert np.all(s.status == "converged") and np.any(s.phase == "two-phase")
    for i in np.ndindex(T.shape):
        parts = []
        for v, comp, weight in ((s.v_liquid[i], s.x[i], 1.0 - s.vapor_fraction[i]),
                                (s.v_vapor[i], s.y[i], s.vapor_fraction[i])):
            if np.isfinite(v):
                parts.append((weight, caloric(gas6.at_composition(comp), T[i], v, P[i])))
        assert s.h[i] == pytest.approx(sum(w * c.h for w, c in parts), rel=1e-12, abs=1e-9)
        assert s.s[i] == pytest.approx(sum(w * c.s for w, c in parts), rel=1e-12, abs=1e-12)
        if len(parts) == 1:
            assert s.cp[i] == pytest.approx(parts[0][1].cp, rel=1e-12)
            assert s.w[i] == pytest.approx(parts[0][1].w, rel=1e-12)
        else:
            assert np.isnan(s.cp[i]) and np.isnan(s.w[i])


def test_each_phase_volume_is_a_root_of_its_cubic(gas6):
    s = tr.solve(gas6, T=200.0, P=3e6)
    assert np.nanmin(np.abs(s.liquid_roots - s.v_liquid)) < 1e-12 * s.v_liquid
    assert np.nanmin(np.abs(s.vapor_roots - s.v_vapor)) < 1e-12 * s.v_vapor
    assert set(s.roots) == {"liquid", "vapor"}
    one = tr.solve(gas6, T=300.0, P=1e5)
    assert np.all(np.isnan(one.liquid_roots)) and np.nanmin(np.abs(one.vapor_roots - one.v)) < 1e-12 * one.v


def test_arrays_in_arrays_out_with_a_bad_element(gas6):
    T = np.array([[200.0, np.nan, 250.0], [300.0, 180.0, 220.0]])
    s = tr.solve(gas6, T=T, P=3e6)
    assert np.shape(s.vapor_fraction) == (2, 3) and np.shape(s.x) == (2, 3, 6)
    assert s.phase[0, 1] == "not solved" and "T" in s.reason[0, 1]
    assert np.isnan(s.h[0, 1]) and np.isfinite(s.h[0, 0]) and np.isfinite(s.h[1, 2])
    assert any("not solved" in w for w in s.warnings)
    assert "1 not solved" in repr(s)
    with pytest.raises(InputError, match=r"index \(0, 1\)"):
        tr.solve(gas6, T=T, P=3e6, errors="raise")


def test_scalar_and_bad_knowns_raise(gas6):
    with pytest.raises(InputError, match="not a positive finite number"):
        tr.solve(gas6, T=-5.0, P=3e6)
    with pytest.raises(InputError, match=r"\(T, P\) today"):
        tr.solve(gas6, P=3e6, h=1000.0)
    with pytest.raises(InputError, match=r"\(T, P\) today"):
        tr.solve(gas6, T=300.0, rho=100.0)
    with pytest.raises(InputError, match="Unknown quantity"):
        tr.solve(gas6, T=300.0, pressure=3e6)
    with pytest.raises(InputError, match="branch"):
        tr.solve(gas6, T=300.0, P=3e6, branch="liquid")
    with pytest.raises(InputError, match="errors="):
        solve_mixture(gas6, T=300.0, P=3e6, errors="ignore")
    assert issubclass(ConvergenceError, InputError.__mro__[1])   # one family of errors


def test_display_has_the_caution_and_the_compositions(gas6):
    s = tr.solve(gas6, T=200.0, P=3e6)
    text = s._repr_html_()
    assert "Caution" in text and "licensed engineer" in text and "liquid x" in text and "two-phase" in text
    assert "vapor fraction=" in repr(s)
    rows = dict(s.summary())
    assert rows["Phase"] == "two-phase" and "kJ/kg" in rows["Specific enthalpy h"]
    assert "Caution" in tr.solve(gas6, T=[200.0, 300.0], P=3e6)._repr_html_()


# --------------------------------------------------------------------------- the phase-word rule

def test_phase_word_rule_cases():
    word = pw.mixture_phase_word
    assert word(300.0, 1e6, 0.5, 200.0, 4.6e6) == "vapor"                 # above T_pc, below P_pc
    assert word(300.0, 6e6, 5.0, 200.0, 4.6e6) == "supercritical"         # above both, whatever Π
    assert word(150.0, 6e6, 1.5, 200.0, 4.6e6) == "liquid"                # below T_pc, Π > 1
    assert word(150.0, 1e5, 0.3, 200.0, 4.6e6) == "vapor"                 # below T_pc, Π < 1
    assert word(150.0, 1e5, float("nan"), 200.0, 4.6e6) == "vapor"        # Π unknown
    assert word(150.0, 1e5, 3.0, 200.0, 4.6e6, two_phase=True) == "two-phase"
    words = pw.phase_words([300.0, 150.0], [6e6, 6e6], [5.0, 1.5], 200.0, 4.6e6)
    assert list(words) == ["supercritical", "liquid"]


def test_the_reference_uses_the_same_rule():
    from thermo_roots.reference import mixture as reference_mixture

    assert reference_mixture.mixture_phase_word is pw.mixture_phase_word
    assert reference_mixture.pseudo_critical is pw.pseudo_critical


def test_phase_identification_parameter_tells_a_pure_liquid_from_its_vapour():
    model = tr.PengRobinson(tr.get_fluid("propane"))
    liquid, vapour = pure_solve(model, T=250.0, P=1e6), pure_solve(model, T=250.0, P=1e5)
    assert liquid.phase == "liquid" and vapour.phase == "vapor"
    assert pw.phase_identification_parameter(model, 250.0, liquid.v) > 1.0
    assert pw.phase_identification_parameter(model, 250.0, vapour.v) < 1.0


def test_phase_identification_parameter_at_per_state_compositions(gas6):
    """One array call at many compositions equals the model at each composition alone."""
    rng = np.random.default_rng(3)
    z = rng.dirichlet(np.ones(6), 5)
    T, v = np.linspace(150.0, 300.0, 5), np.linspace(6e-5, 1e-3, 5)
    together = pw.phase_identification_parameter(pw.model_at_compositions(gas6, z), T, v)
    alone = [pw.phase_identification_parameter(gas6.at_composition(z[i]), T[i], v[i]) for i in range(5)]
    np.testing.assert_allclose(together, alone, rtol=1e-12)
