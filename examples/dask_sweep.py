"""Invented example: a Monte Carlo sweep of a wet naphtha-like feed's composition, temperature
and pressure (the flash's vapour fraction over 100,000 cases), run as a map over partitions
on a Dask cluster with the flashduty Python package. The same code runs on one machine
(`LocalCluster`) or on a cluster (pass the scheduler's address to `Client`).

    python examples/dask_sweep.py            # 100,000 cases on a local two-worker cluster

Results are estimates from ideal-mixture models; equipment design and operation follow the
applicable local codes and the judgement of a qualified, licensed engineer.
"""

import numpy as np

import flashduty

NAMES = ["n-pentane", "n-hexane", "n-heptane", "toluene", "p-xylene"]


def cases(rows, seed=20261203):
    """Random feeds around an invented base composition, temperatures and pressures."""
    rng = np.random.default_rng(seed)
    base = np.array([0.15, 0.30, 0.25, 0.20, 0.10])
    z = rng.dirichlet(base * 50.0, size=rows)
    t_k = rng.uniform(330.0, 400.0, size=rows)
    p_pa = rng.uniform(0.8e5, 2.5e5, size=rows)
    return z, t_k, p_pa


def sweep(client, z, t_k, p_pa, rows_per_partition=10_000):
    """The vapour fraction of every case, computed partition by partition on the cluster
    behind `client`."""
    import dask.array as da

    names = list(NAMES)

    def partition(zb, tb, pb):
        # Runs on a worker: one batch call per partition (parallel inside, GIL released).
        return flashduty.flash_batch(names, zb, tb[:, 0], pb[:, 0])["vapour_fraction"]

    zd = da.from_array(z, chunks=(rows_per_partition, z.shape[1]))
    td = da.from_array(t_k[:, None], chunks=(rows_per_partition, 1))
    pd_ = da.from_array(p_pa[:, None], chunks=(rows_per_partition, 1))
    beta = da.map_blocks(partition, zd, td, pd_, dtype=np.float64, drop_axis=1)
    return client.compute(beta).result()


def main(rows=100_000):
    from dask.distributed import Client, LocalCluster

    z, t_k, p_pa = cases(rows)
    with LocalCluster(n_workers=2, threads_per_worker=1, dashboard_address=None) as cluster, Client(cluster) as client:
        beta = sweep(client, z, t_k, p_pa)
    print(f"{rows} cases: mean vapour fraction {beta.mean():.4f}, two-phase in {np.mean((beta > 0) & (beta < 1)):.1%}")
    return beta


if __name__ == "__main__":
    main()
