"""Sweeps and accuracy maps on a Dask cluster give the serial result (issue 8, section 9).

A two-worker LocalCluster on the loopback interface stands in for a real cluster: the
workers are separate processes, as on a cluster, and receive only a fluid name and arrays
per chunk. The reference values are CoolProp's (Span & Wagner 1996 for CO2; Lemmon,
McLinden & Wagner 2009 for propane); the serial path is checked against CoolProp directly
in test_reference.py, test_sweeps.py and test_accuracy.py.

Needs the ``cluster`` extra (Dask's ``distributed``), which the ``test`` extra includes.
"""

import numpy as np
import pandas as pd
import pytest
from distributed import Client, LocalCluster

import thermo_roots as tr
from thermo_roots import accuracy as acc
from thermo_roots import reference as ref
from thermo_roots import sweeps as sw


def _worker_package_path():
    import thermo_roots

    return thermo_roots.__file__


@pytest.fixture(scope="module")
def cluster_executor():
    cluster = LocalCluster(n_workers=2, processes=True, threads_per_worker=1, dashboard_address=None,
                           host="127.0.0.1", silence_logs=40)
    client = Client(cluster)
    try:
        yield client, client.get_executor()
    finally:
        client.close()
        cluster.close()


def _assert_same_frame(parallel, serial):
    # same rows, same text columns, floats to 1e-12 (a state swapped or lost is off by percent)
    assert list(parallel.columns) == list(serial.columns) and len(parallel) == len(serial)
    pd.testing.assert_frame_equal(parallel, serial, check_exact=False, rtol=1e-12, atol=0.0)


def test_workers_run_this_package(cluster_executor):
    client, _ = cluster_executor
    paths = set(client.run(_worker_package_path).values())
    assert paths == {tr.__file__}
    assert len(client.scheduler_info()["workers"]) == 2


def test_accuracy_map_on_the_cluster_is_the_serial_map(cluster_executor):
    _, executor = cluster_executor
    kwargs = dict(models=["PR", "SRK"], T=(250.0, 450.0), P=("2 bar", "80 bar"), n=12, progress=False)
    serial = acc.accuracy_map("propane", **kwargs)
    parallel = acc.accuracy_map("propane", executor=executor, chunk_size=20, **kwargs)
    _assert_same_frame(parallel.points, serial.points)
    _assert_same_frame(parallel.summary, serial.summary)
    assert parallel.points.attrs["excluded_points"] == serial.points.attrs["excluded_points"]
    # the map is not trivial: every region present, some points excluded as two-phase or
    # out of the reference's range would show up in excluded_points
    assert set(serial.summary["region"]) == {"liquid", "vapor", "supercritical"}


def test_reference_sweep_on_the_cluster_is_the_serial_table(cluster_executor):
    _, executor = cluster_executor
    model = tr.PengRobinson(tr.get_fluid("CO2"))
    kwargs = dict(T=("-20 degC", "60 degC"), n=40, reference=True, progress=False, chunk_size=7)
    serial = sw.isobar(model, "50 bar", **kwargs)
    parallel = sw.isobar(model, "50 bar", executor=executor, **kwargs)
    _assert_same_frame(parallel, serial)
    assert parallel.attrs["interrupted"] is False and parallel["reference_available"].all()


def test_cross_check_on_the_cluster_keeps_unavailable_states_in_place(cluster_executor):
    _, executor = cluster_executor
    co2 = tr.get_fluid("CO2")
    # 200 K lies below CO2's triple point, 216.59 K (Span & Wagner 1996): unavailable there
    T = np.tile([200.0, 250.0, 300.0, 350.0], 50)
    states = tr.solve(tr.PengRobinson(co2), T=T, P=3e6)
    serial = ref.cross_check(states)
    parallel = ref.cross_check(states, executor=executor, chunk_size=9)
    np.testing.assert_array_equal(parallel.reason, serial.reason)
    np.testing.assert_allclose(parallel.reference_v, serial.reference_v, rtol=1e-12)
    assert not parallel.available[::4].any() and parallel.available[1::4].all()
