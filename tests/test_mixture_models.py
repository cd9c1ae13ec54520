"""The cubics on a mixture: the van der Waals one-fluid rule, kᵢⱼ, ln φᵢ of each component.

Checked against the reference library's own cubic mixture backends (CoolProp "PR" and
"SRK", whose critical constants agree with thermo_roots' table to about 1e-8 relative,
so ln φᵢ agree to about 1e-6), against a finite-difference derivative of the total
residual Helmholtz energy (an independent route to ln φᵢ: Michelsen & Mollerup 2007,
Thermodynamic Models, 2nd ed., ch. 2, ln φᵢ = (∂(n a_res/RT)/∂nᵢ)_T,V − ln Z), and
against the pure fluid as the one-component case.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.equilibrium.fugacity import phase_fugacity
from thermo_roots.errors import InputError, MixtureNotSupportedError
from thermo_roots.mixtures import BinaryParameters
from thermo_roots.models import R, mixing_attraction

CP = pytest.importorskip("CoolProp.CoolProp")

GAS = {"methane": 0.85, "ethane": 0.08, "propane": 0.05, "nitrogen": 0.02}
COOLPROP_NAMES = {"methane": "Methane", "ethane": "Ethane", "propane": "Propane", "nitrogen": "Nitrogen",
                  "CO2": "CarbonDioxide", "n-butane": "n-Butane"}
KIJ = {("methane", "propane"): 0.03, ("ethane", "nitrogen"): 0.05}
MODELS = [(tr.PengRobinson, "PR"), (tr.SoaveRedlichKwong, "SRK")]


def _with_backend_constants(mixture, backend):
    """The same mixture made of Fluids carrying the backend's own Tc, Pc and ω, so the two
    models are the same equations with the same numbers and agree to rounding."""
    fluids = []
    for fluid in mixture.fluids:
        one = CP.AbstractState(backend, COOLPROP_NAMES[fluid.name])
        fluids.append(dataclasses.replace(fluid, name=fluid.name + " (backend constants)", Tc=one.T_critical(),
                                          Pc=one.p_critical(), omega=one.acentric_factor(), library_name=None))
    return tr.Mixture(list(zip(fluids, mixture.z)))


def _coolprop_ln_phi(backend, mixture, kij, T, P, phase):
    names = [COOLPROP_NAMES[n] for n in mixture.names]
    state = CP.AbstractState(backend, "&".join(names))
    state.set_mole_fractions(list(mixture.z))
    for (a, b), k in kij.items():
        state.set_binary_interaction_double(mixture.index(a), mixture.index(b), "kij", k)
    state.specify_phase(CP.iphase_gas if phase == "vapor" else CP.iphase_liquid)
    state.update(CP.PT_INPUTS, P, T)
    return np.log([state.fugacity_coefficient(i) for i in range(len(names))]), state.compressibility_factor()


@pytest.mark.parametrize("cls, backend", MODELS)
@pytest.mark.parametrize("T, P, phase", [(300.0, 5e6, "vapor"), (250.0, 1e5, "vapor"), (150.0, 4e6, "liquid"),
                                         (120.0, 1e6, "liquid")])
def test_ln_phi_of_each_component_agrees_with_the_reference_cubic_backend(cls, backend, T, P, phase):
    mixture = tr.Mixture(GAS)
    theirs, Z = _coolprop_ln_phi(backend, mixture, KIJ, T, P, phase)
    # thermo_roots' own constants (from the reference equations) differ from the backend's in
    # the 6th-8th digit: ln φ agree to that
    ours = phase_fugacity(cls(mixture, kij=KIJ), T, P, mixture.z, root=phase)
    assert np.allclose(ours.ln_phi, theirs, rtol=1e-5, atol=1e-6), (ours.ln_phi, theirs)
    assert float(ours.Z) == pytest.approx(Z, rel=1e-5)
    # with the backend's constants the two are one model: PR agreed to 1e-14 when this was
    # written, SRK to 4e-10 (a digit of the backend's own SRK constants, it seems)
    same = _with_backend_constants(mixture, backend)
    kij = {(same.fluids[mixture.index(a)], same.fluids[mixture.index(b)]): k for (a, b), k in KIJ.items()}
    ours = phase_fugacity(cls(same, kij=kij), T, P, same.z, root=phase)
    assert np.allclose(ours.ln_phi, theirs, rtol=1e-8, atol=1e-9), (ours.ln_phi, theirs)
    assert float(ours.Z) == pytest.approx(Z, rel=1e-8)


@pytest.mark.parametrize("cls", [tr.VanDerWaals, tr.RedlichKwong, tr.SoaveRedlichKwong, tr.PengRobinson])
@pytest.mark.parametrize("T, P, root", [(300.0, 5e6, "vapor"), (160.0, 5e6, "liquid")])
def test_ln_phi_is_the_derivative_of_the_total_residual_helmholtz_energy(cls, T, P, root):
    """ln φᵢ = (1/RT)(∂A_res/∂nᵢ)_T,V − ln Z with A_res(T, V, n) = N a_res(T, V/N, n/N),
    differenced numerically (central, step 1e-6 mol): an independent route to the formula."""
    mixture = tr.Mixture(GAS)
    model = cls(mixture, kij=KIJ, volume_shift=[1e-6, 2e-6, 0.0, -1e-6])
    phase = phase_fugacity(model, T, P, mixture.z, root=root)
    V, n = float(phase.v), mixture.z.copy()

    def total(moles):
        N = moles.sum()
        return N * model.at_composition(moles / N).residual_helmholtz(T, V / N)

    h = 1e-6
    derivative = np.array([(total(n + h * e) - total(n - h * e)) / (2 * h) for e in np.eye(len(n))])
    expected = derivative / (R * T) - np.log(float(phase.Z))
    assert np.allclose(phase.ln_phi, expected, rtol=0, atol=1e-7)


def test_the_phase_as_a_whole_has_the_mole_weighted_ln_phi():
    """Σ xᵢ ln φᵢ is ln φ of the mixture treated as one fluid at its composition (common practice)."""
    model = tr.PengRobinson(tr.Mixture(GAS), kij=KIJ)
    x = np.array([0.3, 0.3, 0.3, 0.1])
    phase = phase_fugacity(model, 200.0, 3e6, x)
    whole = model.at_composition(x).ln_phi(200.0, float(phase.v), 3e6)
    assert float(phase.g_res) == pytest.approx(whole, abs=1e-12)


@pytest.mark.parametrize("cls", [tr.VanDerWaals, tr.RedlichKwong, tr.SoaveRedlichKwong, tr.PengRobinson,
                                 tr.PengRobinson78])
def test_a_one_component_mixture_is_the_pure_fluid(cls):
    pure = cls("propane")
    single = cls(tr.Mixture({"propane": 1.0}))
    T, v = np.array([250.0, 300.0, 400.0]), np.array([1e-4, 2e-3, 5e-2])
    assert single.fluid is pure.fluid
    assert np.array_equal(single.pressure(T, v), pure.pressure(T, v))
    for ours, theirs in zip(single.residual_bundle(T, v), pure.residual_bundle(T, v)):
        assert np.array_equal(ours, theirs)
    # the mixing rule itself, for x = (1,), gives the pure a(T) to rounding
    a, da, d2a, psi = single.mixture_attraction(T, np.ones((3, 1)))
    assert np.allclose(a, pure.attraction(T)[0], rtol=1e-14)
    assert np.allclose(da, pure.attraction(T)[1], rtol=1e-13)
    assert np.allclose(d2a, pure.attraction_curvature(T), rtol=1e-12)
    # and ln φ of the one component is the pure ln φ at the same root
    phase = phase_fugacity(single, 300.0, 1e6, np.ones(1), root="vapor")
    assert float(phase.ln_phi[0]) == pytest.approx(pure.ln_phi(300.0, float(phase.v), 1e6), abs=1e-12)


def test_the_attraction_derivatives_in_temperature_are_those_of_a():
    """da/dT and d²a/dT² of the mixing rule against central differences of a(T)."""
    model = tr.PengRobinson(tr.Mixture(GAS), kij=KIJ)
    x = model.z
    h = 1e-3
    for T in (150.0, 300.0, 600.0):
        a = lambda t: float(model.mixture_attraction(t, x)[0])
        _, da, d2a, _ = model.mixture_attraction(T, x)
        assert float(da) == pytest.approx((a(T + h) - a(T - h)) / (2 * h), rel=1e-7)
        assert float(d2a) == pytest.approx((a(T + h) - 2 * a(T) + a(T - h)) / h**2, rel=1e-4)


def test_mixing_rule_by_the_double_sum():
    """a = ΣΣ xᵢxⱼ √(aᵢaⱼ)(1 − kᵢⱼ) written as the plain double loop (the definition)."""
    rng = np.random.default_rng(7)
    a_i = rng.uniform(0.1, 3.0, 4)
    k = np.array([[0, 0.1, -0.05, 0.02], [0.1, 0, 0.03, 0], [-0.05, 0.03, 0, 0.2], [0.02, 0, 0.2, 0]])
    x = rng.dirichlet(np.ones(4))
    expected = sum(x[i] * x[j] * np.sqrt(a_i[i] * a_i[j]) * (1 - k[i, j]) for i in range(4) for j in range(4))
    q = np.sqrt(a_i)
    a, _, _, psi = mixing_attraction(q, 0 * q, 0 * q, 1 - k, x)
    assert float(a) == pytest.approx(expected, rel=1e-14)
    assert np.allclose(psi, [sum(x[j] * np.sqrt(a_i[i] * a_i[j]) * (1 - k[i, j]) for j in range(4)) for i in range(4)])


def test_kij_as_a_mapping_a_matrix_or_binary_parameters_give_one_model():
    mixture = tr.Mixture(GAS)
    by_map = tr.PengRobinson(mixture, kij=KIJ)
    by_value = tr.PengRobinson(mixture, kij=BinaryParameters(KIJ))
    by_matrix = tr.PengRobinson(mixture, kij=by_map.kij)
    assert np.array_equal(by_map.kij, by_value.kij) and np.array_equal(by_map.kij, by_matrix.kij)
    assert by_map.kij[mixture.index("propane"), mixture.index("methane")] == 0.03
    assert tr.PengRobinson(mixture).pressure(300.0, 1e-3) != by_map.pressure(300.0, 1e-3)


def test_bad_kij_and_shifts_are_refused_with_what_to_give():
    mixture = tr.Mixture(GAS)
    with pytest.raises(InputError, match="not in the mixture"):
        tr.PengRobinson(mixture, kij={("methane", "CO2"): 0.1})
    with pytest.raises(InputError, match="symmetric"):
        tr.PengRobinson(mixture, kij=np.triu(np.full((4, 4), 0.1), 1))
    with pytest.raises(InputError, match="4 shifts"):
        tr.PengRobinson(mixture, volume_shift=1e-6)
    with pytest.raises(InputError, match="co-volume"):
        tr.PengRobinson(mixture, volume_shift=[1e-3, 0, 0, 0])
    assert np.all(tr.PengRobinson(mixture, volume_shift="peneloux")._c_i != 0)


def test_pure_fluid_calculations_refuse_a_mixture_model_and_say_what_to_use():
    model = tr.PengRobinson(tr.Mixture(GAS))
    with pytest.raises(MixtureNotSupportedError, match="mixture of 4 components"):
        tr.saturation(model, T=150.0)
    with pytest.raises(MixtureNotSupportedError):
        model.fluid
    assert model.formula_parameters() is None
    assert "methane" in repr(model)


def test_one_bad_state_in_an_array_leaves_the_others():
    model = tr.PengRobinson(tr.Mixture(GAS))
    T = np.array([300.0, np.nan, 200.0])
    phase = phase_fugacity(model, T, 2e6, model.z)
    assert np.isnan(phase.Z[1]) and np.all(np.isfinite(phase.Z[[0, 2]]))
    alone = phase_fugacity(model, 200.0, 2e6, model.z)
    assert phase.Z[2] == pytest.approx(float(alone.Z), rel=1e-14)


def test_a_mixture_at_low_pressure_has_the_reference_mixture_models_ideal_gas():
    """As P → 0 the caloric properties are the ideal-gas mixture's, Σ zᵢ (pure ideal parts)
    with the mixing entropy -R Σ zᵢ ln zᵢ: CoolProp's multiparameter mixture model at 10 Pa
    must agree. Its mixture uses CODATA's R where each pure fluid's equation has its own
    (methane's 8.31451): that moves h and cp by up to about 6e-6 relative, s by about
    5e-4 J/(mol K) (the same size as for the pure fluids, see tests/test_caloric.py)."""
    from thermo_roots.properties import caloric

    mixture = tr.Mixture({"methane": 0.85, "ethane": 0.1, "propane": 0.05})
    model = tr.PengRobinson(mixture)
    state = CP.AbstractState("HEOS", "Methane&Ethane&Propane")
    state.set_mole_fractions(list(mixture.z))
    for T in (200.0, 300.0, 450.0):
        state.update(CP.PT_INPUTS, 10.0, T)
        ours = caloric(model, T, 1.0 / state.rhomolar())
        assert ours.h == pytest.approx(state.hmolar(), rel=1e-5)
        assert ours.cp == pytest.approx(state.cpmolar(), rel=1e-5)
        assert ours.s == pytest.approx(state.smolar(), abs=2e-3)
        assert ours.w == pytest.approx(state.speed_sound(), rel=1e-5)
    # the entropy of mixing is in it: without it s would be off by R Σ z ln z = -4.4 J/(mol K)
    assert abs(model.molar_mass - state.molar_mass()) < 1e-9


def test_caloric_properties_of_phases_with_their_own_compositions():
    """caloric(model, T, v, x=...) of one state equals the model moved to that composition
    (at_composition) and solved alone; x = z for every state is the feed's own caloric.
    An identity of the mixing rule (a consistency check, common practice)."""
    from thermo_roots.properties import caloric

    gas = tr.Mixture({"methane": 0.85, "ethane": 0.08, "propane": 0.04, "nitrogen": 0.03})
    model = tr.PengRobinson(gas, kij={("methane", "nitrogen"): 0.03}, volume_shift="peneloux")
    T, v = np.array([200.0, 250.0, 300.0]), np.array([8e-5, 1e-3, 2e-2])
    x = np.array([[0.7, 0.1, 0.15, 0.05], [0.85, 0.08, 0.04, 0.03], [0.2, 0.3, 0.5, 0.0]])
    phases = caloric(model, T, v, x=x)
    for k in range(3):
        alone = caloric(model.at_composition(x[k]), T[k], v[k])
        for name in phases._fields:
            assert getattr(phases, name)[k] == pytest.approx(float(getattr(alone, name)), rel=1e-12, abs=1e-9), name
    feed, as_x = caloric(model, T, v), caloric(model, T, v, x=np.broadcast_to(model.z, (3, 4)))
    for name in feed._fields:
        np.testing.assert_allclose(getattr(as_x, name), getattr(feed, name), rtol=1e-12, atol=1e-9, err_msg=name)
