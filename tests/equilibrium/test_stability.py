"""Michelsen's tangent-plane test against an independent search.

For a binary the tangent-plane distance tpd(w) = Σ wᵢ (ln wᵢ + ln φᵢ(w) − ln zᵢ − ln φᵢ(z))
can be scanned over a dense grid of trial compositions (Michelsen 1982, Fluid Phase
Equilib. 9, 1: the feed is stable exactly when tpd ≥ 0 for every w). The grid does not
iterate, so it checks the test's verdict in both directions: where the grid finds a
negative tpd the test must say unstable, where the test says stable no grid point may be
negative. The two-phase answers of the flash are checked against CoolProp in test_flash.py.
"""

from __future__ import annotations

import threading

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots.equilibrium.fugacity import phase_fugacity
from thermo_roots.equilibrium.stability import UNSTABLE_BELOW, tangent_plane
from thermo_roots.errors import InputError, WrongTypeError

BINARY = {"methane": 0.7, "n-butane": 0.3}


@pytest.fixture(scope="module")
def binary():
    return tr.PengRobinson(tr.Mixture(BINARY), kij={("methane", "n-butane"): 0.02})


def _grid_tpd_min(model, T, P, z):
    """Lowest tpd [-] over 4001 trial compositions of a binary (denser near the pure ends)."""
    w1 = np.unique(np.concatenate([np.linspace(1e-4, 1 - 1e-4, 3001), np.logspace(-8, -4, 500),
                                   1 - np.logspace(-8, -4, 500)]))
    w = np.stack([w1, 1 - w1], axis=-1)
    feed = phase_fugacity(model, T, P, z)
    d = np.log(z) + feed.ln_phi
    trial = phase_fugacity(model, np.full(w1.shape, T), np.full(w1.shape, P), w)
    return float(np.min(np.sum(w * (np.log(w) + trial.ln_phi - d), axis=-1)))


def test_verdict_agrees_with_a_dense_grid_of_trial_phases(binary):
    z = binary.z
    T, P = np.meshgrid(np.linspace(200.0, 400.0, 7), np.linspace(1e6, 1.2e7, 7))
    result = tangent_plane(binary, T, P)
    assert set(np.unique(result.status)) <= {"stable", "unstable"}
    seen = {True: 0, False: 0}
    for i in np.ndindex(T.shape):
        grid = _grid_tpd_min(binary, T[i], P[i], z)
        if result.stable[i]:
            assert grid >= -1e-9, (T[i], P[i], grid)
            assert result.tpd_min[i] >= -UNSTABLE_BELOW
        else:
            assert grid < 0.0, (T[i], P[i], grid)
            assert result.tpd_min[i] < -UNSTABLE_BELOW
        if grid < -1e-6:
            assert not result.stable[i]
        seen[bool(result.stable[i])] += 1
    assert seen[True] >= 5 and seen[False] >= 5   # the grid crosses the envelope (with slack)


def test_unstable_state_gives_k_values_for_the_flash(binary):
    r = tangent_plane(binary, 250.0, 4e6)
    assert r.status == "unstable" and not r.stable
    assert r.K_estimate[0] > 1.0 > r.K_estimate[1]   # methane to the vapour (common practice)
    assert abs(r.trial.sum() - 1.0) < 1e-12
    assert isinstance(r.tpd_min, float) and isinstance(r.status, str)


def test_pure_fluid_is_stable_off_saturation():
    propane = tr.PengRobinson(tr.get_fluid("propane"))
    r = tangent_plane(propane, [250.0, 300.0, 400.0, 300.0], [1e5, 5e6, 1e7, 1e3])
    assert np.all(r.stable)


def test_an_absent_component_is_the_smaller_mixture():
    three = tr.PengRobinson(tr.Mixture({"methane": 0.7, "ethane": 0.0, "n-butane": 0.3}, normalize=False))
    two = tr.PengRobinson(tr.Mixture(BINARY))
    T, P = np.array([220.0, 300.0, 380.0]), np.array([3e6, 5e6, 8e6])
    a, b = tangent_plane(three, T, P), tangent_plane(two, T, P)
    np.testing.assert_array_equal(a.stable, b.stable)
    np.testing.assert_allclose(a.tpd_min, b.tpd_min, atol=1e-8)
    assert np.all(a.trial[:, 1] == 0.0)


def test_bad_elements_keep_the_rest(binary):
    T = np.array([250.0, np.nan, 300.0, 0.0])
    P = np.array([4e6, 4e6, np.inf, 4e6])
    r = tangent_plane(binary, T, P)
    assert r.status[0] == "unstable"
    assert list(r.status[1:]) == ["not solved"] * 3
    assert "T" in r.reason[1] and "P" in r.reason[2] and "T" in r.reason[3]
    assert r.reason[0] == ""


def test_bad_composition_is_refused_per_element(binary):
    r = tangent_plane(binary, 250.0, 4e6, z=[[0.5, 0.5], [-0.1, 1.1], [np.nan, 1.0]])
    assert r.status[0] == "unstable" and list(r.status[1:]) == ["not solved", "not solved"]
    assert "mole fractions" in r.reason[1]


def test_wrong_types_and_shapes(binary):
    with pytest.raises(WrongTypeError):
        tangent_plane(binary, "250 K", 4e6)
    with pytest.raises(InputError, match="2 components"):
        tangent_plane(binary, 250.0, 4e6, z=[0.2, 0.3, 0.5])
    with pytest.raises(InputError, match="broadcast"):
        tangent_plane(binary, [250.0, 260.0], [4e6, 4e6, 4e6])


def test_threads_give_the_serial_answer(binary):
    T, P = np.meshgrid(np.linspace(200.0, 400.0, 10), np.linspace(1e6, 1.2e7, 10))
    serial = tangent_plane(binary, T, P)
    out = [None] * 4

    def work(k):
        out[k] = tangent_plane(binary, T, P)

    threads = [threading.Thread(target=work, args=(k,)) for k in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    for r in out:
        np.testing.assert_array_equal(r.stable, serial.stable)
        np.testing.assert_allclose(r.tpd_min, serial.tpd_min, rtol=1e-12, atol=1e-15)
