"""Dask rates for bench/sweep.ts: rhosigma.sweep of the given spec on a LocalCluster (127.0.0.1, no dashboard)
with one and with two worker processes (one thread each), after a warm-up sweep that starts each worker's
engine. Prints {"one": points/s, "two": points/s, "points": n}. The clusters are closed before it exits."""
import json
import sys
import time

import distributed

from rhosigma.sweeps import sweep_rows


def rate(spec, workers):
    cluster = distributed.LocalCluster(n_workers=workers, threads_per_worker=1, processes=True, host="127.0.0.1", dashboard_address=None)
    try:
        with distributed.Client(cluster) as client:
            warm = dict(spec, samples=4)
            sweep_rows(warm, client=client, shards=workers, chunk=64)
            t0 = time.perf_counter()
            rows, _ = sweep_rows(spec, client=client, shards=workers, chunk=128)
            return len(rows) / (time.perf_counter() - t0), len(rows)
    finally:
        cluster.close()


def main():
    spec = json.load(sys.stdin)["spec"]
    one, n = rate(spec, 1)
    two, _ = rate(spec, 2)
    print(json.dumps({"one": one, "two": two, "points": n}))


if __name__ == "__main__":  # the workers' processes import this module again
    main()
