"""A design sweep of 100,000 cases as a map over partitions on a Dask LocalCluster with two
worker processes gives, bit for bit, the single-process batch call's results."""

import importlib.util

import numpy as np


def load_example(root):
    spec = importlib.util.spec_from_file_location("dask_sweep", root / "examples" / "dask_sweep.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def test_sweep_on_a_local_cluster_matches_one_process(root):
    from dask.distributed import Client, LocalCluster

    import flashduty

    example = load_example(root)
    z, t_k, p_pa = example.cases(100_000)
    single = flashduty.flash_batch(example.NAMES, z, t_k, p_pa)["vapour_fraction"]
    with LocalCluster(n_workers=2, threads_per_worker=1, dashboard_address=None) as cluster, Client(cluster) as client:
        assert len(client.scheduler_info()["workers"]) == 2
        beta = example.sweep(client, z, t_k, p_pa, rows_per_partition=12_500)
    assert beta.shape == (100_000,)
    assert np.array_equal(beta, single)
    assert 0.05 < np.mean((beta > 0) & (beta < 1)) < 0.95
