"""The generalized cubic against published constants and its own definitions."""

import numpy as np
import pytest
from scipy import integrate

import thermo_roots as tr
from thermo_roots.models import PR76, RK, SRK, VDW

CUBICS = [tr.VanDerWaals, tr.RedlichKwong, tr.SoaveRedlichKwong, tr.PengRobinson, tr.PengRobinson78]


@pytest.mark.parametrize("family, omega_a, omega_b, Zc, rel", [
    (VDW, 27 / 64, 1 / 8, 3 / 8, 1e-15),                  # van der Waals (1873); textbook exact values
    (RK, 1 / (9 * (2 ** (1 / 3) - 1)), (2 ** (1 / 3) - 1) / 3, 1 / 3, 1e-14),  # Redlich & Kwong (1949), exact forms
    (SRK, 0.42748, 0.08664, 1 / 3, 1e-5),                 # Soave (1972) rounded table values
    (PR76, 0.45724, 0.07780, 0.30740, 1e-4),              # Peng & Robinson (1976), Ind. Eng. Chem. Fundam. 15:59
])
def test_critical_constants_match_published_values(family, omega_a, omega_b, Zc, rel):
    assert family.omega_a == pytest.approx(omega_a, rel=rel)
    assert family.omega_b == pytest.approx(omega_b, rel=rel)
    assert family.Zc == pytest.approx(Zc, rel=rel)


def test_gas_constant_is_codata_2018():
    assert tr.R == 8.31446261815324  # CODATA 2018, exact (N_A k)


@pytest.mark.parametrize("cls", CUBICS)
@pytest.mark.parametrize("name", ["CO2", "water", "n-butane", "R134a", "methane"])
def test_each_model_reproduces_the_critical_point(cls, name):
    # common practice: at Tc, v_c the isotherm has P = Pc and a horizontal inflection
    f = tr.get_fluid(name)
    m = cls(f)
    assert m.pressure(f.Tc, m.v_c) == pytest.approx(f.Pc, rel=1e-13)
    assert abs(m.dP_dv(f.Tc, m.v_c)) * m.v_c / f.Pc < 1e-12
    h = 1e-4 * m.v_c
    second = (m.pressure(f.Tc, m.v_c + h) - 2 * f.Pc + m.pressure(f.Tc, m.v_c - h)) / h**2
    assert abs(second) * m.v_c**2 / f.Pc < 1e-5


@pytest.mark.parametrize("cls", CUBICS)
def test_analytic_derivatives_match_finite_differences(cls, co2):
    m = cls(co2)
    T, v = np.array([250.0, 300.0, 400.0]), np.array([6e-5, 3e-4, 5e-3])
    hv, hT = 1e-6 * v, 1e-5 * T
    dv = (m.pressure(T, v + hv) - m.pressure(T, v - hv)) / (2 * hv)
    dT = (m.pressure(T + hT, v) - m.pressure(T - hT, v)) / (2 * hT)
    np.testing.assert_allclose(m.dP_dv(T, v), dv, rtol=1e-6)
    np.testing.assert_allclose(m.dP_dT(T, v), dT, rtol=1e-6)
    a, da = m.attraction(T)
    np.testing.assert_allclose(da, (m.attraction(T + hT)[0] - m.attraction(T - hT)[0]) / (2 * hT), rtol=1e-6)


@pytest.mark.parametrize("cls", CUBICS)
def test_ln_phi_equals_its_defining_integral(cls, propane):
    # ln phi = int_v^inf (P/RT - 1/v') dv' + Z - 1 - ln Z (Michelsen & Mollerup 2007, ch. 2); quad from scipy
    m = cls(propane)
    for T, P in [(300.0, 2e6), (300.0, 1e5), (450.0, 5e6)]:   # liquid, vapour, supercritical
        v = tr.solve(m, T=T, P=P).v
        tail, _ = integrate.quad(lambda x: m.pressure(T, x) / (tr.R * T) - 1 / x, v, np.inf, epsabs=1e-13, limit=200)
        Z = m.compressibility(T, v)
        assert m.ln_phi(T, v) == pytest.approx(tail + Z - 1 - np.log(Z), abs=1e-8)
        assert m.residual_gibbs(T, v) == pytest.approx(tr.R * T * m.ln_phi(T, v))


def test_residual_enthalpy_follows_from_gibbs_helmholtz(propane):
    # h_res = -R T^2 d(ln phi)/dT at constant P (common practice); checked by finite difference in T at fixed P
    m = tr.PengRobinson(propane)
    P, T, h = 2e6, 420.0, 1e-3
    lnphi = [m.ln_phi(t, tr.solve(m, T=t, P=P).v) for t in (T - h, T + h)]
    v = tr.solve(m, T=T, P=P).v
    assert m.residual_enthalpy(T, v) == pytest.approx(-tr.R * T**2 * (lnphi[1] - lnphi[0]) / (2 * h), rel=1e-5)


def test_pr78_differs_from_pr76_only_above_omega_0491():
    # Robinson & Peng (1978), GPA RR-28: new kappa only for omega > 0.491
    light = tr.Fluid("light", 400.0, 4e6, 0.3, 0.05)
    heavy = tr.Fluid("heavy", 600.0, 2e6, 0.6, 0.15)
    assert tr.PengRobinson78(light).attraction(300.0)[0] == tr.PengRobinson(light).attraction(300.0)[0]
    assert tr.PengRobinson78(heavy).attraction(400.0)[0] != tr.PengRobinson(heavy).attraction(400.0)[0]


def test_ideal_gas_pressure_and_arrays():
    m = tr.IdealGas(tr.get_fluid("nitrogen"))
    assert m.pressure(273.15, 0.02241396954) == pytest.approx(101325.0, rel=1e-9)  # CODATA 2018 molar volume
    assert m.pressure(np.array([300.0, 600.0]), 0.01).shape == (2,)
    assert isinstance(m.pressure(300.0, 0.01), float)
    assert m.ln_phi(300.0, 0.01) == 0.0


def test_models_are_parameter_sets_of_one_implementation():
    # design rule: one generalized cubic; the named models add no arithmetic of their own
    for cls in CUBICS:
        assert issubclass(cls, tr.CubicModel)
        own = {k for k, v in vars(cls).items() if callable(v) and not k.startswith("__")}
        assert own == set(), f"{cls.__name__} defines {own}"


def test_every_model_class_names_its_equation():
    # a menu or a table names a model class without asking which kind it is (issue 9 §1:
    # no family identity checks outside the model layer)
    for short, cls in tr.MODELS.items():
        assert cls.short_name == short and cls.name
        if issubclass(cls, tr.CubicModel):
            assert cls.name == cls.family.name == cls(tr.get_fluid("propane")).name
    assert tr.IdealGas.name == "ideal gas"
