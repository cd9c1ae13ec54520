"""Volume translation (Peneloux, Rauzy & Freze 1982): volumes move by c, saturation does not."""

import CoolProp
import numpy as np
import pytest

import thermo_roots as tr


@pytest.mark.parametrize("cls", [tr.SoaveRedlichKwong, tr.PengRobinson])
def test_translation_moves_volumes_by_c_and_keeps_saturation_pressures(cls, propane):
    plain, shifted = cls(propane), cls(propane, volume_shift="peneloux")
    assert shifted.c != 0.0
    T = np.linspace(0.45, 0.999, 30) * propane.Tc
    a, b = tr.saturation(plain, T=T), tr.saturation(shifted, T=T)
    np.testing.assert_allclose(b.P, a.P, rtol=1e-9)            # Peneloux et al. (1982): Psat unchanged
    np.testing.assert_allclose(b.v_liquid, a.v_liquid - shifted.c, rtol=1e-9)
    s0, s1 = tr.solve(plain, T=250.0, P="20 bar"), tr.solve(shifted, T=250.0, P="20 bar")
    assert s1.v == pytest.approx(s0.v - shifted.c, rel=1e-12)
    assert s1.phase == s0.phase == "liquid"
    # ln phi moves by -cP/RT for every root, so which root is stable does not change
    lnphi = [r.ln_phi for r in s1.roots]
    np.testing.assert_allclose(lnphi, [r.ln_phi - shifted.c * 2e6 / (tr.R * 250.0) for r in s0.roots], atol=1e-12)


def test_translated_model_round_trips(co2):
    m = tr.PengRobinson(co2, volume_shift="peneloux")
    s = tr.solve(m, T=280.0, P="60 bar")
    assert tr.solve(m, P=s.P, v=s.v).T == pytest.approx(280.0, rel=1e-10)
    assert tr.solve(m, T=280.0, v=s.v).P == pytest.approx(6e6, rel=1e-10)
    assert m.pressure(co2.Tc, m.v_c) == pytest.approx(co2.Pc, rel=1e-12)


def test_peneloux_improves_propane_liquid_density():
    # common practice: SRK over-predicts saturated-liquid volumes by ~10 %; Peneloux's shift
    # removes most of it (reference: CoolProp's multiparameter equation for propane)
    fluid = tr.get_fluid("propane")
    T = 0.7 * fluid.Tc
    ref = CoolProp.AbstractState("HEOS", fluid.library_name)
    ref.update(CoolProp.QT_INPUTS, 0.0, T)
    v_ref = 1 / ref.rhomolar()
    err_plain = tr.saturation(tr.SoaveRedlichKwong(fluid), T=T).v_liquid / v_ref - 1
    err_shift = tr.saturation(tr.SoaveRedlichKwong(fluid, volume_shift="peneloux"), T=T).v_liquid / v_ref - 1
    assert err_plain > 0.05 and abs(err_shift) < 0.3 * abs(err_plain)


def test_bad_shift_options():
    f = tr.get_fluid("propane")
    with pytest.raises(tr.InputError, match="peneloux"):
        tr.PengRobinson(f, volume_shift="rackett")
    with pytest.raises(tr.InputError, match="SRK and PR"):
        tr.VanDerWaals(f, volume_shift="peneloux")
    with pytest.raises(tr.InputError, match="SRK and PR"):
        tr.RedlichKwong(f, volume_shift="peneloux")   # same deltas as SRK, but no correlation for it


def test_the_peneloux_constants_are_the_published_ones():
    # Peneloux, Rauzy & Freze (1982) for SRK, c = 0.40768 (R Tc/Pc)(0.29441 - Z_RA), with
    # Z_RA = 0.29056 - 0.08775 omega (Yamada & Gunn 1973); the PR analogue 0.50033 and 0.25969
    # (coefficients from memory, as in models.peneloux_shift)
    f = tr.get_fluid("propane")
    z_ra = 0.29056 - 0.08775 * f.omega
    scale = tr.R * f.Tc / f.Pc
    assert tr.SoaveRedlichKwong(f, volume_shift="peneloux").c == pytest.approx(0.40768 * scale * (0.29441 - z_ra), rel=1e-14)
    for cls in (tr.PengRobinson, tr.PengRobinson78):
        assert cls(f, volume_shift="peneloux").c == pytest.approx(0.50033 * scale * (0.25969 - z_ra), rel=1e-14)
