"""Residual (departure) enthalpy and entropy from a cubic against a published worked example.

Smith, J. M., Van Ness, H. C. & Abbott, M. M., Introduction to Chemical Engineering
Thermodynamics, 7th ed. (2005), section 6.7 (residual properties by cubic equations of
state), the worked example for n-butane gas at 500 K and 50 bar with the Redlich-Kwong
equation: Z = 0.685, H^R = -4505 J/mol, S^R = -6.546 J/(mol K). The values are recalled from
memory, as are the book's constants for n-butane (its Appendix B: Tc = 425.1 K,
Pc = 37.96 bar, omega = 0.200). The book's residual properties are at (T, P), measured from
the ideal gas at the same T and P, so S^R = s(T, P) - s_ideal(T, P).
"""

import numpy as np
import pytest

import thermo_roots as tr

# Its cp0 does not enter a residual property; any constant will do for the ideal part.
BUTANE = tr.Fluid("n-butane (book constants)", Tc=425.1, Pc=37.96e5, omega=0.200, molar_mass=0.0581222, cp0=100.0)
T, P = 500.0, 50e5


@pytest.fixture(scope="module")
def state():
    return tr.solve(tr.RedlichKwong(BUTANE), T=T, P=P)


def test_compressibility_factor(state):
    assert state.Z == pytest.approx(0.685, abs=6e-4)
    assert state.phase == "supercritical"   # Tr = 1.176, Pr = 1.317


def test_residual_enthalpy(state):
    h_res = state.h - BUTANE.ideal_gas.h0(T)
    assert h_res == pytest.approx(-4505.0, abs=2.0)


def test_residual_entropy_at_T_and_P(state):
    s_res = state.s - BUTANE.ideal_gas.s0(T, P)
    # 5e-3 (0.08 %): the book carries intermediate values to about four digits (its Z to
    # three, which alone moves R ln Z by 1.3e-3 J/(mol K)).
    assert s_res == pytest.approx(-6.546, abs=5e-3)


def test_the_same_numbers_from_the_model_functions(state):
    # The model's own residual functions are at (T, v): the (T, P) entropy adds R ln Z
    # (common practice: the two ideal-gas references differ in volume by the factor Z).
    m = tr.RedlichKwong(BUTANE)
    assert m.residual_enthalpy(T, state.v) == pytest.approx(state.h - BUTANE.ideal_gas.h0(T), rel=1e-9)
    s_res_TP = m.residual_entropy(T, state.v) + tr.R * np.log(state.Z)
    assert s_res_TP == pytest.approx(state.s - BUTANE.ideal_gas.s0(T, P), rel=1e-9, abs=1e-9)


# --------------------------------------------------------------------------- an independent implementation
# CoolProp's own Peng-Robinson and SRK backends (Bell et al. 2014, Ind. Eng. Chem. Res. 53, 2498;
# Bell & Jaeger 2016, J. Res. NIST 121, 238, the cubics as Helmholtz energies) give the reduced
# residual Helmholtz energy alphar(tau, delta) and its derivatives. With the same Tc, Pc, omega:
# h_res = R T (tau alphar_tau + delta alphar_delta), s_res = R (tau alphar_tau - alphar) and
# cv_res = -R tau^2 alphar_tautau at (T, v) (Span 2000, Multiparameter Equations of State, table 3.1).
# Measured: PR to 2e-14, SRK to 6e-10 (the same sign and size at every state, so a constant of
# CoolProp's SRK that differs from the critical conditions' in its last digits; not traced further).

@pytest.mark.parametrize("backend, cls, tol", [("PR", tr.PengRobinson, 1e-12), ("SRK", tr.SoaveRedlichKwong, 2e-9)])
@pytest.mark.parametrize("name", ["n-Propane", "CarbonDioxide", "Water"])
def test_residual_properties_against_coolprops_own_cubic(backend, cls, tol, name):
    CoolProp = pytest.importorskip("CoolProp")
    ref = CoolProp.AbstractState(backend, name)
    fluid = tr.Fluid(name, ref.T_critical(), ref.p_critical(), ref.acentric_factor(), ref.molar_mass())
    model = cls(fluid)
    R = ref.gas_constant()
    for Tr, rho in ((0.7, 0.4 / model.b), (1.2, 2000.0), (0.9, 50.0)):   # liquid, dense gas, dilute vapor
        T = Tr * fluid.Tc
        ref.update(CoolProp.DmolarT_INPUTS, rho, T)
        tau, delta = ref.T_reducing() / T, rho / ref.rhomolar_reducing()
        a, a_t, a_d, a_tt = ref.alphar(), ref.dalphar_dTau(), ref.dalphar_dDelta(), ref.d2alphar_dTau2()
        bundle = model.residual_bundle(T, 1.0 / rho)
        assert model.residual_enthalpy(T, 1.0 / rho) == pytest.approx(R * T * (tau * a_t + delta * a_d), rel=tol)
        assert model.residual_entropy(T, 1.0 / rho) == pytest.approx(R * (tau * a_t - a), rel=tol)
        assert -T * bundle.a_TT == pytest.approx(-R * tau * tau * a_tt, rel=tol)
