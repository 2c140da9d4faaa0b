"""Python half of bench/python-bridge.ts: round-trip times of rhosigma.compute after start-up.

Prints one JSON object: for each case, the request exactly as sent (protocol form; large matrices
packed), the median wall time of `rhosigma.compute(request)` over K calls after a warm-up that lets the
engine's JIT settle, and the package's own CPU time per request (encoding the request, decoding the
answer: process time, so other load on the machine hardly moves it). The TypeScript half times the engine's own `handle()` on the same
requests in the same run, so that the difference is what the Python path adds. Not a test.

Usage: .venv/bin/python kernel-bridge/bench_overhead.py [K]
"""
from __future__ import annotations

import json
import statistics
import sys
import time

import numpy as np

import rhosigma
from rhosigma.answer import Answer
from rhosigma.convert import to_protocol
from rhosigma.engine import _Prepared


def density(d: int, rng: np.random.Generator) -> np.ndarray:
    g = rng.normal(size=(d, d)) + 1j * rng.normal(size=(d, d))
    p = g @ g.conj().T
    return p / np.trace(p).real


def hermitian(d: int, rng: np.random.Generator) -> np.ndarray:
    g = rng.normal(size=(d, d)) + 1j * rng.normal(size=(d, d))
    return (g + g.conj().T) / 2


def cases() -> list[tuple[str, dict]]:
    rng = np.random.default_rng(8)
    return [
        ("entropy, qubit", {"op": "entropy", "rho": np.diag([0.75, 0.25])}),
        ("sandwiched divergence, two qubits", {"op": "divergence", "family": "sandwiched", "alpha": 2.0, "rho": density(4, rng), "sigma": density(4, rng)}),
        ("spectrum 32×32 (packed)", {"op": "spectrum", "matrix": hermitian(32, rng)}),
        ("spectrum 128×128 (packed)", {"op": "spectrum", "matrix": hermitian(128, rng)}),
    ]


def main() -> None:
    k = int(sys.argv[1]) if len(sys.argv) > 1 else 200
    engine = rhosigma.default_engine()
    engine.start()
    out = []
    for name, request in cases():
        warm_until = time.perf_counter() + 1.0
        n = 0
        while n < 50 or time.perf_counter() < warm_until:
            rhosigma.compute(request).raise_for_error()
            n += 1
        times = []
        for _ in range(k):
            t0 = time.perf_counter()
            rhosigma.compute(request)
            times.append((time.perf_counter() - t0) * 1e3)
        line = json.dumps(engine.compute_raw([request])[0]).encode("utf-8")
        t0 = time.process_time()
        for _ in range(k):
            _Prepared(request)
            Answer.from_protocol(json.loads(line.decode("utf-8")), request)
        cpu = (time.process_time() - t0) / k * 1e3
        out.append({"name": name, "request": to_protocol(request), "medianMs": statistics.median(times), "pythonCpuMs": cpu})
    print(json.dumps({"cases": out}))


if __name__ == "__main__":
    main()
