#!/usr/bin/env python3
"""Reference optimal values for rhosigma's SDP solver, computed by cvxopt (cvxopt from PyPI in .venv).

Builds random feasible SDPs in rhosigma's own plain-data problem format (see src/sdp/types.ts):

    minimize  sum_k <C_k, X_k>   s.t.  sum_k <A_ik, X_k> = b_i,  X_k in cone k

with a mix of real symmetric blocks, complex Hermitian blocks, a nonnegative block, dense and
sparse ("entries", each off-diagonal pair listed once and mirrored as its conjugate) coefficients,
and partial-trace constraints on a Hermitian two-qubit block. Feasibility is built in: a strictly
feasible primal point X0 > 0 gives b_i = <A_i, X0>, and a strictly feasible dual point (y0, S0 > 0)
gives C = S0 + sum_i y0_i A_i, so both problems attain the same optimal value.

cvxopt.solvers.sdp solves the inequality form (our dual):  minimize -b.y  s.t.
sum_i y_i A_ik + S_k = C_k, S_k PSD. Hermitian blocks are handed to cvxopt through the real
embedding H -> [[Re H, -Im H], [Im H, Re H]] / 2 (cvxopt has no complex cones). Our optimal value is
minus cvxopt's primal objective.

Usage: cvxopt_sdp.py [--seed N] [--count N] [--out PATH|-] [--time R [--timing-tolerance T]]
       cvxopt_sdp.py --solve-stdin [--time R [--timing-tolerance T]]   (problems as {problems: [...]} on stdin)
With --time, each solve is repeated R times and the median time spent inside solvers.sdp is
recorded (building cvxopt's matrices is not timed).
Writes JSON {generator, cvxopt, numpy, seed, cases: [{name, problem, optimal, cvxoptStatus, ...}]}.
"""
import argparse
import json
import sys

import numpy as np
import cvxopt
from cvxopt import matrix

from reference_output import write_reference
from cvxopt_ladder import solve_sdp


def rand_sym(rng, n):
    a = rng.standard_normal((n, n))
    return (a + a.T) / 2


def rand_herm(rng, n):
    a = rng.standard_normal((n, n)) + 1j * rng.standard_normal((n, n))
    return (a + a.conj().T) / 2


def rand_pd(rng, n, complex_):
    g = rng.standard_normal((n, n)) + (1j * rng.standard_normal((n, n)) if complex_ else 0)
    return g @ g.conj().T / n + np.eye(n)


def rows(m):
    return [[float(v) for v in r] for r in np.real(m)]


def dense_term(k, a, complex_):
    if complex_:
        return {"block": k, "matrix": {"re": rows(a.real), "im": rows(a.imag)}}
    return {"block": k, "matrix": rows(a)}


def sparse_term(rng, k, n, complex_, count):
    """Random sparse Hermitian coefficient as rhosigma entries, and the full matrix it stands for."""
    a = np.zeros((n, n), dtype=complex)
    entries = []
    for _ in range(count):
        i, j = sorted(int(t) for t in rng.integers(0, n, size=2))
        re = float(rng.standard_normal())
        im = float(rng.standard_normal()) if (complex_ and i != j) else 0.0
        entries.append([i, j, re, im] if complex_ else [i, j, re])
        a[i, j] += re + 1j * im
        if i != j:
            a[j, i] += re - 1j * im
    return {"block": k, "entries": entries}, a


def partial_trace_rows(dk, dt, complex_):
    """Coefficients of the real coordinates of tr_2(X) for X on C^dk (x) C^dt: list of (entries, coord)."""
    out = []
    for i in range(dk):
        for j in range(i, dk):
            parts = ["re", "im"] if (complex_ and j > i) else ["re"]
            for part in parts:
                entries = []
                a = np.zeros((dk * dt, dk * dt), dtype=complex)
                for t in range(dt):
                    p, q = i * dt + t, j * dt + t
                    if p == q:
                        entries.append([p, p, 1.0])
                        a[p, p] += 1
                    elif part == "re":
                        entries.append([p, q, 0.5, 0.0] if complex_ else [p, q, 0.5])
                        a[p, q] += 0.5
                        a[q, p] += 0.5
                    else:
                        entries.append([p, q, 0.0, 0.5])
                        a[p, q] += 0.5j
                        a[q, p] -= 0.5j
                out.append((entries, a))
    return out


def build_case(rng, shape):
    cones = []
    for kind, size in shape["blocks"]:
        cones.append({"kind": kind, "size": size})
    nblocks = len(cones)
    x0 = []
    for c in cones:
        if c["kind"] == "nonnegative":
            x0.append(rng.uniform(0.5, 2.0, size=c["size"]))
        else:
            x0.append(rand_pd(rng, c["size"], c["kind"] == "hermitian"))
    constraints = []
    mats = []  # per constraint: list of (block, full coefficient)

    def inner(k, a):
        c = cones[k]
        if c["kind"] == "nonnegative":
            return float(np.dot(a, x0[k]))
        return float(np.real(np.trace(a @ x0[k])))

    # Partial-trace constraints on designated Hermitian/symmetric blocks of size dk*dt.
    for k, dk, dt in shape.get("partialTrace", []):
        cx = cones[k]["kind"] == "hermitian"
        for entries, a in partial_trace_rows(dk, dt, cx):
            constraints.append({"terms": [{"block": k, "entries": entries}], "equals": inner(k, a)})
            mats.append([(k, a)])
    for _ in range(shape["m"]):
        terms = []
        fulls = []
        touched = sorted(set(int(t) for t in rng.choice(nblocks, size=min(nblocks, shape.get("touch", 2)), replace=False)))
        for k in touched:
            c = cones[k]
            n = c["size"]
            if c["kind"] == "nonnegative":
                a = rng.standard_normal(n)
                terms.append({"block": k, "vector": [float(v) for v in a]})
            elif rng.uniform() < 0.5:
                a = rand_herm(rng, n) if c["kind"] == "hermitian" else rand_sym(rng, n)
                terms.append(dense_term(k, a, c["kind"] == "hermitian"))
            else:
                term, a = sparse_term(rng, k, n, c["kind"] == "hermitian", 1 + int(rng.integers(0, n + 1)))
                terms.append(term)
            fulls.append((k, a))
        constraints.append({"terms": terms, "equals": sum(inner(k, a) for k, a in fulls)})
        mats.append(fulls)
    m = len(constraints)
    y0 = rng.standard_normal(m) * 0.5
    objective = []
    cfull = []
    for k, c in enumerate(cones):
        n = c["size"]
        if c["kind"] == "nonnegative":
            s0 = rng.uniform(0.5, 2.0, size=n)
        else:
            s0 = rand_pd(rng, n, c["kind"] == "hermitian")
        ck = s0.astype(complex) if c["kind"] != "nonnegative" else s0.astype(float)
        for i, fulls in enumerate(mats):
            for kk, a in fulls:
                if kk == k:
                    ck = ck + y0[i] * a
        cfull.append(ck)
        if c["kind"] == "nonnegative":
            objective.append({"block": k, "vector": [float(v) for v in ck]})
        else:
            objective.append(dense_term(k, ck, c["kind"] == "hermitian"))
    problem = {"cones": cones, "objective": objective, "constraints": constraints}
    return problem, mats, cfull


def embed(a):
    return np.block([[a.real, -a.imag], [a.imag, a.real]]) / 2


def cvxopt_data(problem, mats, cfull):
    """The arguments of cvxopt.solvers.sdp for a problem: c, Gs, hs and optional Gl, hl."""
    cones = problem["cones"]
    m = len(problem["constraints"])
    b = np.array([c["equals"] for c in problem["constraints"]], dtype=float)
    gl_rows, hl = [], []
    gs, hs = [], []
    for k, c in enumerate(cones):
        n = c["size"]
        if c["kind"] == "nonnegative":
            g = np.zeros((n, m))
            for i, fulls in enumerate(mats):
                for kk, a in fulls:
                    if kk == k:
                        g[:, i] += np.real(a)
            gl_rows.append(g)
            hl.append(np.real(cfull[k]))
            continue
        cx = c["kind"] == "hermitian"
        size = 2 * n if cx else n
        g = np.zeros((size * size, m))
        for i, fulls in enumerate(mats):
            for kk, a in fulls:
                if kk == k:
                    e = embed(a) if cx else np.real(a)
                    g[:, i] += e.flatten(order="F")
        h = embed(cfull[k]) if cx else np.real(cfull[k])
        gs.append(matrix(g))
        hs.append(matrix(h))
    kwargs = {"Gs": gs, "hs": hs}
    if gl_rows:
        kwargs["Gl"] = matrix(np.vstack(gl_rows))
        kwargs["hl"] = matrix(np.concatenate(hl))
    return matrix(-b), kwargs


def solve_with_cvxopt(problem, mats, cfull, tolerances=(1e-10, 1e-9, 1e-8), data=None, clock=None):
    """cvxopt.solvers.sdp on the problem. Tight tolerances first; cvxopt can divide by zero when asked
    for more than the iterates allow, so loosen step by step (the tolerance used is recorded). With
    `clock` (a list), the seconds spent inside solvers.sdp for the accepted attempt are appended."""
    c, kwargs = data if data is not None else cvxopt_data(problem, mats, cfull)
    return solve_sdp(c, ladder=tolerances, clock=clock, **kwargs)


def parse_problem(problem):
    """Read a problem in rhosigma's format back into full coefficient matrices (mats, cfull)."""
    cones = problem["cones"]

    def full(term):
        c = cones[term["block"]]
        n = c["size"]
        if c["kind"] in ("nonnegative", "free"):
            if "vector" in term:
                return np.array(term["vector"], dtype=float)
            v = np.zeros(n)
            for i, x in term["entries"]:
                v[i] += x
            return v
        a = np.zeros((n, n), dtype=complex)
        if "matrix" in term:
            mm = term["matrix"]
            if isinstance(mm, dict):
                a += np.array(mm["re"]) + 1j * np.array(mm["im"])
            else:
                a += np.array(mm)
            return a
        for e in term["entries"]:
            i, j, re = e[0], e[1], e[2]
            im = e[3] if len(e) > 3 else 0.0
            a[i, j] += re + 1j * im
            if i != j:
                a[j, i] += re - 1j * im
        return a

    mats = [[(t["block"], full(t)) for t in con["terms"]] for con in problem["constraints"]]
    cfull = []
    for k, c in enumerate(cones):
        n = c["size"]
        ck = np.zeros(n) if c["kind"] == "nonnegative" else np.zeros((n, n), dtype=complex)
        for t in problem["objective"]:
            if t["block"] == k:
                ck = ck + full(t)
        cfull.append(ck)
    return mats, cfull


def timed(problem, mats, cfull, repeats, tolerances=(1e-10, 1e-9, 1e-8)):
    """Median seconds of `repeats` calls of solvers.sdp alone (building cvxopt's matrices is not timed)."""
    data = cvxopt_data(problem, mats, cfull)
    times = []
    sol = None
    for _ in range(max(1, repeats)):
        clock = []
        sol = solve_with_cvxopt(problem, mats, cfull, tolerances, data, clock)
        times.append(clock[0])
    times.sort()
    return sol, times[len(times) // 2]


SHAPES = [
    {"name": "two real blocks", "blocks": [["symmetric", 3], ["symmetric", 2]], "m": 4, "touch": 2},
    {"name": "real, Hermitian and orthant", "blocks": [["symmetric", 4], ["hermitian", 3], ["nonnegative", 3]], "m": 6, "touch": 2},
    {"name": "Hermitian blocks only", "blocks": [["hermitian", 2], ["hermitian", 4]], "m": 5, "touch": 1},
    {"name": "many small blocks", "blocks": [["symmetric", 2]] * 6 + [["hermitian", 2]] * 3 + [["nonnegative", 2]], "m": 8, "touch": 3},
    {"name": "Hermitian two-qubit block with partial trace", "blocks": [["hermitian", 4], ["nonnegative", 2]], "m": 2, "touch": 2, "partialTrace": [[0, 2, 2]]},
    {"name": "real qubit-qutrit block with partial trace", "blocks": [["symmetric", 6], ["symmetric", 3]], "m": 3, "touch": 2, "partialTrace": [[0, 3, 2]]},
]


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--seed", type=int, default=20240601)
    ap.add_argument("--count", type=int, default=12)
    ap.add_argument("--out", default="-")
    ap.add_argument("--time", type=int, default=0, help="also time cvxopt: median of this many solves per case")
    ap.add_argument("--solve-stdin", action="store_true", help="solve the problems in {problems: [...]} read from stdin")
    ap.add_argument("--timing-tolerance", type=float, default=None,
                    help="time cvxopt at this abstol = reltol = feastol only (default: the 1e-10, 1e-9, 1e-8 ladder)")
    args = ap.parse_args()
    ttol = (args.timing_tolerance,) if args.timing_tolerance else (1e-10, 1e-9, 1e-8)
    if args.solve_stdin:
        data = json.load(sys.stdin)
        results = []
        for problem in data["problems"]:
            mats, cfull = parse_problem(problem)
            sol, sec = timed(problem, mats, cfull, args.time, ttol)
            results.append({"optimal": -sol["primal objective"], "seconds": sec, "iterations": sol["iterations"]})
        sys.stdout.write(json.dumps({"cvxopt": cvxopt.__version__, "results": results}))
        return
    rng = np.random.default_rng(args.seed)
    cases = []
    for c in range(args.count):
        shape = SHAPES[c % len(SHAPES)]
        # cvxopt needs linearly independent constraints; a draw that stalls it (e.g. more random
        # constraints on a small block than its real dimension) is replaced by the next draw.
        for _attempt in range(10):
            problem, mats, cfull = build_case(rng, shape)
            try:
                sol = solve_with_cvxopt(problem, mats, cfull)
                break
            except RuntimeError:
                continue
        else:
            raise RuntimeError(f"no instance of shape {shape['name']} solved by cvxopt")
        seconds = timed(problem, mats, cfull, args.time, ttol)[1] if args.time > 0 else None
        cases.append({
            "shape": shape["name"],
            "cvxoptSeconds": seconds,
            "name": f"{shape['name']} #{c}",
            "problem": problem,
            "optimal": -sol["primal objective"],
            "cvxoptDualObjective": -sol["dual objective"],
            "cvxoptStatus": sol["status"],
            "cvxoptTolerance": sol["tolerance"],
        })
    out = {
        "generator": "scripts/reference/cvxopt_sdp.py",
        "cvxopt": cvxopt.__version__,
        "numpy": np.__version__,
        "seed": args.seed,
        "cases": cases,
    }
    write_reference(out, args.out)


if __name__ == "__main__":
    main()
