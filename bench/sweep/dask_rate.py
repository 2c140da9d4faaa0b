"""Dask rates for bench/sweep.ts: rhosigma.sweep of the given spec on a LocalCluster (127.0.0.1, no dashboard)
with one and with two worker processes (one thread each), after a warm-up sweep that starts each worker's
engine and runs about a thousand points on each, and a pause for the engines' own idle warm-up. Prints {"one": points/s, "two": points/s, "points": n, "cpuOne", "cpuTwo": the engines' CPU time per
point in µs, from /proc of each worker's engine process}. The clusters are closed before it exits."""
import json
import sys
import time

import distributed

from rhosigma.sweeps import sweep_rows


def _engine_cpu():
    """CPU seconds used so far by this Dask worker's engine process (Linux /proc), or 0 without one."""
    import os

    from rhosigma.engine import default_engine

    pid = default_engine().pid
    if pid is None:
        return 0.0
    with open(f"/proc/{pid}/stat") as f:
        fields = f.read().rsplit(")", 1)[1].split()
    return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")


def rate(spec, workers):
    cluster = distributed.LocalCluster(n_workers=workers, threads_per_worker=1, processes=True, host="127.0.0.1", dashboard_address=None)
    try:
        with distributed.Client(cluster) as client:
            # Warm each worker's engine: about a thousand points each (the JIT compiles the point's path), then
            # idle time for the engine's own warm-up (src/ops/warm-up.ts runs after 250 ms without a request;
            # about a second of one core), so that neither is counted in the measured sweep.
            warm = dict(spec, samples=500 * workers, seed=spec["seed"] + 1)
            sweep_rows(warm, client=client, shards=workers, chunk=128)
            time.sleep(4)
            c0 = client.run(_engine_cpu)
            t0 = time.perf_counter()
            rows, _ = sweep_rows(spec, client=client, shards=workers, chunk=128)
            wall = time.perf_counter() - t0
            c1 = client.run(_engine_cpu)
            cpu = sum(c1[w] - c0.get(w, 0.0) for w in c1)
            return len(rows) / wall, len(rows), cpu / len(rows) * 1e6
    finally:
        cluster.close()


def main():
    spec = json.load(sys.stdin)["spec"]
    one, n, cpu_one = rate(spec, 1)
    two, _, cpu_two = rate(spec, 2)
    print(json.dumps({"one": one, "two": two, "points": n, "cpuOne": cpu_one, "cpuTwo": cpu_two}))


if __name__ == "__main__":  # the workers' processes import this module again
    main()
