#!/usr/bin/env python3
"""Reference values for rhosigma's guessing probability, diamond distance and fidelity of recovery,
each computed with cvxopt.solvers.sdp (cvxopt from PyPI in .venv) from an SDP built here with numpy,
independently of the TypeScript code (different formulation where one exists: the dual side).

  guessing   p_guess = min Tr Y  s.t.  Y - p_x rho_x >= 0 for every x
             (Yuen, Kennedy & Lax 1975; Holevo 1973). Variables: the d^2 real coordinates of Y.
  diamond    1/2 ||N - M||_diamond = min t  s.t.  Z >= 0,  Z - J >= 0,  t 1 - Tr_out Z >= 0,
             J = Choi matrix of N - M, J = sum_ij |i><j| (x) (N-M)(|i><j|), input factor first
             (Watrous, "Simpler semidefinite programs for completely bounded norms",
             Chicago J. Theor. Comput. Sci. 2013, the dual of his SDP for a difference of channels).
  recovery   sqrt F(A;C|B) = max Re Tr X  s.t.  [[rho_ABC, X], [X*, sigma(J)]] >= 0,  J >= 0,
             Tr_out J = 1_B, sigma(J) = (id_A (x) R_J)(rho_AB), R_J the map with Choi matrix J
             (fidelity of recovery, Seshadreesan & Wilde, Phys. Rev. A 92, 042321 (2015); the root
             fidelity as an SDP, Watrous, Theory of Computing 2013 / "The Theory of Quantum
             Information" (2018), Thm 3.17).

cvxopt has no complex cones: each Hermitian linear matrix inequality F(x) >= 0 is handed over as its
real embedding [[Re F, -Im F], [Im F, Re F]] >= 0 (same eigenvalues, each twice).

Usage:
  cvxopt_guessing.py [--seed N] [--count N] [--out PATH|-]   random cases (guessing, diamond, recovery)
  cvxopt_guessing.py --solve-stdin [--time R]                 solve {guessing: [...], diamond: [...]}
                                                               read from stdin; with --time, median
                                                               seconds of R calls to solvers.sdp
Writes JSON {generator, cvxopt, numpy, seed, guessing: [...], diamond: [...], recovery: [...]}.
States are {"re": rows, "im": rows}; channels {"kraus": [{"re", "im"}, ...], "from", "to"}.
"""
import argparse
import json
import sys
import time

import numpy as np
import cvxopt
from cvxopt import matrix

from reference_output import write_reference
from cvxopt_ladder import solve_sdp

from embedding import embed, hermitian_basis


# ----------------------------------------------------------------------------------------------
# Plain data

def cplx(m):
    m = np.asarray(m, dtype=complex)
    return {"re": [[float(v) for v in r] for r in m.real], "im": [[float(v) for v in r] for r in m.imag]}


def read_cplx(v):
    if isinstance(v, dict):
        re = np.array(v["re"], dtype=float)
        im = np.array(v["im"], dtype=float) if "im" in v else np.zeros_like(re)
        return re + 1j * im
    return np.array(v, dtype=float).astype(complex)


# ----------------------------------------------------------------------------------------------
# Random data

def random_density(rng, d, rank):
    g = rng.standard_normal((d, rank)) + 1j * rng.standard_normal((d, rank))
    p = g @ g.conj().T
    return p / np.trace(p).real


def random_channel_kraus(rng, din, dout, k):
    """Kraus operators of a random channel: a Haar-like isometry C^din -> C^dout (x) C^k, cut in k."""
    k = max(k, -(-din // dout))  # an isometry needs dout * k >= din
    g = rng.standard_normal((dout * k, din)) + 1j * rng.standard_normal((dout * k, din))
    q, r = np.linalg.qr(g)
    q = q * (np.diag(r) / np.abs(np.diag(r)))
    v = q[:, :din]  # isometry, rows indexed (out, env)
    v = v.reshape(dout, k, din)
    return [v[:, j, :] for j in range(k)]


def choi(kraus):
    din = kraus[0].shape[1]
    dout = kraus[0].shape[0]
    j = np.zeros((din * dout, din * dout), dtype=complex)
    for k in kraus:
        # column vector sum_i |i> (x) K|i>  (input factor first)
        v = np.zeros(din * dout, dtype=complex)
        for i in range(din):
            e = np.zeros(din)
            e[i] = 1
            v += np.kron(e, k[:, i])
        j += np.outer(v, v.conj())
    return j


# ----------------------------------------------------------------------------------------------
# Linear matrix inequalities in cvxopt's form  h - G x  in the PSD cone

def lmi(const, coeffs, nvars):
    """F(x) = const + sum_i x_i coeffs[i] >= 0, coeffs a dict {variable index: matrix}: (G, h)."""
    m = embed(const).shape[0]
    g = np.zeros((m * m, nvars))
    for i, f in coeffs.items():
        g[:, i] = -embed(f).flatten(order="F")
    return matrix(g), matrix(embed(const))


TOLERANCES = (1e-10, 1e-9, 1e-8)


def solve(c, gs, hs, a=None, b=None):
    # Down the shared tolerance ladder (cvxopt_ladder.py); the tolerance used is recorded with the case.
    kw = {} if a is None else {"A": matrix(a), "b": matrix(b)}
    return solve_sdp(matrix(c), ladder=TOLERANCES, Gs=gs, hs=hs, **kw)


def timed(fn, repeats):
    times = []
    out = None
    for _ in range(max(1, repeats)):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    times.sort()
    return out, times[len(times) // 2]


# ----------------------------------------------------------------------------------------------
# The three problems

def guessing_problem(probs, states):
    d = states[0].shape[0]
    basis = hermitian_basis(d)
    nv = len(basis)
    c = np.array([np.trace(e).real for e in basis])
    gs, hs = [], []
    for p, rho in zip(probs, states):
        g, h = lmi(-p * rho, dict(enumerate(basis)), nv)
        gs.append(g)
        hs.append(h)
    return lambda: solve(c, gs, hs)


def diamond_problem(kraus_a, kraus_b):
    din = kraus_a[0].shape[1]
    dout = kraus_a[0].shape[0]
    n = din * dout
    jmat = choi(kraus_a) - choi(kraus_b)
    basis = hermitian_basis(n)
    nv = 1 + len(basis)
    c = np.zeros(nv)
    c[0] = 1.0
    z_coeffs = {1 + k: e for k, e in enumerate(basis)}
    g1, h1 = lmi(np.zeros((n, n), dtype=complex), z_coeffs, nv)       # Z >= 0
    g2, h2 = lmi(-jmat, z_coeffs, nv)                                  # Z - J >= 0
    tr_coeffs = {0: np.eye(din, dtype=complex)}
    for k, e in enumerate(basis):
        tr_coeffs[1 + k] = -np.einsum("iojo->ij", e.reshape(din, dout, din, dout))
    g3, h3 = lmi(np.zeros((din, din), dtype=complex), tr_coeffs, nv)   # t 1 - Tr_out Z >= 0
    return lambda: solve(c, [g1, g2, g3], [h1, h2, h3])


def recovery_problem(rho_abc, da, db, dc):
    n = da * db * dc
    rho_ab = np.einsum("abcdec->abde", rho_abc.reshape(da, db, dc, da, db, dc)).reshape(da * db, da * db)
    r4 = rho_ab.reshape(da, db, da, db)
    dj = db * db * dc  # Choi matrix of R: B -> BC, input factor first
    jbasis = hermitian_basis(dj)
    nx = 2 * n * n
    nv = nx + len(jbasis)
    c = np.zeros(nv)
    coeffs = {}
    k = 0
    for i in range(n):
        for j in range(n):
            for part in (1, 1j):
                f = np.zeros((2 * n, 2 * n), dtype=complex)
                f[i, n + j] = part
                f[n + j, i] = np.conj(part)
                coeffs[k] = f
                if i == j and part == 1:
                    c[k] = -1.0  # maximise Re Tr X
                k += 1
    for q, e in enumerate(jbasis):
        e4 = e.reshape(db, db * dc, db, db * dc)
        sigma = np.einsum("abcd,bodp->aocp", r4, e4).reshape(n, n)
        f = np.zeros((2 * n, 2 * n), dtype=complex)
        f[n:, n:] = sigma
        coeffs[nx + q] = f
    const = np.zeros((2 * n, 2 * n), dtype=complex)
    const[:n, :n] = rho_abc
    g1, h1 = lmi(const, coeffs, nv)
    g2, h2 = lmi(np.zeros((dj, dj), dtype=complex), {nx + q: e for q, e in enumerate(jbasis)}, nv)
    # Tr_out J = 1_B: one row per real coordinate of a db x db Hermitian matrix.
    rows, rhs = [], []
    for eb in hermitian_basis(db):
        row = np.zeros(nv)
        for q, e in enumerate(jbasis):
            t = np.einsum("iojo->ij", e.reshape(db, db * dc, db, db * dc))
            row[nx + q] = np.real(np.trace(eb.conj().T @ t)) / np.real(np.trace(eb.conj().T @ eb))
        rows.append(row)
        rhs.append(np.real(np.trace(eb.conj().T @ np.eye(db))) / np.real(np.trace(eb.conj().T @ eb)))
    a = np.array(rows)
    b = np.array(rhs)
    return lambda: solve(c, [g1, g2], [h1, h2], a, b)


# ----------------------------------------------------------------------------------------------

def guessing_case(rng):
    n = int(rng.integers(2, 5))
    d = int(rng.integers(2, 5))
    probs = rng.dirichlet(np.ones(n))
    states = [random_density(rng, d, int(rng.integers(1, d + 1))) for _ in range(n)]
    sol = guessing_problem(list(probs), states)()
    return {
        "probabilities": [float(p) for p in probs],
        "states": [cplx(s) for s in states],
        "value": float(sol["primal objective"]),
        "cvxoptDualObjective": float(sol["dual objective"]),
        "cvxoptStatus": sol["status"],
        "cvxoptTolerance": sol["tolerance"],
    }


def diamond_case(rng):
    din = int(rng.integers(2, 4))
    dout = int(rng.integers(2, 4))
    ka = random_channel_kraus(rng, din, dout, int(rng.integers(1, 4)))
    kb = random_channel_kraus(rng, din, dout, int(rng.integers(1, 4)))
    sol = diamond_problem(ka, kb)()
    ch = lambda ks: {"kraus": [cplx(k) for k in ks], "from": [din], "to": [dout]}
    return {
        "a": ch(ka),
        "b": ch(kb),
        "value": float(sol["primal objective"]),
        "cvxoptDualObjective": float(sol["dual objective"]),
        "cvxoptStatus": sol["status"],
        "cvxoptTolerance": sol["tolerance"],
    }


def recovery_case(rng):
    dims = [2, 2, 2]
    n = 8
    rho = random_density(rng, n, n)  # full rank: the LMI then has strictly feasible points
    sol = recovery_problem(rho, *dims)()
    root = -float(sol["primal objective"])
    return {
        "rho": {"matrix": cplx(rho), "dims": dims},
        "a": [0], "b": [1], "c": [2],
        "root": root,
        "value": root * root,
        "cvxoptStatus": sol["status"],
        "cvxoptTolerance": sol["tolerance"],
    }


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=20240607)
    ap.add_argument("--count", type=int, default=8, help="cases of each of guessing and diamond")
    ap.add_argument("--recovery", type=int, default=None, help="fidelity-of-recovery cases (default count // 4, at least 1)")
    ap.add_argument("--out", default="-")
    ap.add_argument("--solve-stdin", action="store_true")
    ap.add_argument("--time", type=int, default=1)
    ap.add_argument("--tolerance", type=float, default=None,
                    help="with --solve-stdin: use only this abstol/reltol/feastol (no loosening retries), e.g. 1e-8 to match rhosigma's defaults")
    args = ap.parse_args()
    if args.tolerance is not None:
        global TOLERANCES
        TOLERANCES = (args.tolerance,)
    if args.solve_stdin:
        data = json.load(sys.stdin)
        out = {"cvxopt": cvxopt.__version__, "guessing": [], "diamond": []}
        for g in data.get("guessing", []):
            fn = guessing_problem(g["probabilities"], [read_cplx(s) for s in g["states"]])
            sol, sec = timed(fn, args.time)
            out["guessing"].append({"value": float(sol["primal objective"]), "seconds": sec, "iterations": sol["iterations"], "tolerance": sol["tolerance"]})
        for dd in data.get("diamond", []):
            fn = diamond_problem([read_cplx(k) for k in dd["a"]["kraus"]], [read_cplx(k) for k in dd["b"]["kraus"]])
            sol, sec = timed(fn, args.time)
            out["diamond"].append({"value": float(sol["primal objective"]), "seconds": sec, "iterations": sol["iterations"], "tolerance": sol["tolerance"]})
        sys.stdout.write(json.dumps(out))
        return
    rng = np.random.default_rng(args.seed)
    nrec = args.recovery if args.recovery is not None else max(1, args.count // 4)
    out = {
        "generator": "scripts/reference/cvxopt_guessing.py",
        "cvxopt": cvxopt.__version__,
        "numpy": np.__version__,
        "seed": args.seed,
        "guessing": [guessing_case(rng) for _ in range(args.count)],
        "diamond": [diamond_case(rng) for _ in range(args.count)],
        "recovery": [recovery_case(rng) for _ in range(nrec)],
    }
    write_reference(out, args.out)


if __name__ == "__main__":
    main()
