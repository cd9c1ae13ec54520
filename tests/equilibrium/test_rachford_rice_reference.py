"""Rachford–Rice against converged two-phase flashes of the reference library.

CoolProp's Peng–Robinson mixture backend (Bell, I. H., Jäger, A., J. Res. NIST 121, 238 (2016),
from memory) flashes a feed at (T, P) into x, y and a molar vapor fraction Q. Its K = y/x fed
back to our Rachford–Rice split must give the same vapor fraction and compositions: the
material balance with its own K (Rachford & Rice 1952).
"""

import numpy as np
import pytest

from thermo_roots.equilibrium import rachford_rice

CASES = [   # invented feeds at invented conditions, each two-phase in CoolProp's PR backend
    ("Methane&n-Butane", [0.3, 0.7], 300.0, 5e6),
    ("Methane&Ethane&Propane&n-Butane", [0.6, 0.15, 0.15, 0.1], 250.0, 3e6),
    ("Methane&Propane&n-Pentane", [0.5, 0.3, 0.2], 320.0, 4e6),
    ("Nitrogen&Methane&Ethane", [0.1, 0.5, 0.4], 180.0, 3e6),
    ("CarbonDioxide&Methane&n-Butane", [0.2, 0.4, 0.4], 300.0, 5e6),
]


@pytest.fixture(scope="module")
def reference_flashes():
    import CoolProp

    out = []
    for names, z, T, P in CASES:
        state = CoolProp.AbstractState("PR", names)
        state.set_mole_fractions(z)
        state.update(CoolProp.PT_INPUTS, P, T)
        assert state.phase() == CoolProp.iphase_twophase, names
        out.append((np.array(z), np.array(state.mole_fractions_liquid()), np.array(state.mole_fractions_vapor()),
                    state.Q()))
    return out


def test_reference_k_values_give_the_reference_split(reference_flashes):
    for (z, x, y, Q), (names, *_) in zip(reference_flashes, CASES):
        r = rachford_rice(z, y / x)
        assert r.status == "two-phase", names
        assert r.beta == pytest.approx(Q, abs=1e-10), names
        np.testing.assert_allclose(r.x, x, atol=1e-10, err_msg=names)
        np.testing.assert_allclose(r.y, y, atol=1e-10, err_msg=names)


def test_binary_lever_rule_at_the_reference_tie_line(reference_flashes):
    # For a binary at fixed (T, P) the tie line does not depend on the feed (Gibbs phase rule), so
    # every feed between x and y splits with the same K, in the proportion of the lever rule.
    _, x, y, _ = reference_flashes[0]
    z1 = np.linspace(x[0], y[0], 9)[1:-1]
    feeds = np.stack([z1, 1 - z1], axis=1)
    r = rachford_rice(feeds, y / x)
    np.testing.assert_allclose(r.beta, (z1 - x[0]) / (y[0] - x[0]), rtol=1e-12)
    np.testing.assert_allclose(r.x, np.broadcast_to(x, feeds.shape), atol=1e-13)
