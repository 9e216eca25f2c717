"""Sweeps beyond one machine: the dask recipe of docs/sweeps.md, on a two-worker LocalCluster.

The cluster is started and stopped inside the test (separate worker processes, so the
relations, their checks and the boundary's block function are pickled to the workers
as they would be on a real cluster). The reference for the numbers is the same relation
on numpy arrays in this process.
"""

from __future__ import annotations

import numpy as np
import pytest

import gasdyn2d as gd

da = pytest.importorskip("dask.array")
distributed = pytest.importorskip("distributed")
xr = pytest.importorskip("xarray")


@pytest.fixture(scope="module")
def two_worker_client():
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                       dashboard_address=None, silence_logs=50)
    client = distributed.Client(cluster)
    yield client
    client.close()
    cluster.close()


def test_a_hundred_thousand_cases_on_two_workers(two_worker_client):
    # the recipe: an intake designer's sweep of free-stream Mach number against ramp turn
    # (invented ranges), chunked along both axes, computed on the cluster
    rng = np.random.default_rng(7)
    mach = rng.uniform(1.5, 4.0, 100_000)
    turn = np.radians(rng.uniform(2.0, 12.0, 100_000))
    lazy = gd.oblique_shock(da.from_array(mach, chunks=25_000),
                            deflection=da.from_array(turn, chunks=25_000), errors="nan")
    assert type(lazy.p2_p1).__module__.startswith("dask")
    p2_p1, recovery = two_worker_client.compute([lazy.p2_p1, lazy.p02_p01], sync=True)
    expected = gd.oblique_shock(mach, deflection=turn, errors="nan")
    np.testing.assert_array_equal(p2_p1, expected.p2_p1)  # blockwise: the same numbers
    np.testing.assert_array_equal(recovery, expected.p02_p01)
    workers = two_worker_client.scheduler_info()["workers"]
    assert len(workers) == 2


def test_labelled_lazy_sweep_on_the_cluster(two_worker_client):
    mach = xr.DataArray(da.from_array(np.linspace(1.5, 4.0, 400), chunks=100), dims="mach",
                        coords={"mach": np.linspace(1.5, 4.0, 400)})
    turn = xr.DataArray(np.radians(np.linspace(1.0, 15.0, 50)), dims="turn")
    shock = gd.oblique_shock(mach, deflection=turn, errors="nan")
    table = shock.to_xarray()
    assert type(table.p2_p1.data).__module__.startswith("dask")  # still lazy
    computed = table.compute()
    assert computed.p2_p1.dims == ("mach", "turn")
    plain = gd.oblique_shock(mach.values[:, None], deflection=turn.values[None, :], errors="nan")
    np.testing.assert_array_equal(computed.p2_p1.values, plain.p2_p1)
    # detached cases are NaN under errors="nan", attached ones finite
    detached = turn.values[None, :] > gd.max_deflection(mach.values)[0][:, None]
    assert np.isnan(computed.p2_p1.values[detached]).all()
    assert np.isfinite(computed.p2_p1.values[~detached]).all()
