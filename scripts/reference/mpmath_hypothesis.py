#!/usr/bin/env python3
"""Exact values of the hypothesis-testing relative entropy near both ends of eps, from closed forms
evaluated with mpmath at 50 digits (mpmath from PyPI in .venv; numpy only draws the random states).

Convention (Wang & Renner, PRL 108, 200501 (2012)): D_H^eps = -log2 min{Tr s L : 0 <= L <= I, Tr r L >= 1 - eps}.
Closed forms (quantum Neyman-Pearson; derivation in src/oneshot/neyman-pearson.ts):
  eps -> 1: the optimal test is rank one, beta = (1 - eps) / lambda_max(s^(-1/2) r s^(-1/2)), valid while
            1 - eps <= <v|r|v> for the normalised v = s^(-1/2) y, y the top eigenvector;
  eps -> 0 (r of full rank): beta = Tr s - eps * lambda_max(r^(-1/2) s r^(-1/2)), valid while
            eps <= <u|r|u> for the normalised u = r^(-1/2) x, x the top eigenvector.
Each case records whether its closed form applies ("valid"); the value is given as a decimal string
with 30 significant digits.

Usage: mpmath_hypothesis.py [--seed N] [--count N] [--out PATH|-]   (count: pairs per dimension 2..6)
"""
import argparse
import json
import sys

import mpmath
import numpy as np

EPSILONS = (1e-9, 1e-6, 1e-3, 0.999, 1 - 1e-6, 1 - 1e-9)


def rand_state(rng, n):
    g = rng.standard_normal((n, n)) + 1j * rng.standard_normal((n, n))
    p = g @ g.conj().T
    p = p / np.trace(p).real
    return 0.5 * (p + p.conj().T)


def to_mp(a):
    n = a.shape[0]
    return mpmath.matrix([[mpmath.mpc(float(a[i, j].real), float(a[i, j].imag)) for j in range(n)] for i in range(n)])


def herm_fn(m, f):
    """f(M) for Hermitian M through its eigendecomposition (mpmath.eighe)."""
    e, q = mpmath.eighe(m)
    n = m.rows
    d = mpmath.diag([f(mpmath.re(e[i])) for i in range(n)])
    return q * d * q.transpose_conj()


def top(m):
    e, q = mpmath.eighe(m)
    n = m.rows
    k = max(range(n), key=lambda i: mpmath.re(e[i]))
    return mpmath.re(e[k]), q[:, k]


def quad(v, m):
    return mpmath.re((v.transpose_conj() * m * v)[0])


def closed_forms(r, s, eps):
    out = {}
    tr_s = mpmath.re(sum(s[i, i] for i in range(s.rows)))
    e = mpmath.mpf(eps)
    # eps -> 0
    ri = herm_fn(r, lambda x: 1 / mpmath.sqrt(x))
    mu_d, x = top(ri * s * ri)
    u = ri * x
    u = u / mpmath.sqrt(quad(u, mpmath.eye(r.rows)))
    w_d = quad(u, r)
    out["low"] = {"valid": bool(e <= w_d), "value": -mpmath.log(tr_s - e * mu_d, 2)}
    # eps -> 1
    si = herm_fn(s, lambda x: 1 / mpmath.sqrt(x))
    lam, y = top(si * r * si)
    v = si * y
    v = v / mpmath.sqrt(quad(v, mpmath.eye(s.rows)))
    w_1 = quad(v, r)
    out["high"] = {"valid": bool(1 - e <= w_1), "value": -mpmath.log((1 - e) / lam, 2)}
    return out


def rows(a):
    return {"re": a.real.tolist(), "im": a.imag.tolist()}


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=2025)
    ap.add_argument("--count", type=int, default=2)
    ap.add_argument("--out", default="-")
    args = ap.parse_args()
    mpmath.mp.dps = 50
    rng = np.random.default_rng(args.seed)
    cases = []
    for d in range(2, 7):
        for k in range(args.count):
            r = rand_state(rng, d)
            s = rand_state(rng, d)
            rm, sm = to_mp(r), to_mp(s)
            # The convention of the engine: rho divided by its trace (here exactly, at 50 digits; the
            # float entries of r sum to 1 only up to rounding, which shifts eps by ~1e-16).
            rm = rm / mpmath.re(sum(rm[i, i] for i in range(d)))
            for eps in EPSILONS:
                cf = closed_forms(rm, sm, eps)["low" if eps < 0.5 else "high"]
                cases.append({
                    "name": f"d={d} pair {k} eps={eps!r}",
                    "rho": rows(r), "sigma": rows(s), "epsilon": eps,
                    "valid": cf["valid"], "value": mpmath.nstr(cf["value"], 30),
                })
    doc = {"generator": "scripts/reference/mpmath_hypothesis.py", "mpmath": mpmath.__version__, "numpy": np.__version__,
           "digits": mpmath.mp.dps, "seed": args.seed, "cases": cases}
    text = json.dumps(doc, indent=1)
    if args.out == "-":
        sys.stdout.write(text + "\n")
    else:
        with open(args.out, "w") as f:
            f.write(text + "\n")


if __name__ == "__main__":
    main()
