#!/usr/bin/env python3
"""Reference values of rhosigma's one-shot entropic quantities, computed by cvxopt (cvxopt from PyPI in .venv).

Each quantity is written here straight from its definition as an SDP in cvxopt's inequality form
(minimize c.x s.t. h - sum_i x_i G_i PSD, Gl x <= hl, A x = b), independently of how rhosigma
writes it (rhosigma often solves the dual or a compressed form). Hermitian matrices enter through
the real embedding H -> [[Re H, -Im H], [Im H, Re H]], which is PSD exactly when H is; a Hermitian
variable is parametrised by its real coordinates (Re H_ii; Re H_ij and Im H_ij for i < j), a
general complex one by the real and imaginary parts of every entry.

  hypothesis:      D_H^eps(rho||sigma) = -log2 min{Tr sigma L : 0 <= L <= I, Tr rho L >= 1 - eps}
                   (Wang & Renner, PRL 108, 200501 (2012); un-normalised convention)
  min-entropy:     H_min(A|B) = -log2 min{Tr s_B : I_A (x) s_B >= rho_AB}  (Koenig, Renner & Schaffner 2009)
  max-entropy:     H_max(A|B) = log2 max{(Re Tr X)^2 : [[rho_AB, X], [X*, I_A (x) s_B]] >= 0, Tr s_B = 1}
                   (KRS 2009 with the fidelity SDP ||sqrt(P) sqrt(Q)||_1 = max Re Tr X, Watrous 2018 Thm 3.17)
  smooth-max:      D_max^eps(rho||sigma) = log2 min{l : r <= l sigma, [[rho, X], [X*, r]] >= 0,
                   Re Tr X >= sqrt(1 - eps^2), Tr r <= 1}  (Tomamichel 2016, purified-distance ball,
                   generalised fidelity with Tr rho = 1)
  max-information: I_max(A:B) = log2 min{Tr s_B : rho_A (x) s_B >= rho_AB}  (Berta, Christandl & Renner 2011)

Usage: cvxopt_oneshot.py [--seed N] [--count N] [--only KIND ...] [--out PATH|-]
  --count N: instances per quantity. Writes JSON {generator, cvxopt, numpy, seed, cases: [...]}; each
  case has kind, name, the inputs (matrices as {re, im} rows), value (base 2), optimum (the SDP's
  optimal objective before the logarithm) and cvxoptStatus.
With --solve-hypothesis-stdin: read {"cases": [{rho, sigma, epsilon}], "repeats": R} and print, per
case, the value and the median time of cvxopt.solvers.sdp alone (for bench/oneshot.ts).
"""
import argparse
import json
import sys
import time

import numpy as np
import cvxopt
from cvxopt import matrix, solvers

from cvxopt_ladder import set_tolerance, solve_sdp

from embedding import embed, hermitian_basis


# ----------------------------------------------------------------------------------------------
# Building blocks

def rand_state(rng, n, rank=None):
    k = n if rank is None else rank
    g = rng.standard_normal((n, k)) + 1j * rng.standard_normal((n, k))
    p = g @ g.conj().T
    return p / np.trace(p).real


def complex_basis(r, c):
    """Matrices M with X = sum x_k M_k over real and imaginary parts of every entry of an r x c matrix."""
    out = []
    for i in range(r):
        for j in range(c):
            e = np.zeros((r, c), dtype=complex)
            e[i, j] = 1
            out.append(e)
            f = np.zeros((r, c), dtype=complex)
            f[i, j] = 1j
            out.append(f)
    return out


def hermitian_from(x, d):
    return sum(xc * b for xc, b in zip(x, hermitian_basis(d)))


def rows(m):
    m = np.asarray(m)
    return {"re": [[float(v) for v in r] for r in m.real], "im": [[float(v) for v in r] for r in m.imag]}


class Lmi:
    """Collects LMIs h - sum_i x_i G_i >= 0 over a variable vector of fixed length."""

    def __init__(self, nvar):
        self.nvar = nvar
        self.gs, self.hs = [], []

    def add(self, h, coeffs):
        """h: Hermitian constant (size n); coeffs: {variable index: Hermitian coefficient G_i}."""
        eh = embed(h)
        size = eh.shape[0]
        g = np.zeros((size * size, self.nvar))
        for i, a in coeffs.items():
            g[:, i] = embed(a).flatten(order="F")
        self.gs.append(matrix(g))
        self.hs.append(matrix(eh))


def solve(c, lmi, gl=None, hl=None, a=None, b=None, ladder=(1e-10, 1e-9, 1e-8, 1e-7)):
    kwargs = {}
    if gl is not None:
        kwargs["Gl"] = matrix(np.asarray(gl, dtype=float))
        kwargs["hl"] = matrix(np.asarray(hl, dtype=float))
    if a is not None:
        kwargs["A"] = matrix(np.asarray(a, dtype=float))
        kwargs["b"] = matrix(np.asarray(b, dtype=float))
    # Down the shared tolerance ladder (cvxopt_ladder.py); the tolerance used is recorded with the
    # case; 1e-7 still leaves the relative gap near 1e-8 on these problems.
    return solve_sdp(matrix(np.asarray(c, dtype=float)), ladder=ladder, Gs=lmi.gs, hs=lmi.hs, **kwargs)


# ----------------------------------------------------------------------------------------------
# The quantities, from their definitions

def hypothesis_testing_problem(rho, sigma, eps):
    """cvxopt data (c, lmi, Gl, hl) of the D_H^eps SDP over the real coordinates of L."""
    d = rho.shape[0]
    basis = hermitian_basis(d)
    nv = len(basis)
    lmi = Lmi(nv)
    lmi.add(np.zeros((d, d)), {i: -b for i, b in enumerate(basis)})  # L >= 0
    lmi.add(np.eye(d), {i: b for i, b in enumerate(basis)})  # I - L >= 0
    c = [np.trace(sigma @ b).real for b in basis]
    gl = [[-np.trace(rho @ b).real for b in basis]]  # -Tr rho L <= -(1 - eps)
    return c, lmi, gl, [-(1 - eps)]


def hypothesis_testing(rho, sigma, eps, ladder=(1e-10, 1e-9, 1e-8, 1e-7)):
    c, lmi, gl, hl = hypothesis_testing_problem(rho, sigma, eps)
    sol = solve(c, lmi, gl, hl, ladder=ladder)
    beta = float(sol["primal objective"])
    return {"value": -np.log2(beta), "optimum": beta, "sol": sol}


def min_entropy(rho_ab, da, db):
    basis = hermitian_basis(db)
    lmi = Lmi(len(basis))
    lmi.add(-rho_ab, {i: -np.kron(np.eye(da), b) for i, b in enumerate(basis)})  # I (x) s - rho >= 0
    c = [np.trace(b).real for b in basis]
    sol = solve(c, lmi)
    opt = float(sol["primal objective"])
    return {"value": -np.log2(opt), "optimum": opt, "sol": sol}


def max_entropy(rho_ab, da, db):
    n = da * db
    hb = hermitian_basis(db)
    cb = complex_basis(n, n)
    nv = len(hb) + len(cb)
    coeffs = {}
    for i, b in enumerate(hb):
        g = np.zeros((2 * n, 2 * n), dtype=complex)
        g[n:, n:] = -np.kron(np.eye(da), b)
        coeffs[i] = g
    for k, m in enumerate(cb):
        g = np.zeros((2 * n, 2 * n), dtype=complex)
        g[:n, n:] = -m
        g[n:, :n] = -m.conj().T
        coeffs[len(hb) + k] = g
    h = np.zeros((2 * n, 2 * n), dtype=complex)
    h[:n, :n] = rho_ab
    lmi = Lmi(nv)
    lmi.add(h, coeffs)
    c = np.zeros(nv)
    for k, m in enumerate(cb):
        c[len(hb) + k] = -np.trace(m).real  # minimize -Re Tr X
    a = np.zeros((1, nv))
    for i, b in enumerate(hb):
        a[0, i] = np.trace(b).real
    sol = solve(c, lmi, a=a, b=[1.0])
    root = -float(sol["primal objective"])
    return {"value": 2 * np.log2(root), "optimum": root, "sol": sol}


def smooth_max(rho, sigma, eps):
    n = rho.shape[0]
    hb = hermitian_basis(n)
    cb = complex_basis(n, n)
    # variables: lambda, coordinates of r (the smoothed state), entries of X
    i_l, i_r, i_x = 0, 1, 1 + len(hb)
    nv = 1 + len(hb) + len(cb)
    lmi = Lmi(nv)
    # lambda sigma - r >= 0
    co = {i_l: -sigma}
    for k, b in enumerate(hb):
        co[i_r + k] = b
    lmi.add(np.zeros((n, n)), co)
    # [[rho, X], [X*, r]] >= 0
    co = {}
    for k, b in enumerate(hb):
        g = np.zeros((2 * n, 2 * n), dtype=complex)
        g[n:, n:] = -b
        co[i_r + k] = g
    for k, m in enumerate(cb):
        g = np.zeros((2 * n, 2 * n), dtype=complex)
        g[:n, n:] = -m
        g[n:, :n] = -m.conj().T
        co[i_x + k] = g
    h = np.zeros((2 * n, 2 * n), dtype=complex)
    h[:n, :n] = rho
    lmi.add(h, co)
    gl = np.zeros((2, nv))
    for k, m in enumerate(cb):
        gl[0, i_x + k] = -np.trace(m).real  # -Re Tr X <= -sqrt(1 - eps^2)
    for k, b in enumerate(hb):
        gl[1, i_r + k] = np.trace(b).real  # Tr r <= 1
    c = np.zeros(nv)
    c[i_l] = 1
    sol = solve(c, lmi, gl, [-np.sqrt(1 - eps * eps), 1.0])
    lam = float(sol["primal objective"])
    return {"value": np.log2(lam), "optimum": lam, "sol": sol}


def max_information(rho_ab, da, db):
    rho_a = np.trace(rho_ab.reshape(da, db, da, db), axis1=1, axis2=3)
    basis = hermitian_basis(db)
    lmi = Lmi(len(basis))
    lmi.add(-rho_ab, {i: -np.kron(rho_a, b) for i, b in enumerate(basis)})  # rho_A (x) s - rho_AB >= 0
    c = [np.trace(b).real for b in basis]
    sol = solve(c, lmi)
    opt = float(sol["primal objective"])
    return {"value": np.log2(opt), "optimum": opt, "sol": sol}


# ----------------------------------------------------------------------------------------------
# Random instances

BIPARTITE = [(2, 2), (2, 3), (3, 2), (2, 4)]


def record(kind, name, inputs, res):
    return {
        "kind": kind,
        "name": name,
        **inputs,
        "value": float(res["value"]),
        "optimum": float(res["optimum"]),
        "cvxoptStatus": res["sol"]["status"],
        "cvxoptTolerance": res["sol"]["tolerance"],
    }


def cases_hypothesis(rng, count):
    out = []
    for k in range(count):
        d = 2 + k % 3
        rho = rand_state(rng, d)
        sigma = rand_state(rng, d) * float(rng.uniform(0.5, 2.0))
        eps = float(rng.uniform(0.05, 0.5))
        res = hypothesis_testing(rho, sigma, eps)
        out.append(record("hypothesis-testing", f"D_H d={d} #{k}", {"rho": rows(rho), "sigma": rows(sigma), "epsilon": eps}, res))
    return out


def cases_min_entropy(rng, count):
    out = []
    for k in range(count):
        da, db = BIPARTITE[k % len(BIPARTITE)]
        rho = rand_state(rng, da * db)
        res = min_entropy(rho, da, db)
        out.append(record("conditional-min-entropy", f"H_min {da}x{db} #{k}", {"rho": rows(rho), "dims": [da, db]}, res))
    return out


def cases_max_entropy(rng, count):
    out = []
    for k in range(count):
        da, db = BIPARTITE[k % len(BIPARTITE)]
        rho = rand_state(rng, da * db)
        res = max_entropy(rho, da, db)
        out.append(record("conditional-max-entropy", f"H_max {da}x{db} #{k}", {"rho": rows(rho), "dims": [da, db]}, res))
    return out


def cases_smooth_max(rng, count):
    out = []
    for k in range(count):
        d = 2 + k % 3
        rho = rand_state(rng, d)
        sigma = rand_state(rng, d)
        eps = float(rng.uniform(0.05, 0.4))
        res = smooth_max(rho, sigma, eps)
        out.append(record("smooth-max-divergence", f"D_max^eps d={d} #{k}", {"rho": rows(rho), "sigma": rows(sigma), "epsilon": eps}, res))
    return out


def cases_max_information(rng, count):
    out = []
    for k in range(count):
        da, db = BIPARTITE[k % len(BIPARTITE)]
        rho = rand_state(rng, da * db)
        res = max_information(rho, da, db)
        out.append(record("max-information", f"I_max {da}x{db} #{k}", {"rho": rows(rho), "dims": [da, db]}, res))
    return out


ALL = {
    "hypothesis-testing": cases_hypothesis,
    "conditional-min-entropy": cases_min_entropy,
    "conditional-max-entropy": cases_max_entropy,
    "smooth-max-divergence": cases_smooth_max,
    "max-information": cases_max_information,
}


def solve_hypothesis_stdin():
    """Timing mode for bench/oneshot.ts: the problem data is built once, then only
    cvxopt.solvers.sdp is timed (median over repeats), at tolerances 1e-8 (rhosigma's defaults)."""
    req = json.load(sys.stdin)
    repeats = int(req.get("repeats", 5))
    tol = float(req.get("tolerance", 1e-8))
    set_tolerance(tol)
    out = []
    for case in req["cases"]:
        rho = np.array(case["rho"]["re"]) + 1j * np.array(case["rho"]["im"])
        sigma = np.array(case["sigma"]["re"]) + 1j * np.array(case["sigma"]["im"])
        eps = float(case["epsilon"])
        c, lmi, gl, hl = hypothesis_testing_problem(rho, sigma, eps)
        cm, glm, hlm = matrix(np.asarray(c, dtype=float)), matrix(np.asarray(gl, dtype=float)), matrix(np.asarray(hl, dtype=float))
        times = []
        sol = None
        for _ in range(repeats):
            t0 = time.perf_counter()
            sol = solvers.sdp(cm, Gl=glm, hl=hlm, Gs=lmi.gs, hs=lmi.hs)
            times.append(time.perf_counter() - t0)
        beta = float(sol["primal objective"])
        out.append({
            "value": float(-np.log2(beta)),
            "status": sol["status"],
            "seconds": float(np.median(times)),
            "iterations": int(sol["iterations"]),
        })
    json.dump({"cvxopt": cvxopt.__version__, "results": out}, sys.stdout)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--count", type=int, default=4)
    ap.add_argument("--out", default="-")
    ap.add_argument("--only", action="append", choices=sorted(ALL), help="generate only these kinds (repeatable)")
    ap.add_argument("--solve-hypothesis-stdin", action="store_true")
    args = ap.parse_args()
    if args.solve_hypothesis_stdin:
        solve_hypothesis_stdin()
        return
    rng = np.random.default_rng(args.seed)
    cases = []
    for kind, f in ALL.items():
        if args.only and kind not in args.only:
            continue
        cases.extend(f(rng, args.count))
    doc = {
        "generator": "scripts/reference/cvxopt_oneshot.py",
        "cvxopt": cvxopt.__version__,
        "numpy": np.__version__,
        "seed": args.seed,
        "cases": cases,
    }
    text = json.dumps(doc, indent=1)
    if args.out == "-":
        sys.stdout.write(text + "\n")
    else:
        with open(args.out, "w") as fh:
            fh.write(text + "\n")


if __name__ == "__main__":
    main()
