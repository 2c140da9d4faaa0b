#!/usr/bin/env python3
"""Reference timings for bench/eigh.ts: numpy.linalg.eigh on random complex Hermitian matrices.

Run with .venv/bin/python (numpy's wheel, on OpenBLAS). The caller sets
OPENBLAS_NUM_THREADS=1 (and removes OPENBLAS_CORETYPE / OPENBLAS_L2_SIZE) so the comparison is
single-threaded like the JavaScript side.

Usage: numpy_eigh_bench.py N [N ...] [--reps R] [--warmup W]
Prints one JSON object: numpy version, the OpenBLAS kernel (as threadpoolctl sees it when that
package is installed, otherwise as OpenBLAS itself reports through openblas_get_corename), and
per size the median seconds of eigh (values and vectors) and eigvalsh (values only), wall clock
and (keys ending in _cpu) CPU time of the process.
"""
import ctypes
import ctypes.util
import json
import os
import sys
import time

import numpy as np


def openblas_info():
    info = {"threadpoolctl": None, "corename": None, "config": None}
    try:
        import threadpoolctl  # type: ignore

        for lib in threadpoolctl.threadpool_info():
            if lib.get("internal_api") == "openblas":
                info["threadpoolctl"] = {
                    "architecture": lib.get("architecture"),
                    "version": lib.get("version"),
                    "num_threads": lib.get("num_threads"),
                    "filepath": lib.get("filepath"),
                }
                break
    except ImportError:
        info["threadpoolctl"] = "not installed"
    for name in ("openblas", "openblasp-r0.3.21"):
        path = ctypes.util.find_library(name) or "libopenblas.so.0"
        try:
            lib = ctypes.CDLL(path)
            lib.openblas_get_corename.restype = ctypes.c_char_p
            lib.openblas_get_config.restype = ctypes.c_char_p
            info["corename"] = lib.openblas_get_corename().decode()
            info["config"] = lib.openblas_get_config().decode()
            break
        except (OSError, AttributeError):
            continue
    return info


def median_time(fn, reps, warmup, clock=time.perf_counter):
    for _ in range(warmup):
        fn()
    ts = []
    for _ in range(reps):
        t = clock()
        fn()
        ts.append(clock() - t)
    ts.sort()
    m = len(ts)
    return ts[m // 2] if m % 2 else 0.5 * (ts[m // 2 - 1] + ts[m // 2])


def main():
    args = sys.argv[1:]
    reps, warmup, sizes = 9, 3, []
    i = 0
    while i < len(args):
        if args[i] == "--reps":
            reps = int(args[i + 1]); i += 2
        elif args[i] == "--warmup":
            warmup = int(args[i + 1]); i += 2
        else:
            sizes.append(int(args[i])); i += 1
    rng = np.random.default_rng(12345)
    out = {
        "numpy": np.__version__,
        "openblas": openblas_info(),
        "env": {k: os.environ.get(k) for k in ("OPENBLAS_NUM_THREADS", "OPENBLAS_CORETYPE", "OPENBLAS_L2_SIZE")},
        "sizes": {},
    }
    for n in sizes:
        g = rng.standard_normal((n, n)) + 1j * rng.standard_normal((n, n))
        h = 0.5 * (g + g.conj().T)
        out["sizes"][str(n)] = {
            "eigh": median_time(lambda: np.linalg.eigh(h), reps, warmup),
            "eigvalsh": median_time(lambda: np.linalg.eigvalsh(h), reps, warmup),
            # CPU time of this process (one OpenBLAS thread): less disturbed by other load.
            "eigh_cpu": median_time(lambda: np.linalg.eigh(h), reps, warmup, time.process_time),
            "eigvalsh_cpu": median_time(lambda: np.linalg.eigvalsh(h), reps, warmup, time.process_time),
        }
    print(json.dumps(out))


if __name__ == "__main__":
    main()
