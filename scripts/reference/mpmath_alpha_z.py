"""The α-z Rényi divergence D_{α,z}(ρ‖σ) = log2 Tr[(σ^{(1−α)/2z} ρ^{α/z} σ^{(1−α)/2z})^z]/(α − 1) (Audenaert and Datta,
J. Math. Phys. 56 (2015) 022202; z = α is the sandwiched divergence) in mpmath at 60 significant digits, for
the requests of a sweep's reproducer: stdin a JSON list of protocol requests (those with "op": "divergence",
"family": "alpha-z" are evaluated, from the double-precision matrices they carry, taken as exact), stdout
{id: value} as strings with 30 digits. Eigenvalues below 1e-40 (relative) count as zero. Used by
test/sweep/facts.test.ts to confirm a counterexample independently of the engine's floating point.
"""
import json
import sys

import mpmath

mpmath.mp.dps = 60


def matrix(value):
    if isinstance(value, dict) and "matrix" in value:
        value = value["matrix"]
    if isinstance(value, dict):
        re, im = value["re"], value.get("im")
    else:
        re, im = value, None
    n = len(re)
    return mpmath.matrix([[mpmath.mpc(re[i][j], im[i][j] if im else 0) for j in range(n)] for i in range(n)])


def power(h, p):
    h = (h + h.transpose_conj()) / 2
    e, q = mpmath.eighe(h)
    top = max(abs(x) for x in e)
    d = mpmath.diag([x ** p if x > top * mpmath.mpf("1e-40") else mpmath.mpf(0) for x in e])
    return q * d * q.transpose_conj()


def alpha_z(rho, sigma, a, z):
    s = power(sigma, (1 - a) / (2 * z))
    x = s * power(rho, a / z) * s
    x = (x + x.transpose_conj()) / 2
    e, _ = mpmath.eighe(x)
    top = max(abs(v) for v in e)
    total = mpmath.fsum(v ** z for v in e if v > top * mpmath.mpf("1e-40"))
    return mpmath.log(total, 2) / (a - 1)


def main():
    out = {}
    for r in json.load(sys.stdin):
        if r.get("op") == "divergence" and r.get("family") == "alpha-z":
            a, z = mpmath.mpf(r["alpha"]), mpmath.mpf(r["z"])
            out[str(r.get("id"))] = mpmath.nstr(alpha_z(matrix(r["rho"]), matrix(r["sigma"]), a, z), 30)
    print(json.dumps(out))


if __name__ == "__main__":
    main()
