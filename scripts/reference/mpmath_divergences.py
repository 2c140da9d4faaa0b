#!/usr/bin/env python3
"""High-precision referee for the divergences in hard regimes, with mpmath (pinned in requirements.txt).

What it is for: with a fixed seed, draw pairs (rho, sigma) in the regimes where double precision is
delicate (nearly pure states with eigenvalues from 1e-6 down to 1e-12; commuting, block-diagonal and
random-basis pairs), every divergence family the engine has, orders alpha from 0.05 to 200, alpha within
1e-6 (and 1e-9, 1e-12) of 1, small z, and write for each a protocol request of the `divergence` op with the
value computed here. test/quantities/divergence-mpmath.test.ts sends the requests through the engine and
compares; the committed batch is test/reference/data/mpmath-divergence-cases.json.

How the values are computed (none of this is taken from the engine):
  * The double entries of rho and sigma are taken as exact numbers. Every matrix function is the textbook
    one, f(A) = Q f(E) Q* from mpmath's Hermitian eigensolver (mp.eigh) at a working precision of
    `dps` decimal digits, chosen per case from the dynamic range of the powers involved; the products are
    formed as in the definitions (sigma^g rho^(alpha/z) sigma^g, sigma^(-1/2) rho sigma^(-1/2), ...) and
    their eigenvalues taken again with mp.eigh. Supports: eigenvalues at most SUPPORT_TOL times the
    largest count as zero (the requests carry the same "supportTolerance"), only for rho and sigma, never
    for intermediate products.
  * Guard on the referee itself: each value is computed twice, at dps and at dps + 40 digits, and the
    script stops when they differ by more than 1e-25 (relative).
  * measured (alpha = 1 and alpha >= 1/2): commuting pairs give the classical divergence of the diagonals
    (measuring in the common eigenbasis is optimal, and D^M <= sandwiched = classical there); qubit pairs
    give the largest classical divergence over projective measurements, found by Newton's method on the
    Bloch sphere at high precision (mp.findroot on the gradient from several starts, the best stationary
    point with a negative definite Hessian). Berta, Fawzi & Tomamichel (Lett. Math. Phys. 107 (2017)
    2239) show that projective measurements are optimal for alpha >= 1/2 (recalled from memory).
  * Conditioning: the inputs are double-precision data, so any method that works on them in double
    precision (a backward-stable eigensolver first) answers for data perturbed by a few units of
    rounding. Each case therefore also carries `spread`: the largest change of the exact value when rho
    and sigma are perturbed PERTURBATIONS times by 2·n·2^-52 of their norm (random Hermitian directions
    for random-basis pairs; relative changes of the diagonal for diagonal pairs; inside the blocks for
    block-diagonal pairs), computed at dps digits. Tolerance rule (stored in the file):
        |got - expected| <= TOL * max(1, |expected|) + SPREAD_FACTOR * spread.
    For diagonal and block pairs spread is tiny and the rule is TOL; for nearly pure random-basis pairs
    the values themselves move by up to 1e-6 under rounding of the input, and the rule says so.

What it deliberately does not do: pairs where supp rho is not inside supp sigma for orders >= 1 (the
answer is +Infinity, covered elsewhere) or for the geometric family below 1 (its shorted-operator
limit is checked in divergence-geometric.test.ts), the hypothesis-testing family (an SDP), or
anything numpy/cvxopt-based.

Cost: about a minute for the committed batch; a few seconds for --small.

Usage: .venv/bin/python scripts/reference/mpmath_divergences.py --seed N [--small] [--out FILE]
       .venv/bin/python scripts/reference/mpmath_divergences.py --cases < cases.json
  --cases reads {"cases": [{"rho": {"re","im"}, "sigma": {...}, "family": f, "alpha"?: a, "z"?: z,
  "supportTolerance"?: t}]} and writes {"generator": ..., "values": [base-2 values or "Infinity"]}.
Output of --seed: {"generator": "mpmath X", "seed": N, "tolerance_rule": ..., "cases": [{"name":
  "divergence/<family>: <details>", "request": {...}, "expected": base-2 value, "spread": s,
  "tolerance": TOL, "spreadFactor": SPREAD_FACTOR, "dps": d}]}
"""
import argparse
import json
import math
import sys

import mpmath
import numpy as np
from mpmath import mp

SUPPORT_TOL = 1e-14  # every eigenvalue of the near-pure states (>= 1e-12) is in the support
TOL = 1e-9
SPREAD_FACTOR = 10
PERTURBATIONS = 3
EPS = 2.0 ** -52
SELF_CHECK = mp.mpf('1e-25')

# ----------------------------------------------------------------------------------------------------
# linear algebra in mpmath


def to_mp(m):
    """A numpy complex matrix as an mpmath matrix, every double entry exactly."""
    n = m.shape[0]
    out = mp.matrix(n, n)
    for i in range(n):
        for j in range(n):
            out[i, j] = mp.mpc(float(m[i, j].real), float(m[i, j].imag))
    return out


def herm(a):
    return (a + a.H) * mp.mpf('0.5')


def eigh(a):
    e, q = mp.eigh(herm(a))
    return [mp.re(x) for x in e], q


def spectral(a, tol):
    """Eigenvalues above tol * largest (the support) with their vectors, and the kernel vectors."""
    e, q = eigh(a)
    top = max(e)
    n = len(e)
    keep = [k for k in range(n) if e[k] > tol * top and e[k] > 0]
    ker = [k for k in range(n) if k not in keep]
    return [e[k] for k in keep], cols(q, keep), cols(q, ker)


def cols(q, idx):
    out = mp.matrix(q.rows, len(idx)) if idx else None
    for c, k in enumerate(idx):
        for i in range(q.rows):
            out[i, c] = q[i, k]
    return out


def from_spectrum(vals, vecs, f):
    n = vecs.rows
    out = mp.matrix(n, n)
    for k, x in enumerate(vals):
        fx = f(x)
        for i in range(n):
            vik = vecs[i, k] * fx
            for j in range(n):
                out[i, j] += vik * mp.conj(vecs[j, k])
    return out


def power(spec, p):
    vals, vecs, _ = spec
    return from_spectrum(vals, vecs, lambda x: x ** p)


def projector(spec):
    vals, vecs, _ = spec
    return from_spectrum(vals, vecs, lambda x: mp.mpf(1))


def trace(a):
    return mp.re(sum(a[i, i] for i in range(a.rows)))


def eigenvalues(a):
    return eigh(a)[0]


# ----------------------------------------------------------------------------------------------------
# the divergences (natural logarithm), textbook definitions


class Pair:
    """rho (normalised) and sigma with their spectra and the support decisions of the documented rule."""

    def __init__(self, rho, sigma, tol):
        self.tol = tol
        rho = rho / trace(rho)
        self.S = spectral(sigma, tol)
        self.sigma = sigma
        ps = projector(self.S)
        self.inside = trace(ps * rho)
        self.leak = mp.mpf(0) if self.S[2] is None else trace((mp.eye(rho.rows) - ps) * rho)
        self.included = self.leak <= tol
        self.orthogonal = self.inside <= tol
        if self.included and self.S[2] is not None:
            rho = ps * rho * ps / self.inside  # the documented convention: leakage below tol dropped
        self.rho = herm(rho)
        self.R = spectral(self.rho, tol)


def renyi(q, a):
    return mp.log(q) / (a - 1)


def umegaki(p):
    if not p.included:
        return mp.inf
    r, u, _ = p.R
    logs = from_spectrum(p.S[0], p.S[1], mp.log)
    return sum(x * mp.log(x) for x in r) - trace(p.rho * logs)


def petz(p, a):
    if a == 1:
        return umegaki(p)
    if (a > 1 and not p.included) or p.orthogonal:
        return mp.inf
    return renyi(trace(power(p.R, a) * power(p.S, 1 - a)), a)


def alpha_z(p, a, z):
    if a == 1:
        return umegaki(p)
    if (a > 1 and not p.included) or p.orthogonal:
        return mp.inf
    g = power(p.S, (1 - a) / (2 * z))
    m = g * power(p.R, a / z) * g
    q = sum(x ** z for x in eigenvalues(m) if x > 0)
    return renyi(q, a)


def sandwiched(p, a):
    return alpha_z(p, a, a)


def geometric(p, a):
    if not p.included:
        return mp.inf  # not generated for alpha < 1 (see the header)
    vals, vecs, _ = p.S
    h = from_spectrum(vals, vecs, lambda x: x ** mp.mpf('-0.5'))
    e, q = eigh(h * p.rho * h)
    keep = [k for k in range(len(e)) if e[k] > 0]
    s = p.sigma
    if a == 1:  # Belavkin-Staszewski, as Tr sigma G log G
        f = lambda x: x * mp.log(x)
    else:
        f = lambda x: x ** a
    gq = from_spectrum([e[k] for k in keep], cols(q, keep), f)
    val = trace(s * gq)
    return val if a == 1 else renyi(val, a)


def dmax(p):
    if not p.included:
        return mp.inf
    vals, vecs, _ = p.S
    h = from_spectrum(vals, vecs, lambda x: x ** mp.mpf('-0.5'))
    return mp.log(max(eigenvalues(h * p.rho * h)))


def dmin(p):
    if p.orthogonal:
        return mp.inf
    return -mp.log(trace(projector(p.R) * p.sigma))


def classical(pv, qv, a):
    pv = [x for x in pv]
    if a == 1:
        return sum(x * mp.log(x / y) for x, y in zip(pv, qv) if x > 0)
    return renyi(sum(x ** a * y ** (1 - a) for x, y in zip(pv, qv) if x > 0), a)


def bloch(m):
    """(t, x, y, z) with m = (t I + x X + y Y + z Z)/2."""
    t = mp.re(m[0, 0] + m[1, 1])
    x = mp.re(m[0, 1] + m[1, 0])
    y = mp.im(m[1, 0] - m[0, 1])
    zz = mp.re(m[0, 0] - m[1, 1])
    return t, x, y, zz


def measured(p, a, diagonal):
    if not p.included:
        return mp.inf
    if diagonal:
        n = p.rho.rows
        return classical([mp.re(p.rho[i, i]) for i in range(n)], [mp.re(p.sigma[i, i]) for i in range(n)], a)
    assert p.rho.rows == 2, 'measured: the referee handles commuting pairs and qubits'
    tr, rx, ry, rz = bloch(p.rho)
    ts, sx, sy, sz = bloch(p.sigma)
    r = [rx, ry, rz]
    s = [sx, sy, sz]
    dot = lambda x, y: sum(a * b for a, b in zip(x, y))
    # The outcome distributions depend on the measurement direction n only through (n.r, n.s); over the
    # unit ball these fill an ellipse, and the classical divergence (jointly convex Q for alpha > 1 and
    # KL, jointly concave Q for alpha < 1) is extremal on its boundary, the image of the unit circle in
    # the plane of r and s. So the search is over one angle.
    nr = mp.sqrt(dot(r, r))
    e1 = [x / nr for x in r] if nr > 0 else [mp.mpf(1), mp.mpf(0), mp.mpf(0)]
    w = [b - dot(s, e1) * a for a, b in zip(e1, s)]
    nw = mp.sqrt(dot(w, w))
    if nw <= mp.mpf(10) ** (-mp.dps // 2):
        w = [mp.mpf(0), -e1[2], e1[1]] if abs(e1[0]) < mp.mpf('0.9') else [-e1[1], e1[0], mp.mpf(0)]
        nw = mp.sqrt(dot(w, w))
    e2 = [x / nw for x in w]
    u1, u2 = dot(r, e1), dot(r, e2)
    v1, v2 = dot(s, e1), dot(s, e2)

    def value(th):
        c, sn = mp.cos(th), mp.sin(th)
        u = c * u1 + sn * u2
        v = c * v1 + sn * v2
        return classical([(tr + u) / 2, (tr - u) / 2], [(ts + v) / 2, (ts - v) / 2], a)

    deriv = lambda th: mp.diff(value, th)
    # Candidates: a grid, the directions of r and s (and their opposites), and points approaching them
    # geometrically (nearly pure states make the divergence vary on scales of 1e-6 radians there).
    special = [mp.mpf(0), mp.pi, mp.atan2(v2, v1), mp.atan2(v2, v1) + mp.pi]
    thetas = [2 * mp.pi * k / 720 for k in range(720)] + special
    for t0 in special:
        for k in range(1, 10):
            thetas += [t0 + mp.mpf(10) ** -k, t0 - mp.mpf(10) ** -k]
    thetas = sorted(set(mp.mpf(t) % (2 * mp.pi) for t in thetas))
    vals = [value(t) for t in thetas]
    order = sorted(range(len(thetas)), key=lambda i: -vals[i])
    best = vals[order[0]]
    for i in order[:6]:
        lo, hi = thetas[i - 1], thetas[(i + 1) % len(thetas)]
        if hi < lo:
            hi += 2 * mp.pi
        dlo, dhi = deriv(lo), deriv(hi)
        if dlo > 0 > dhi:
            th = mp.findroot(deriv, (lo, hi), solver='anderson')
            best = max(best, value(th))
    return best


def evaluate(rho, sigma, family, a, z, tol, diagonal):
    p = Pair(rho, sigma, tol)
    if family == 'umegaki':
        v = umegaki(p)
    elif family == 'petz':
        v = petz(p, a)
    elif family == 'sandwiched':
        v = sandwiched(p, a)
    elif family == 'alpha-z':
        v = alpha_z(p, a, z)
    elif family == 'geometric':
        v = geometric(p, a)
    elif family == 'max':
        v = dmax(p)
    elif family == 'min':
        v = dmin(p)
    elif family == 'measured':
        v = measured(p, mp.mpf(1) if a is None else a, diagonal)
    else:
        raise ValueError(family)
    return v / mp.log(2)


# ----------------------------------------------------------------------------------------------------
# working precision and conditioning


def log10_range(m):
    w = np.linalg.eigvalsh(m)
    top = w.max()
    low = max(w.min(), SUPPORT_TOL * top)
    return math.log10(top / low) if low > 0 else 16.0


def working_digits(rho, sigma, family, a, z):
    """Digits so that every eigenvalue that contributes above 1e-30 is resolved, plus cancellation at alpha ~ 1."""
    dr, ds = log10_range(rho), log10_range(sigma)
    a = 1.0 if a is None else float(a)
    if family in ('sandwiched', 'alpha-z', 'measured'):
        zz = a if family != 'alpha-z' else float(z)
        span = 2 * (abs(1 - a) / (2 * zz) * ds + a / (2 * zz) * dr)
        need = min(span, 30 / min(zz, 1.0))
    elif family in ('geometric', 'max'):
        need = (dr + ds) * max(1.0, 1 / max(a, 1e-3))
    else:
        need = dr + ds
    near = -math.log10(abs(a - 1)) if a != 1 else 0
    return int(50 + need + near)


def perturbed(m, kind, g, blocks):
    n = m.shape[0]
    eta = 2 * n * EPS * np.linalg.norm(m, 2)
    if kind == 'diagonal':
        return np.diag(np.real(np.diag(m)) * (1 + 2 * n * EPS * g.uniform(-1, 1, size=n))).astype(complex)
    h = g.normal(size=(n, n)) + (1j * g.normal(size=(n, n)) if np.iscomplexobj(m) and np.abs(m.imag).max() > 0 else 0)
    h = (h + h.conj().T) / 2
    if kind == 'block':
        mask = np.zeros((n, n))
        start = 0
        for b in blocks:
            mask[start:start + b, start:start + b] = 1
            start += b
        h = h * mask
        out = m.copy()
        start = 0
        for b in blocks:
            blk = slice(start, start + b)
            sub = h[blk, blk]
            out[blk, blk] = m[blk, blk] + 2 * n * EPS * np.linalg.norm(m[blk, blk], 2) * sub / np.linalg.norm(sub, 2)
            start += b
        return out
    return m + eta * h / np.linalg.norm(h, 2)


def reference(rho, sigma, family, a=None, z=None, tol=SUPPORT_TOL, kind='random', blocks=(), seed=0):
    """(value, spread, dps): the value at dps digits (checked at dps + 40) and the conditioning spread."""
    dps = working_digits(rho, sigma, family, a, z)
    diagonal = kind == 'diagonal'
    with mp.workdps(dps):
        A = mp.mpf(a) if a is not None else None
        Z = mp.mpf(z) if z is not None else None
        v = evaluate(to_mp(rho), to_mp(sigma), family, A, Z, tol, diagonal)
    with mp.workdps(dps + 40):
        A = mp.mpf(a) if a is not None else None
        Z = mp.mpf(z) if z is not None else None
        w = evaluate(to_mp(rho), to_mp(sigma), family, A, Z, tol, diagonal)
    if mp.isinf(v) or mp.isinf(w):
        assert mp.isinf(v) and mp.isinf(w), (family, v, w)
        return mp.inf, 0.0, dps
    if abs(v - w) > SELF_CHECK * max(1, abs(w)):
        raise AssertionError(f'referee self-check failed for {family} alpha={a} z={z}: {v} vs {w} at {dps}/{dps + 40} digits')
    g = np.random.default_rng(seed)
    spread = 0.0
    with mp.workdps(dps):
        A = mp.mpf(a) if a is not None else None
        Z = mp.mpf(z) if z is not None else None
        for _ in range(PERTURBATIONS):
            pr = perturbed(rho, kind, g, blocks)
            ps = perturbed(sigma, kind, g, blocks)
            u = evaluate(to_mp(pr), to_mp(ps), family, A, Z, tol, diagonal)
            spread = max(spread, float(abs(u - w)))
    return w, spread, dps


# ----------------------------------------------------------------------------------------------------
# cases


class Gen:
    def __init__(self, seed):
        self.r = np.random.default_rng(seed)

    def unitary(self, d, real=False):
        z = self.r.normal(size=(d, d)) + (0 if real else 1j * self.r.normal(size=(d, d)))
        q, r = np.linalg.qr(z)
        ph = np.diag(r) / np.abs(np.diag(r))
        return q * ph

    def near_pure(self, d):
        """Eigenvalues 1 - sum and 10^-u with u uniform in [6, 12]."""
        small = 10.0 ** -self.r.uniform(6, 12, size=d - 1)
        return np.concatenate([[1 - small.sum()], small])

    def mixed(self, d):
        p = self.r.uniform(0.05, 1, size=d)
        return p / p.sum()


def hermitize(m):
    return (m + m.conj().T) / 2


def in_basis(p, u):
    m = hermitize((u * p) @ u.conj().T)
    return hermitize(m / np.real(np.trace(m)))


def jmat(m):
    return {'re': np.real(m).tolist(), 'im': np.imag(m).tolist()}


def jnum(x):
    return 'Infinity' if mp.isinf(x) else float(x)


def pairs(g, small):
    """(label, rho, sigma, kind, blocks)."""
    out = []
    dims = [2, 3] if small else [2, 3, 4]
    for d in dims:
        # commuting, both nearly pure, with their large eigenvalues on different basis vectors
        pr = g.near_pure(d)
        ps = np.roll(g.near_pure(d), 1)
        out.append((f'd={d}, commuting, both nearly pure, opposite', np.diag(pr).astype(complex), np.diag(ps).astype(complex), 'diagonal', ()))
        # commuting, rho nearly pure on sigma's largest eigenvector
        out.append((f'd={d}, commuting, both nearly pure, aligned', np.diag(g.near_pure(d)).astype(complex),
                    np.diag(g.near_pure(d)).astype(complex), 'diagonal', ()))
        # random bases
        out.append((f'd={d}, random bases, both nearly pure', in_basis(g.near_pure(d), g.unitary(d)),
                    in_basis(g.near_pure(d), g.unitary(d)), 'random', ()))
        out.append((f'd={d}, random bases, rho nearly pure, sigma mixed', in_basis(g.near_pure(d), g.unitary(d)),
                    in_basis(g.mixed(d), g.unitary(d)), 'random', ()))
        if small:
            break
    # block-diagonal: a 2x2 block of weight ~1 and a 2x2 block of weight ~1e-9 (rho) / 1e-7 (sigma)
    def block(weight_small):
        u1, u2 = g.unitary(2), g.unitary(2)
        big = in_basis(g.mixed(2), u1)
        tiny = in_basis(g.mixed(2), u2) * weight_small
        m = np.zeros((4, 4), dtype=complex)
        m[:2, :2] = big * (1 - weight_small)
        m[2:, 2:] = tiny
        return m
    out.append(('d=4, block-diagonal, blocks of weight 1 and 1e-9 / 1e-7', block(1e-9), block(1e-7), 'block', (2, 2)))
    return out


ORDERS = {
    'petz': [0.05, 0.3, 0.999999, 1 - 1e-9, 1 + 1e-12, 1.000001, 1.7, 5, 50, 200],
    'sandwiched': [0.5, 0.7, 0.999999, 1 - 1e-12, 1 + 1e-9, 1.000001, 2, 10, 200],
    'alpha-z': [(0.05, 0.05), (0.1, 0.1), (0.5, 0.05), (0.7, 0.3), (0.999999, 0.5), (1 - 1e-12, 0.2),
                (1.000001, 0.2), (1 + 1e-9, 3), (2, 0.5), (3, 0.1), (50, 1), (200, 2)],
    'geometric': [0.05, 0.1, 0.5, 0.999999, 1, 1 + 1e-12, 1.000001, 1.5, 2],
    'measured': [0.5, 0.8, 1 - 1e-9, 1, 1.000001, 2, 5],
}
SMALL_ORDERS = {
    'petz': [0.05, 0.999999, 200],
    'sandwiched': [0.5, 1.000001, 200],
    'alpha-z': [(0.1, 0.1), (0.999999, 0.5), (50, 1)],
    'geometric': [0.1, 0.999999, 2],
    'measured': [0.5, 2],
}


def request(family, rho, sigma, a=None, z=None, tol=SUPPORT_TOL):
    req = {'op': 'divergence', 'family': family, 'rho': {'matrix': jmat(rho), 'dims': [rho.shape[0]]},
           'sigma': {'matrix': jmat(sigma), 'dims': [sigma.shape[0]]}, 'supportTolerance': tol}
    if a is not None:
        req['alpha'] = a
    if z is not None:
        req['z'] = z
    return req


def issue_examples():
    """The worked examples of issue 6 §2 (exact values quoted there: classical formula or 60 digits)."""
    d = lambda *v: np.diag(v).astype(complex)
    s3 = np.array([[0.5, 0.1, 0.05], [0.1, 0.3, 0.1], [0.05, 0.1, 0.2]], dtype=complex)
    return [
        ('geometric', 0.1, None, d(0.9999999, 1e-7), d(1e-7, 0.9999999), 'diagonal', 1e-12),
        ('alpha-z', 0.1, 0.1, np.array([[0.5, 0.3], [0.3, 0.5]], dtype=complex), d(0.03, 0.97), 'random', 1e-12),
        ('alpha-z', 0.7, 0.3, d(0.999999, 1e-6), d(0.999999, 1e-6), 'diagonal', 1e-12),
        ('alpha-z', 50, 1, np.array([[0.5, 0.5], [0.5, 0.5]], dtype=complex), d(0.99999999, 1e-8), 'random', 1e-12),
        ('alpha-z', 0.999999, 0.5, d(0.999999999995, 3e-12, 2e-12), s3, 'random', 1e-12),
    ]


def generate(seed, small):
    g = Gen(seed)
    cases = []

    def add(family, label, rho, sigma, kind, blocks, a=None, z=None, tol=SUPPORT_TOL):
        v, spread, dps = reference(rho, sigma, family, a, z, tol, kind, blocks, seed=len(cases) + 7 * seed)
        detail = ', '.join(x for x in [f'alpha={a}' if a is not None else '', f'z={z}' if z is not None else '', label] if x)
        cases.append({'name': f'divergence/{family}: {detail}', 'request': request(family, rho, sigma, a, z, tol),
                      'expected': jnum(v), 'spread': spread, 'tolerance': TOL, 'spreadFactor': SPREAD_FACTOR, 'dps': dps})

    if not small:
        for family, a, z, rho, sigma, kind, tol in issue_examples():
            add(family, 'issue 6 example', rho, sigma, kind, (), a, z, tol)
    orders = SMALL_ORDERS if small else ORDERS
    for label, rho, sigma, kind, blocks in pairs(g, small):
        for family in ['umegaki', 'max', 'min']:
            add(family, label, rho, sigma, kind, blocks)
        for a in orders['petz']:
            add('petz', label, rho, sigma, kind, blocks, a)
        for a in orders['sandwiched']:
            add('sandwiched', label, rho, sigma, kind, blocks, a)
        for a, z in orders['alpha-z']:
            add('alpha-z', label, rho, sigma, kind, blocks, a, z)
        for a in orders['geometric']:
            add('geometric', label, rho, sigma, kind, blocks, a)
        if kind == 'diagonal' or rho.shape[0] == 2:
            for a in orders['measured']:
                add('measured', label, rho, sigma, kind, blocks, a if a != 1 else None)
    # min on a rank-deficient rho (the only family whose value needs supp rho smaller than the space)
    for d in ([3] if small else [3, 4]):
        p = np.concatenate([g.mixed(2), np.zeros(d - 2)])
        rho = in_basis(p, g.unitary(d))
        sigma = in_basis(g.near_pure(d), g.unitary(d))
        add('min', f'd={d}, random bases, rho of rank 2, sigma nearly pure', rho, sigma, 'random', (), tol=1e-12)
    return cases


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split('\n')[0])
    ap.add_argument('--seed', type=int)
    ap.add_argument('--small', action='store_true')
    ap.add_argument('--out')
    ap.add_argument('--cases', action='store_true', help='read cases from stdin')
    args = ap.parse_args(argv)
    gen = f'mpmath {mpmath.__version__}'
    if args.cases:
        req = json.load(sys.stdin)
        vals = []
        for c in req['cases']:
            mat = lambda m: np.array(m['re'], dtype=float) + 1j * np.array(m.get('im', np.zeros_like(m['re'])), dtype=float)
            v, _, _ = reference(mat(c['rho']), mat(c['sigma']), c['family'], c.get('alpha'), c.get('z'),
                                c.get('supportTolerance', 1e-12), c.get('kind', 'random'))
            vals.append(jnum(v))
        json.dump({'generator': gen, 'values': vals}, sys.stdout)
        return
    if args.seed is None:
        ap.error('--seed or --cases')
    doc = {
        'generator': gen,
        'seed': args.seed,
        'tolerance_rule': (f'|got - expected| <= tolerance * max(1, |expected|) + spreadFactor * spread; "Infinity" exactly. '
                           f'spread: the largest change of the exact value over {PERTURBATIONS} perturbations of rho and sigma '
                           'by 2 n 2^-52 of their norm (what rounding the inputs can do to any double-precision method).'),
        'cases': generate(args.seed, args.small),
    }
    text = json.dumps(doc, allow_nan=False, separators=(',', ':'))
    if args.out:
        with open(args.out, 'w') as f:
            f.write(text + '\n')
        print(f'{len(doc["cases"])} cases, {len(text)} bytes -> {args.out}', file=sys.stderr)
    else:
        sys.stdout.write(text + '\n')


if __name__ == '__main__':
    main()
