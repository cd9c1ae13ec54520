"""The reference cross-check is the same under threads and processes as in one thread.

Each state's reference values must be its own: a CoolProp state object shared between
threads lets one thread read another state's density between its own update and read
(issue 8, section 2). These tests make that race likely -- thousands of CO2 states, eight
threads, small chunks and a short interpreter switch interval -- and require the serial
result state by state. The reference values themselves are CoolProp's (Span & Wagner 1996
for CO2); the serial path is checked against CoolProp directly in test_reference.py.
"""

import sys
import threading
from concurrent.futures import ProcessPoolExecutor, ThreadPoolExecutor

import numpy as np
import pytest

import thermo_roots as tr
from thermo_roots import reference as ref

N_STATES = 4000
N_THREADS = 8


@pytest.fixture(scope="module")
def co2_states():
    # liquid, vapor and supercritical CO2 states spread over the reference's range
    rng = np.random.default_rng(20260801)
    T = rng.uniform(220.0, 420.0, N_STATES)
    P = np.exp(rng.uniform(np.log(1e5), np.log(3e7), N_STATES))
    return tr.solve(tr.PengRobinson(tr.get_fluid("CO2")), T=T, P=P)


@pytest.fixture(scope="module")
def serial(co2_states):
    return ref.cross_check(co2_states)


@pytest.fixture
def frequent_switching():
    """Let the interpreter switch threads every 10 microseconds (default 5 ms), so a race
    between update and read is hit in nearly every run rather than now and then."""
    old = sys.getswitchinterval()
    sys.setswitchinterval(1e-5)
    yield
    sys.setswitchinterval(old)


def _assert_same(check, expected, where=slice(None)):
    # the same CoolProp calls on the same inputs: equal to far better than any state-to-state
    # difference (a swapped state is off by percent to orders of magnitude)
    for name in ("reference_v", "reference_P", "reference_T", "reference_P_sat", "reference_T_sat",
                 "reference_v_liquid", "reference_v_vapor", "deviation_v_percent"):
        got, want = np.asarray(getattr(check, name), dtype=float), np.asarray(getattr(expected, name))[where]
        bad = ~np.isclose(got, want, rtol=1e-12, atol=0.0, equal_nan=True)
        assert not bad.any(), f"{name}: {int(bad.sum())} states got another state's value, e.g. index " \
                              f"{int(np.flatnonzero(bad)[0])}: {got[bad][0]!r} instead of {want[bad][0]!r}"
    np.testing.assert_array_equal(np.asarray(check.reference_phase), np.asarray(expected.reference_phase)[where])
    np.testing.assert_array_equal(np.asarray(check.reason), np.asarray(expected.reason)[where])


def test_serial_run_covers_every_phase(serial):
    # the comparison below is only meaningful if the states are mostly available and varied
    assert np.mean(serial.available) > 0.95
    assert {"liquid", "vapor", "supercritical"} <= set(np.asarray(serial.reference_phase))


def test_thread_pool_gives_the_serial_result(co2_states, serial, frequent_switching):
    for _ in range(2):
        with ThreadPoolExecutor(N_THREADS) as pool:
            check = ref.cross_check(co2_states, executor=pool, chunk_size=25)
        _assert_same(check, serial)


def test_bare_threads_without_executor_give_the_serial_result(co2_states, serial, frequent_switching):
    # several notebook threads (or a web server) each calling cross_check on their own states
    parts = np.array_split(np.arange(N_STATES), N_THREADS)
    results, errors = {}, []

    def work(k, index):
        try:
            sub = tr.solve(co2_states.model, T=np.asarray(co2_states.T)[index], P=np.asarray(co2_states.P)[index])
            results[k] = ref.cross_check(sub)
        except BaseException as error:  # noqa: BLE001 - reported below, in the test's thread
            errors.append(error)

    threads = [threading.Thread(target=work, args=(k, index)) for k, index in enumerate(parts)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert not errors, errors
    for k, index in enumerate(parts):
        _assert_same(results[k], serial, index)


def test_process_pool_gives_the_serial_result(co2_states, serial):
    with ProcessPoolExecutor(max_workers=2) as pool:
        check = ref.cross_check(co2_states, executor=pool, chunk_size=500)
    _assert_same(check, serial)


def test_each_thread_has_its_own_reference_object():
    seen = []

    def grab():
        seen.append(ref._abstract_state("CarbonDioxide")[0])

    threads = [threading.Thread(target=grab) for _ in range(3)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    grab()
    assert len({id(s) for s in seen}) == 4


def test_interrupted_threaded_run_keeps_the_chunks_done(co2_states, serial, monkeypatch):
    # attack: the third chunk is interrupted (Ctrl-C) in a thread pool; the states of the chunks
    # before it are kept, exactly as in the serial run, and the rest say why they are empty
    calls = {"n": 0}
    lock = threading.Lock()
    real = ref._reference_chunk

    def interrupting(library_name, pair, a, b, with_saturation):
        with lock:
            calls["n"] += 1
            mine = calls["n"]
        if mine == 3:
            raise KeyboardInterrupt
        return real(library_name, pair, a, b, with_saturation)

    monkeypatch.setattr(ref, "_reference_chunk", interrupting)
    index = slice(0, 200)
    sub = tr.solve(co2_states.model, T=np.asarray(co2_states.T)[index], P=np.asarray(co2_states.P)[index])
    with ThreadPoolExecutor(1) as pool:      # one thread: chunks start in order, the third is interrupted
        check = ref.cross_check(sub, executor=pool, chunk_size=10, on_interrupt="partial")
    assert check.completed == 20
    np.testing.assert_allclose(check.reference_v[:20], np.asarray(serial.reference_v)[:20], rtol=1e-12)
    assert set(check.reason[20:]) == {ref.INTERRUPTED}
    with ThreadPoolExecutor(1) as pool:
        calls["n"] = 0
        with pytest.raises(KeyboardInterrupt):
            ref.cross_check(sub, executor=pool, chunk_size=10)
