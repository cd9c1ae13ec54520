"""Trace content: iterates, brackets that keep a sign change, widths that shrink."""

from __future__ import annotations

import numpy as np
import pandas as pd
from hypothesis import given, settings
from hypothesis import strategies as st

from thermo_roots.roots import METHODS, find_root

BRACKETED = [name for name, m in METHODS.items() if m.bracketed]


def cubic(x):
    return x**3 - 2 * x - 5  # Newton's example (from memory)


def test_scalar_trace_records_each_iterate_with_f_and_bracket():
    r = find_root(cubic, (2.0, 3.0))
    steps = list(r.trace)
    assert len(steps) == r.iterations + 1 and steps[0].iteration == 0
    assert (steps[0].a, steps[0].b) == (2.0, 3.0)
    for s in steps:
        assert s.fx == cubic(s.x)  # f as evaluated, not recomputed differently
        assert s.a <= s.x <= s.b
    widths = [s.b - s.a for s in steps]
    assert all(w1 <= w0 for w0, w1 in zip(widths, widths[1:]))
    frame = r.trace.to_frame()
    assert isinstance(frame, pd.DataFrame) and list(frame.columns) == ["iteration", "x", "fx", "a", "b"]
    assert len(frame) == len(steps)


def test_open_trace_without_bracket_has_nan_ends():
    r = find_root(cubic, x0=2.0, method="secant")
    assert all(np.isnan(s.a) and np.isnan(s.b) for s in r.trace)
    errors = [abs(s.x - r.root) for s in r.trace][1:]  # after the two starting points
    assert errors[-1] < errors[0]


def test_array_trace_expands_with_nan_for_stopped_elements():
    c = np.array([1.0, 4.0, -1.0])
    r = find_root(lambda x, c: x**2 - c, (0.0, 3.0), args=(c,), trace=True)
    x = r.trace.x
    assert x.shape == (len(r.trace), 3)
    assert np.isnan(x[1:, 2]).all()  # no sign change: only the starting record
    for k in range(2):
        rows = ~np.isnan(x[:, k])
        assert rows.sum() == r.iterations[k] + 1
    frame = r.trace.to_frame()
    assert set(frame.columns) == {"iteration", "element", "x", "fx", "a", "b"}


def test_trace_off():
    assert find_root(cubic, (2.0, 3.0), trace=False).trace is None


def test_default_traces_a_scalar_problem_but_not_an_array_problem():
    # An array trace costs about 40 bytes per element and iteration (1.5 GB for 10**6
    # bisections), so arrays keep theirs only when asked.
    assert len(find_root(cubic, (2.0, 3.0)).trace) > 1
    c = np.array([4.0, 9.0])
    assert find_root(lambda x, c: x**2 - c, (0.0, 5.0), args=(c,)).trace is None
    assert len(find_root(lambda x, c: x**2 - c, (0.0, 5.0), args=(c,), trace=True).trace) > 1


@settings(max_examples=60, deadline=None)
@given(
    root=st.floats(-50, 50),
    left=st.floats(1e-3, 100),
    right=st.floats(1e-3, 100),
    steep=st.floats(0.05, 20),
    method=st.sampled_from(BRACKETED),
)
def test_bracketed_trace_always_holds_a_sign_change(root, left, right, steep, method):
    def f(x):  # one simple root, flat or steep (common practice test shape)
        return np.tanh(steep * (x - root)) + 0.1 * (x - root)

    a, b = root - left, root + right
    r = find_root(f, (a, b), method=method, maxiter=200)
    assert r.converged
    prev = np.inf
    for s in r.trace:
        assert np.sign(f(s.a)) * np.sign(f(s.b)) <= 0
        assert s.b - s.a <= prev
        prev = s.b - s.a
    assert r.trace[-1].a <= r.root <= r.trace[-1].b
    # Within the tolerance, doubled for the rounding of x - root inside f.
    assert abs(r.root - root) <= 2 * (2e-12 + 4 * np.finfo(float).eps * abs(root))
