"""numpy's rate for the sweep benchmark's evaluations (bench/sweep.ts): for each α and sample, two
Hilbert–Schmidt random two-qubit states (G G†/Tr, G a 4×4 complex Ginibre matrix) and the sandwiched Rényi
divergence D̃_α(ρ‖σ) = log2 Tr[(σ^{(1−α)/2α} ρ σ^{(1−α)/2α})^α]/(α − 1) by numpy.linalg.eigh. Prints
{"rate": points per second}. One thread (OPENBLAS_NUM_THREADS=1 is set by the caller and here)."""
import json
import os
import sys
import time

os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
import numpy as np  # noqa: E402


def hs_state(rng):
    g = (rng.standard_normal((4, 4)) + 1j * rng.standard_normal((4, 4))) / np.sqrt(2)
    r = g @ g.conj().T
    return r / np.trace(r).real


def power(h, p):
    w, v = np.linalg.eigh(h)
    w = np.where(w > 1e-12 * w.max(), w, 0.0)
    f = np.zeros_like(w)
    f[w > 0] = w[w > 0] ** p
    return (v * f) @ v.conj().T


def sandwiched(rho, sigma, alpha):
    s = power(sigma, (1 - alpha) / (2 * alpha))
    q = np.linalg.eigvalsh(s @ rho @ s)
    q = q[q > 0]
    return np.log2(np.sum(q ** alpha)) / (alpha - 1)


def main():
    args = json.load(sys.stdin)
    rng = np.random.default_rng(1)
    n = 0
    t0 = time.perf_counter()
    for alpha in args["alphas"]:
        for _ in range(args["samples"]):
            sandwiched(hs_state(rng), hs_state(rng), alpha)
            n += 1
    print(json.dumps({"rate": n / (time.perf_counter() - t0)}))


if __name__ == "__main__":
    main()
