#!/usr/bin/env python3
"""Fidelity of recovery at the sizes researchers use, with cvxopt.solvers.sdp (cvxopt from PyPI in .venv),
from the dual side of the SDP, built here with numpy independently of the TypeScript code.

  F(A;C|B) = max over channels R: B -> BC of F(rho_ABC, (id_A (x) R)(rho_AB))
             (Seshadreesan & Wilde, Phys. Rev. A 92, 042321 (2015); squared fidelity).

The primal is Watrous's root-fidelity SDP with sigma a variable (as in cvxopt_guessing.py):
  sqrt F = max Re Tr X  s.t.  [[rho_ABC, X], [X*, sigma(J)]] >= 0,  J >= 0,  Tr_out J = 1_B,
  sigma(J) = (id_A (x) R_J)(rho_AB),  sigma_{(a,o),(a',o')} = sum_{b,b'} rho_{(a,b),(a',b')} J_{(b,o),(b',o')}.
Its Lagrange dual (Watrous, Theory of Computing 2013, the dual of the fidelity SDP; weak duality of the
channel constraint, Tr_out J = 1_B, with multiplier Z on B):
  sqrt F = min Tr rho_ABC Y + Tr Z  s.t.  [[Y, -1/2], [-1/2, W]] >= 0,  Z (x) 1_BC - K(W) >= 0,
  K = sigma^* (Tr sigma(J) W = Tr K(W) J for every J), Y, W on ABC and Z on B Hermitian.
Strong duality holds for full-rank rho_ABC (both sides strictly feasible). The variables are the real
coordinates of Y, W and Z: N^2 + N^2 + d_B^2 of them (N = d_A d_B d_C), the same count as the primal's
equality constraints, so cvxopt's KKT system has the size of the primal's Schur complement. The LMIs are
sparse (spmatrix): each coordinate of Y or W touches two entries, each of Z d_B d_C, and K of one
coordinate of W d_B^2.

cvxopt has no complex cones: each Hermitian LMI enters as its real embedding [[Re F, -Im F], [Im F, Re F]].

Usage:
  cvxopt_recovery.py --cases SPEC [--seed N] [--out PATH|-]   random Hilbert-Schmidt states (full rank),
                                                               SPEC like 2x2x2,2x4x4: reference JSON
  cvxopt_recovery.py --solve-stdin [--time R]                  solve {"recovery": [{"rho", "dims"}]} from stdin;
                                                               with --time, the median seconds of R solves
Writes JSON {generator, cvxopt, numpy, seed, recovery: [{rho: {matrix, dims}, a, b, c, root, value, seconds,
iterations, cvxoptStatus, cvxoptTolerance}]}.
"""
import argparse
import json
import sys
import time

import numpy as np
import cvxopt
from cvxopt import matrix, spmatrix

from reference_output import write_reference
from cvxopt_ladder import solve_sdp
from embedding import hermitian_basis

LADDER = (1e-10, 1e-9, 1e-8)


def cplx(m):
    return {"re": [[float(v) for v in r] for r in m.real], "im": [[float(v) for v in r] for r in m.imag]}


def read_cplx(v):
    re = np.array(v["re"], dtype=float)
    im = np.array(v["im"], dtype=float) if "im" in v else np.zeros_like(re)
    return re + 1j * im


def hilbert_schmidt(rng, d):
    """G G* / Tr G G* with G a d x d complex Ginibre matrix (Zyczkowski & Sommers 2001)."""
    g = rng.standard_normal((d, d)) + 1j * rng.standard_normal((d, d))
    p = g @ g.conj().T
    return p / np.trace(p).real


def embed_entries(entries, size):
    """Real-embedding entries (row, col, value) of the Hermitian matrix sum of (i, j, z) entries, size x size."""
    out = []
    for i, j, z in entries:
        if z.real != 0:
            out += [(i, j, z.real), (size + i, size + j, z.real)]
        if z.imag != 0:
            out += [(size + i, j, z.imag), (i, size + j, -z.imag)]
    return out


def column_entries(basis_elem):
    nz = np.argwhere(basis_elem != 0)
    return [(int(i), int(j), complex(basis_elem[i, j])) for i, j in nz]


def recovery_dual(rho_abc, da, db, dc):
    """(c, Gs, hs) of the dual above, for cvxopt.solvers.sdp (minimise c'x, h - G x >= 0)."""
    n = da * db * dc
    do = db * dc
    dj = db * do
    rho_ab = np.einsum("abcdec->abde", rho_abc.reshape(da, db, dc, da, db, dc)).reshape(da * db, da * db)
    r4 = rho_ab.reshape(da, db, da, db)
    bn = hermitian_basis(n)
    bb = hermitian_basis(db)
    ny = len(bn)
    nv = 2 * ny + len(bb)
    c = np.zeros(nv)
    # LMI 1: [[Y, -1/2], [-1/2, W]] >= 0 (size 2n, embedded 4n).  h1 - G1 x with h1 = [[0, -1/2], [-1/2, 0]].
    s1 = 2 * n
    g1v, g1r, g1c = [], [], []
    # LMI 2: Z (x) 1 - K(W) >= 0 (size dj, embedded 2 dj).  h2 = 0.
    s2 = dj
    g2v, g2r, g2c = [], [], []
    for k, e in enumerate(bn):
        c[k] = np.trace(rho_abc @ e).real  # Tr rho Y
        for off, col in ((0, k), (n, ny + k)):  # Y block, then W block
            for i, j, v in embed_entries([(off + i, off + j, z) for i, j, z in column_entries(e)], s1):
                g1r.append(i + j * 2 * s1)
                g1c.append(col)
                g1v.append(-v)
        # K(E) for the W coordinate: K4[d,p,b,o] = sum_{a,c} r4[a,b,c,d] W4[c,p,a,o]
        e4 = e.reshape(da, do, da, do)
        kmat = np.einsum("abcd,cpao->dpbo", r4, e4).reshape(dj, dj)
        for i, j, v in embed_entries(column_entries(kmat), s2):
            g2r.append(i + j * 2 * s2)
            g2c.append(ny + k)
            g2v.append(v)  # -(-K)
    for q, e in enumerate(bb):
        col = 2 * ny + q
        c[col] = np.trace(e).real  # Tr Z
        ze = np.kron(e, np.eye(do))
        for i, j, v in embed_entries(column_entries(ze), s2):
            g2r.append(i + j * 2 * s2)
            g2c.append(col)
            g2v.append(-v)
    h1 = np.zeros((s1, s1), dtype=complex)
    h1[:n, n:] = -0.5 * np.eye(n)
    h1[n:, :n] = -0.5 * np.eye(n)
    emb1 = np.block([[h1.real, -h1.imag], [h1.imag, h1.real]])
    G1 = spmatrix(g1v, g1r, g1c, (4 * s1 * s1, nv))
    G2 = spmatrix(g2v, g2r, g2c, (4 * s2 * s2, nv))
    return matrix(c), [G1, G2], [matrix(emb1), matrix(np.zeros((2 * s2, 2 * s2)))]


def solve(rho, dims, repeats=1):
    c, gs, hs = recovery_dual(rho, *dims)
    times = []
    sol = None
    for _ in range(max(1, repeats)):
        clock = []
        sol = solve_sdp(c, ladder=LADDER, clock=clock, Gs=gs, hs=hs)
        times.append(clock[-1])
    times.sort()
    root = float(sol["primal objective"])
    return {
        "root": root,
        "value": root * root,
        "dualRoot": float(sol["dual objective"]),
        "seconds": times[len(times) // 2],
        "iterations": int(sol["iterations"]),
        "cvxoptStatus": sol["status"],
        "cvxoptTolerance": sol["tolerance"],
    }


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--cases", default=None, help="comma-separated dA x dB x dC, e.g. 2x2x2,2x4x4")
    ap.add_argument("--seed", type=int, default=20261203)
    ap.add_argument("--out", default="-")
    ap.add_argument("--solve-stdin", action="store_true")
    ap.add_argument("--time", type=int, default=1)
    args = ap.parse_args()
    out = {"generator": "scripts/reference/cvxopt_recovery.py", "cvxopt": cvxopt.__version__, "numpy": np.__version__}
    if args.solve_stdin:
        data = json.load(sys.stdin)
        out["recovery"] = [solve(read_cplx(r["rho"]), r["dims"], args.time) for r in data["recovery"]]
    else:
        rng = np.random.default_rng(args.seed)
        out["seed"] = args.seed
        out["recovery"] = []
        for spec in (args.cases or "2x2x2").split(","):
            dims = [int(x) for x in spec.split("x")]
            rho = hilbert_schmidt(rng, int(np.prod(dims)))
            case = {"rho": {"matrix": cplx(rho), "dims": dims}, "a": [0], "b": [1], "c": [2]}
            case.update(solve(rho, dims))
            out["recovery"].append(case)
    write_reference(out, args.out)


if __name__ == "__main__":
    main()
