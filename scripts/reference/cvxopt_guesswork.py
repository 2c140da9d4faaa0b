#!/usr/bin/env python3
"""Reference values of guesswork with quantum side information, computed by cvxopt (cvxopt from PyPI in .venv).

For an ensemble {p_x, rho_x} and a moment k the guesswork is the SDP over POVMs indexed by guessing
orders g (permutations of the alphabet):

    primal  minimize  sum_g Tr M_g C_g   s.t.  M_g PSD, sum_g M_g = 1,   C_g = sum_x p_x pos_g(x)^k rho_x
    dual    maximize  Tr Y               s.t.  C_g - Y PSD for every order g

(Hanson, Katariya, Leditzky & Wilde, "Guesswork with quantum side information", 2022 -- recalled
from memory). cvxopt.solvers.sdp solves the inequality form, which is the dual above in the variable
x = real coordinates of Y (Re Y_ii; Re Y_ij and Im Y_ij for i < j); its own dual variables z_g are
the POVM elements M_g (in the embedding, halved). Complex blocks go to cvxopt through the real
embedding H -> [[Re H, -Im H], [Im H, Re H]], which is PSD exactly when H is (cvxopt has no complex
cones). The guesswork is minus cvxopt's primal objective.

Random ensembles: |X| = 3, d = 2 or 3 (or the shapes of --shapes, K symbols by d dimensions),
probabilities from a flat Dirichlet distribution, states Ginibre density matrices G G*/Tr of random
rank (1..d, so rank-deficient members occur), moments from {1, 2, 0.5, 1.5}. With --bb84, one more
case: the four pure qubit states |0>, |1>, |+>, |-> with equal probabilities, moment 1.

--time N: solve each case N more times and record the median seconds inside solvers.sdp ("seconds")
and of the whole call, building the K!-block problem with numpy included ("secondsTotal"), over all
N + 1 solves (for bench/guesswork.ts). --tolerance T: one cvxopt tolerance instead of the ladder (a
benchmark must not count failed attempts).

Usage: cvxopt_guesswork.py [--seed N] [--count N] [--shapes 4x2,6x4] [--bb84] [--time N] [--tolerance T] [--out PATH|-]
Writes JSON {generator, cvxopt, numpy, seed, cases: [{name, probabilities, states: [{re, im}], moment,
value, dualValue, cvxoptStatus, cvxoptTolerance}]}.
"""
import argparse
import itertools
import time

import numpy as np
import cvxopt
from cvxopt import matrix

from reference_output import write_reference
from cvxopt_ladder import solve_sdp
from embedding import embed, hermitian_basis


LADDER = (1e-10, 1e-9, 1e-8)


def guesswork(p, rhos, k, clock=None):
    n = len(p)
    d = rhos[0].shape[0]
    basis = hermitian_basis(d)
    c = matrix([-float(np.trace(b).real) for b in basis])
    gs, hs = [], []
    for order in itertools.permutations(range(n)):
        cg = sum(p[x] * (pos + 1) ** k * rhos[x] for pos, x in enumerate(order))
        # cvxopt reads the columns as column-major vectors of (2d)x(2d) matrices.
        cols = [embed(b).flatten(order="F") for b in basis]
        gs.append(matrix(np.array(cols).T))
        hs.append(matrix(embed(cg)))
    # Tightest tolerance first, down the shared ladder (cvxopt_ladder.py); the tolerance used is recorded.
    sol = solve_sdp(c, ladder=LADDER, clock=clock, Gs=gs, hs=hs)
    tol = sol["tolerance"]
    return -sol["primal objective"], -sol["dual objective"], sol["status"], tol


def random_density(rng, d):
    r = int(rng.integers(1, d + 1))
    g = rng.standard_normal((d, r)) + 1j * rng.standard_normal((d, r))
    m = g @ g.conj().T
    return m / np.trace(m).real


def rows(m):
    return [[float(v) for v in r] for r in m]


def make_cases(seed, count, shapes=None, bb84=False, repeats=0):
    rng = np.random.default_rng(seed)
    moments = [1, 2, 0.5, 1.5]
    plan = shapes if shapes else [(3, 2 + (t % 2)) for t in range(count)]
    cases = []
    for t, (n, d) in enumerate(plan):
        k = moments[t % len(moments)] if not shapes else 1
        p = rng.dirichlet(np.ones(n))
        rhos = [random_density(rng, d) for _ in range(n)]
        cases.append((f"case {t}: |X| = {n}, d = {d}, moment {k}", p, rhos, k))
    if bb84:
        s = 1 / np.sqrt(2)
        kets = [np.array([1, 0]), np.array([0, 1]), np.array([s, s]), np.array([s, -s])]
        cases.append(("four pure qubit states |0>, |1>, |+>, |-> with equal probabilities", np.full(4, 0.25), [np.outer(v, v).astype(complex) for v in kets], 1))
    out = []
    for name, p, rhos, k in cases:
        clock = []
        total = []
        for _ in range(1 + repeats):
            t0 = time.perf_counter()
            value, dual, status, tol = guesswork(p, rhos, k, clock)
            total.append(time.perf_counter() - t0)
        entry = {
            "name": name,
            "probabilities": [float(v) for v in p],
            "states": [{"re": rows(r.real), "im": rows(r.imag)} for r in rhos],
            "moment": k,
            "value": float(value),
            "dualValue": float(dual),
            "cvxoptStatus": status,
            "cvxoptTolerance": tol,
        }
        if repeats:
            entry["seconds"] = float(np.median(clock))
            entry["secondsTotal"] = float(np.median(total))
        out.append(entry)
    return out


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=20240715)
    ap.add_argument("--count", type=int, default=12)
    ap.add_argument("--shapes", default="")
    ap.add_argument("--bb84", action="store_true")
    ap.add_argument("--time", type=int, default=0)
    ap.add_argument("--tolerance", type=float, default=0)
    ap.add_argument("--out", default="-")
    a = ap.parse_args()
    global LADDER
    if a.tolerance:
        LADDER = (a.tolerance,)
    doc = {
        "generator": "scripts/reference/cvxopt_guesswork.py",
        "cvxopt": cvxopt.__version__,
        "numpy": np.__version__,
        "seed": a.seed,
        "cases": make_cases(a.seed, a.count, [tuple(int(v) for v in s.split("x")) for s in a.shapes.split(",") if s], a.bb84, a.time),
    }
    write_reference(doc, a.out, indent=1)


if __name__ == "__main__":
    main()
