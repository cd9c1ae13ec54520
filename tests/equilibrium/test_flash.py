"""The (T, P) flash against the outside world.

Oracle: CoolProp's own Peng–Robinson mixture backend with thermo_roots' constants and the
same kᵢⱼ (tests/equilibrium/coolprop_cubic.py; Bell & Jäger 2016, J. Res. NIST 121, 238),
an independent implementation of the same equations. Checked: vapour fraction and phase
compositions of two-phase states, densities of one-phase states, and, where the two codes
disagree on the number of phases, that ours has the lower Gibbs energy (the oracle's own
reduced Gibbs function). Equal fugacity of every component at every two-phase answer is
checked with the oracle's ln φ at our phase densities (an independent formula), and the
material balance. The dense-grid tangent-plane check of one-phase answers is in
test_stability.py.
"""

from __future__ import annotations

import threading

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.equilibrium.flash import flash_tp
from thermo_roots.errors import InputError, WrongTypeError

pytest.importorskip("CoolProp")
from tests.equilibrium.coolprop_cubic import CoolPropCubic  # noqa: E402

GAS6 = {"methane": 0.85, "ethane": 0.06, "propane": 0.03, "n-butane": 0.02, "nitrogen": 0.02, "CO2": 0.02}
GAS3 = {"methane": 0.80, "ethane": 0.12, "propane": 0.08}
KIJ3 = {("methane", "propane"): 0.03, ("ethane", "propane"): 0.01}
# Published PR kij of CO2 and N2 with hydrocarbons are about 0.1 and 0.03 (e.g. Knapp et al. 1982,
# DECHEMA Chemistry Data Series VI; from memory): values of that size, not fitted ones.
KIJ6 = {("methane", "CO2"): 0.10, ("ethane", "CO2"): 0.13, ("methane", "nitrogen"): 0.03}


@pytest.fixture(scope="module")
def gas6():
    return tr.PengRobinson(tr.Mixture(GAS6), kij=KIJ6)


@pytest.fixture(scope="module")
def oracle6():
    return CoolPropCubic(list(GAS6), kij=KIJ6, constants="thermo_roots")


@pytest.fixture(scope="module")
def gas3():
    return tr.PengRobinson(tr.Mixture(GAS3), kij=KIJ3)


@pytest.fixture(scope="module")
def oracle3():
    return CoolPropCubic(list(GAS3), kij=KIJ3, constants="thermo_roots")


def _compare(model, oracle, T, P):
    """Our flash and the oracle's on a grid; returns counts of (agreeing two-phase, one-phase, disagreeing)."""
    z = model.z
    ours = flash_tp(model, T, P)
    assert np.all(ours.status == "converged"), ours.reason[ours.status != "converged"]
    counts = [0, 0, 0]
    for i in np.ndindex(T.shape):
        theirs = oracle.flash(z, T[i], P[i])
        if theirs.failure:
            continue
        if theirs.phases == 2 and ours.n_phases[i] == 2:
            counts[0] += 1
            assert ours.beta[i] == pytest.approx(theirs.vapor_fraction, abs=1e-7)
            np.testing.assert_allclose(ours.x[i], theirs.x, atol=1e-7)
            np.testing.assert_allclose(ours.y[i], theirs.y, atol=1e-7)
            assert 1.0 / ours.v_liquid[i] == pytest.approx(theirs.rho_liquid, rel=1e-7)
            assert 1.0 / ours.v_vapor[i] == pytest.approx(theirs.rho_vapor, rel=1e-7)
        elif theirs.phases == 1 and ours.n_phases[i] == 1:
            counts[1] += 1
            assert 1.0 / ours.v[i] == pytest.approx(theirs.rho, rel=1e-8)   # SRK: the backend solves to ~1e-9
        else:
            counts[2] += 1
            _assert_ours_lower_gibbs(ours, theirs, oracle, i, z)
    return counts


def _gibbs_of(flash, i, z):
    if flash.n_phases[i] == 2:
        return [(1.0 - flash.beta[i], flash.x[i], 1.0 / flash.v_liquid[i]),
                (flash.beta[i], flash.y[i], 1.0 / flash.v_vapor[i])]
    return [(1.0, z, 1.0 / flash.v[i])]


def _assert_ours_lower_gibbs(ours, theirs, oracle, i, z):
    mine = oracle.reduced_gibbs(ours.T[i], _gibbs_of(ours, i, z))
    if theirs.phases == 2:
        other = [(1.0 - theirs.vapor_fraction, theirs.x, theirs.rho_liquid),
                 (theirs.vapor_fraction, theirs.y, theirs.rho_vapor)]
    else:
        other = [(1.0, z, theirs.rho)]
    assert mine <= oracle.reduced_gibbs(ours.T[i], other) + 1e-10


def test_six_component_gas_against_coolprop_pr(gas6, oracle6):
    T, P = np.meshgrid(np.linspace(180.0, 290.0, 5), np.linspace(1e6, 8e6, 5))
    two, one, other = _compare(gas6, oracle6, T, P)
    assert two >= 8 and one >= 5 and other <= 3   # the grid crosses the envelope (counts with slack)


def test_three_component_gas_against_coolprop_pr(gas3, oracle3):
    T, P = np.meshgrid(np.linspace(190.0, 280.0, 4), np.linspace(1e6, 7e6, 4))
    two, one, other = _compare(gas3, oracle3, T, P)
    assert two >= 4 and one >= 3 and other <= 2


def test_random_feeds_never_above_the_oracles_gibbs_energy(gas6, oracle6):
    """25 random feeds, temperatures and pressures (seeded): our answer's Gibbs energy, by the
    oracle's own function, is never above the oracle's answer's (the second law picks the
    lower), and the oracle's vapour fraction is matched where both split alike."""
    rng = np.random.default_rng(7)
    n = 25
    Z = rng.dirichlet(np.full(6, 0.7), n)
    T, P = rng.uniform(150.0, 400.0, n), rng.uniform(2e5, 1.2e7, n)
    f = flash_tp(gas6, T, P, z=Z)
    assert np.all(f.status == "converged")
    compared = 0
    for i in range(n):
        theirs = oracle6.flash(Z[i], T[i], P[i])
        if theirs.failure:
            continue
        compared += 1
        ours_phases = [(1.0 - f.beta[i], f.x[i], 1.0 / f.v_liquid[i]), (f.beta[i], f.y[i], 1.0 / f.v_vapor[i])] \
            if f.n_phases[i] == 2 else [(1.0, Z[i], 1.0 / f.v[i])]
        other = [(1.0 - theirs.vapor_fraction, theirs.x, theirs.rho_liquid),
                 (theirs.vapor_fraction, theirs.y, theirs.rho_vapor)] if theirs.phases == 2 else [(1.0, Z[i], theirs.rho)]
        assert oracle6.reduced_gibbs(T[i], ours_phases) <= oracle6.reduced_gibbs(T[i], other) + 1e-9
    assert compared >= 18


def test_srk_against_coolprop_srk():
    model = tr.SoaveRedlichKwong(tr.Mixture(GAS3), kij=KIJ3)
    oracle = CoolPropCubic(list(GAS3), kij=KIJ3, family="SRK", constants="thermo_roots")
    T, P = np.meshgrid(np.linspace(190.0, 260.0, 3), np.linspace(1e6, 5e6, 3))
    two, one, other = _compare(model, oracle, T, P)
    assert two >= 3 and one + two + other == 9


def test_equal_fugacity_and_material_balance_by_the_oracle(gas6, oracle6):
    T, P = np.meshgrid(np.linspace(180.0, 250.0, 4), np.linspace(1e6, 5e6, 4))
    f = flash_tp(gas6, T, P)
    two = f.n_phases == 2
    assert two.sum() >= 8
    z = gas6.z
    for i in zip(*np.nonzero(two)):
        # the oracle's ln phi at our phase densities: an independent formula for ln f_i = ln(x_i phi_i P)
        ln_f_liquid = np.log(f.x[i]) + oracle6.ln_phi(f.x[i], T[i], 1.0 / f.v_liquid[i])
        ln_f_vapour = np.log(f.y[i]) + oracle6.ln_phi(f.y[i], T[i], 1.0 / f.v_vapor[i])
        np.testing.assert_allclose(ln_f_liquid, ln_f_vapour, atol=1e-8)
        np.testing.assert_allclose((1.0 - f.beta[i]) * f.x[i] + f.beta[i] * f.y[i], z, atol=1e-13)
        assert abs(f.x[i].sum() - 1.0) < 1e-13 and abs(f.y[i].sum() - 1.0) < 1e-13
        assert 0.0 < f.beta[i] < 1.0
        # the split has a lower Gibbs energy than the feed as one phase (the second law; the oracle's G)
        one = oracle6.reduced_gibbs(T[i], [(1.0, z, 1.0 / _feed_volume(gas6, T[i], P[i]))])
        assert oracle6.reduced_gibbs(T[i], _gibbs_of(f, i, z)) < one


def _feed_volume(model, T, P):
    from thermo_roots.equilibrium.fugacity import phase_fugacity

    return float(phase_fugacity(model, T, P, model.z).v)


def test_one_phase_rule_beta_and_compositions(gas6):
    # 300 K, 5 MPa: above the gas's cricondentherm (common practice: a pipeline gas there is
    # single phase); the reference library's cubic backend calls it "liquid" (issue 10)
    f = flash_tp(gas6, [300.0, 150.0], [5e6, 5e6])
    assert list(f.n_phases) == [1, 1]
    assert f.phase[0] in ("vapor", "supercritical") and f.beta[0] == 1.0
    assert f.phase[1] == "liquid" and f.beta[1] == 0.0
    np.testing.assert_array_equal(f.x, np.broadcast_to(gas6.z, (2, 6)))
    np.testing.assert_array_equal(f.y, f.x)
    assert np.isfinite(f.Z_vapor[0]) and np.isnan(f.Z_liquid[0])
    assert np.isfinite(f.Z_liquid[1]) and np.isnan(f.Z_vapor[1])


def test_newton_stage_reaches_the_substitution_answer(gas6):
    """With two substitution steps only, the Newton stage must finish the job and agree."""
    T, P = np.array([200.0, 230.0, 250.0]), np.array([3e6, 5e6, 6e6])
    full = flash_tp(gas6, T, P)
    short = flash_tp(gas6, T, P, maxiter=2)
    assert np.all(short.newton[full.n_phases == 2])
    assert np.all(short.status == "converged")
    np.testing.assert_allclose(short.beta, full.beta, atol=1e-8)
    np.testing.assert_allclose(short.x, full.x, atol=1e-8)


def test_near_the_critical_region_every_state_converges_or_says_why(gas3):
    # a fine grid where the envelope of the three-component gas closes (its cricondenbar is near 7 MPa)
    T, P = np.meshgrid(np.linspace(215.0, 240.0, 12), np.linspace(6.0e6, 7.5e6, 12))
    f = flash_tp(gas3, T, P)
    ok = f.status == "converged"
    assert ok.mean() >= 0.95
    assert np.all(f.reason[~ok] != "") and np.all(f.reason[ok] == "")
    two = f.n_phases == 2
    np.testing.assert_allclose(((1 - f.beta[two])[:, None] * f.x[two] + f.beta[two][:, None] * f.y[two]),
                               np.broadcast_to(gas3.z, (two.sum(), 3)), atol=1e-12)


def test_next_to_the_critical_point_of_the_natural_gas():
    """Where substitution crawls (the gas's critical point is near 223 K, 7.65 MPa in PR, kij = 0,
    found by this grid), the Newton stage on the vapour amounts must finish with equal fugacities."""
    model = tr.PengRobinson(tr.Mixture(GAS6))
    T, P = np.meshgrid(np.linspace(222.3, 224.3, 8), np.linspace(7.57e6, 7.77e6, 8))
    f = flash_tp(model, T, P)
    ok = f.status == "converged"
    assert ok.mean() >= 0.95
    two = ok & (f.n_phases == 2)
    assert two.sum() >= 5 and f.newton[two].sum() >= 3
    from thermo_roots.equilibrium.fugacity import phase_fugacity

    liquid = phase_fugacity(model, T[two], P[two], f.x[two])
    vapour = phase_fugacity(model, T[two], P[two], f.y[two])
    np.testing.assert_allclose(np.log(f.x[two]) + liquid.ln_phi, np.log(f.y[two]) + vapour.ln_phi, atol=1e-8)


def test_arrays_keep_their_good_elements(gas6):
    T = np.array([200.0, np.nan, 230.0, -5.0, 1e-300])
    P = np.array([3e6, 3e6, 4e6, 3e6, 3e6])
    f = flash_tp(gas6, T, P)
    good = flash_tp(gas6, T[[0, 2]], P[[0, 2]])
    np.testing.assert_allclose(f.beta[[0, 2]], good.beta, rtol=1e-12)
    assert list(f.status[[1, 3]]) == ["not solved", "not solved"]
    assert "T" in f.reason[1] and "K" in f.reason[1]
    assert np.isnan(f.beta[1]) and np.all(np.isnan(f.x[1]))
    assert f.status[4] in ("not solved", "converged")   # 1e-300 K: refused or a state, never a crash
    if f.status[4] == "not solved":
        assert f.reason[4]


def test_extreme_pressures_do_not_crash(gas6):
    f = flash_tp(gas6, [250.0, 250.0], [1.0, 100 * 4.6e6])   # 1 Pa and 100 Pc of methane
    assert np.all(f.status == "converged")
    assert f.n_phases[0] == 1 and f.beta[0] == 1.0


def test_scalar_in_scalar_out(gas6):
    f = flash_tp(gas6, 200.0, 3e6)
    assert isinstance(f.beta, float) and isinstance(f.status, str) and isinstance(f.n_phases, int)
    assert f.x.shape == (6,)
    assert "two-phase" in repr(f)


def test_bad_input_is_a_clear_error(gas6):
    with pytest.raises(WrongTypeError, match="T must be a number"):
        flash_tp(gas6, "200 K", 3e6)
    with pytest.raises(InputError, match="6 components"):
        flash_tp(gas6, 200.0, 3e6, z=[0.5, 0.5])
    with pytest.raises(WrongTypeError, match="cubic"):
        flash_tp(tr.IdealGas(tr.get_fluid("methane")), 200.0, 3e6)


def test_feed_other_than_the_model_composition(gas3, oracle3):
    z = np.array([0.6, 0.2, 0.2])
    f = flash_tp(gas3, 230.0, 4e6, z=z)
    theirs = oracle3.flash(z, 230.0, 4e6)
    assert f.n_phases == theirs.phases == 2
    assert f.beta == pytest.approx(theirs.vapor_fraction, abs=1e-7)


def test_threads_give_the_serial_answer(gas6):
    T, P = np.meshgrid(np.linspace(185.0, 290.0, 8), np.linspace(1e6, 8e6, 8))
    serial = flash_tp(gas6, T, P)
    results = [None] * 4

    def work(k):
        results[k] = flash_tp(gas6, T, P)

    threads = [threading.Thread(target=work, args=(k,)) for k in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    for r in results:
        np.testing.assert_allclose(r.beta, serial.beta, rtol=1e-12, atol=1e-14)
        np.testing.assert_array_equal(r.n_phases, serial.n_phases)
