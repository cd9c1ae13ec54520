"""Open methods given a bracket: "converged" must mean a root, not just a short step."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import thermo_roots as tr


def test_secant_does_not_stop_on_a_short_first_step_far_from_the_root():
    # f(a) = 1e13 makes the first secant step ~1e-13 long, at x = 3 where f = -2/3;
    # the root is x = 1 (common practice: a stopping test on the step alone can be fooled)
    r = tr.find_root(lambda x: 1 / x - 1, bracket=(1e-13, 3.0), method="secant")
    assert r.converged and r.root == pytest.approx(1.0, abs=1e-11)


@settings(max_examples=60, deadline=None)
@given(st.floats(-50.0, 50.0), st.floats(1e-6, 1e3), st.sampled_from(["secant", "newton"]))
def test_a_converged_bracketed_open_method_sits_on_a_sign_change(root, scale, method):
    f = lambda x: np.tanh((x - root) / scale) + 0.1 * (x - root)  # noqa: E731 (monotone, one root)
    fp = lambda x: (1 - np.tanh((x - root) / scale) ** 2) / scale + 0.1  # noqa: E731
    r = tr.find_root(f, bracket=(root - 60.0, root + 70.0), method=method, fprime=fp, maxiter=200)
    assert r.converged
    tol = 2e-12 + 4 * np.finfo(float).eps * abs(r.root)
    assert f(r.root) == 0 or np.sign(f(r.root - 2 * tol)) != np.sign(f(r.root + 2 * tol))
