#!/usr/bin/env python3
"""Independent numpy/scipy reference cases for rhosigma's plain-data protocol (PROTOCOL.md, version 1).

What it is for: with a fixed seed, draw random density matrices (full rank and rank deficient, complex
entries, d from 2 to 16, multipartite dims such as 2x2, 2x3, 2x2x2), write for each a protocol request in
exactly PROTOCOL.md's shapes, and compute the expected answer here, from the textbook definitions, with
numpy/scipy (pinned in requirements.txt) only. test/reference/numpy-reference.test.ts runs the requests through
the engine and compares.

How the expected values are computed (none of this is taken from the engine):
  * Functions of positive semidefinite matrices are taken on the support, explicitly: scipy.linalg.eigh,
    eigenvalues above ZERO_REL * largest eigenvalue are kept, the rest are the kernel. Rank-deficient
    inputs are built as V diag(p_1..p_r, 0..0) V* with p_i >= MIN_EIG / r, so support decisions are never
    near a boundary (the "zero" eigenvalues are ~1e-17, the kept ones >= ~5e-3).
  * Where every matrix involved is full rank, each value is recomputed a second way with scipy.linalg's
    Schur-based logm / fractional_matrix_power / sqrtm, and the script stops if the two disagree by more
    than CROSS_CHECK_REL: a guard on this reference itself.
  * Support conditions give the string "Infinity" (umegaki, petz/sandwiched/alpha-z/geometric with alpha > 1
    and max when supp rho is not inside supp sigma; every family when the supports are orthogonal, built
    with exact zero blocks; min when Tr Pi_rho sigma = 0).
  * alpha-z with z = 1 must equal petz and with z = alpha must equal sandwiched: asserted here.
  * measured (alpha = 1): for commuting pairs (common random eigenbasis) it is the classical
    Kullback-Leibler divergence of the eigenvalues; for general full-rank pairs at d <= 3 it is the
    variational formula sup_{omega > 0} Tr rho log omega + 1 - Tr sigma omega (nats; Berta, Fawzi &
    Tomamichel, Lett. Math. Phys. 2017, Lemma 1 with the "+1 - Tr" form) maximised with BFGS over
    omega = exp(H) (H Hermitian, analytic gradient through scipy.linalg.expm_frechet); the objective is
    concave in omega and exp is a diffeomorphism onto the positive cone, so a stationary point is the
    maximum. For qubits it is cross-checked against a direct search over projective measurements (Bloch
    angles). Measured cases carry the looser tolerance MEASURED_TOL = 1e-6, stated in the file.

What it deliberately does not do: generate cases near a support boundary, the hypothesis-testing
divergence, the recovery or guessing ops (SDP-based; other suites), or anything needing cvxopt.

Cost: a few seconds for the committed batch (a few hundred cases); under a second for --small.

Usage: .venv/bin/python scripts/reference/numpy_reference.py --seed N [--small] [--out FILE]
Output: {"generator": "numpy X.Y / scipy X.Y", "seed": N, "tolerance_rule": ..., "cases": [
          {"name": "<group>: <details>", "request": {...}, "expected": ..., "tolerance": t, "also"?: {...}}]}
The group (text before ':') is "op" or "divergence/<family>". Expected scalars are numbers or "Infinity";
matrices {"re","im"}; spectrum a list. "also" holds further answer fields to compare (fidelity's root).
"""
import argparse
import json
import sys

import numpy as np
import scipy
import scipy.linalg as sla
import scipy.optimize as sopt

LN2 = np.log(2.0)
ZERO_REL = 1e-10  # eigenvalues below this times the largest are the kernel (true ones are exactly 0)
MIN_EIG = 0.08  # kept eigenvalues are drawn from [MIN_EIG, 1] before normalisation
CROSS_CHECK_REL = 1e-10
TOL = 1e-9
MEASURED_TOL = 1e-6

# ----------------------------------------------------------------------------------------------------
# linear algebra on supports


def hermitize(m):
    return (m + m.conj().T) / 2


def spectral(m):
    """eigh of a PSD matrix; returns (kept eigenvalues, their vectors, kernel vectors)."""
    w, v = sla.eigh(m)
    top = max(w.max(), 0.0)
    keep = w > ZERO_REL * top
    return w[keep], v[:, keep], v[:, ~keep]


def psd_fun(m, f):
    """f applied to the nonzero eigenvalues, zero on the kernel."""
    w, v, _ = spectral(m)
    return (v * f(w)) @ v.conj().T


def psd_pow(m, p):
    return psd_fun(m, lambda w: w ** p)


def psd_log(m):
    return psd_fun(m, np.log)


def proj(m):
    return psd_fun(m, np.ones_like)


def rank(m):
    return spectral(m)[0].size


def supp_inside(rho, sigma):
    """supp rho inside supp sigma: rho's weight on sigma's kernel is zero (by construction; ~1e-17 in floating point)."""
    _, _, ker = spectral(sigma)
    if ker.shape[1] == 0:
        return True
    leak = np.real(np.trace(ker.conj().T @ rho @ ker))
    assert leak < 1e-12 or leak > 1e-4, f'support decision near a boundary: leak {leak}'
    return leak < 1e-12


def orthogonal(rho, sigma):
    ov = np.real(np.trace(proj(rho) @ proj(sigma)))
    assert ov < 1e-12 or ov > 1e-4, f'orthogonality decision near a boundary: {ov}'
    return ov < 1e-12


def full_rank(*ms):
    return all(rank(m) == m.shape[0] for m in ms)


def cross(a, b, what):
    if not (abs(a - b) <= CROSS_CHECK_REL * max(1.0, abs(a))):
        raise AssertionError(f'reference cross-check failed for {what}: {a} vs {b}')


def rtr(m):
    return float(np.real(np.trace(m)))


# ----------------------------------------------------------------------------------------------------
# random objects


class Gen:
    def __init__(self, seed):
        self.r = np.random.default_rng(seed)

    def unitary(self, d):
        z = (self.r.normal(size=(d, d)) + 1j * self.r.normal(size=(d, d))) / np.sqrt(2)
        q, r = np.linalg.qr(z)
        ph = np.diag(r) / np.abs(np.diag(r))
        return q * ph

    def probs(self, k):
        p = self.r.uniform(MIN_EIG, 1.0, size=k)
        return p / p.sum()

    def state(self, d, r=None, V=None):
        """V diag(p, 0..0) V*, trace one, exactly Hermitian in floating point."""
        r = d if r is None else r
        V = self.unitary(d) if V is None else V
        p = np.zeros(d)
        p[:r] = self.probs(r)
        m = hermitize((V * p) @ V.conj().T)
        return hermitize(m / np.real(np.trace(m)))

    def hermitian(self, d):
        z = self.r.normal(size=(d, d)) + 1j * self.r.normal(size=(d, d))
        return hermitize(z)

    def kraus(self, d_in, d_out, n):
        z = self.r.normal(size=(n * d_out, d_in)) + 1j * self.r.normal(size=(n * d_out, d_in))
        v, _ = np.linalg.qr(z)  # isometry: v* v = 1
        return [v[i * d_out:(i + 1) * d_out, :] for i in range(n)]


# ----------------------------------------------------------------------------------------------------
# JSON


def jmat(m):
    m = np.asarray(m, dtype=complex)
    return {'re': np.real(m).tolist(), 'im': np.imag(m).tolist()}


def jstate(m, dims=None):
    return {'matrix': jmat(m), 'dims': list(dims) if dims is not None else [m.shape[0]]}


def jnum(x):
    if x == np.inf:
        return 'Infinity'
    assert np.isfinite(x), x
    return float(x)


# ----------------------------------------------------------------------------------------------------
# textbook quantities (log base 2 unless said)


def entropy(rho, alpha):
    w = spectral(rho)[0]
    if alpha == 1:
        val = -np.sum(w * np.log(w)) / LN2
        if full_rank(rho):
            cross(val, -rtr(rho @ sla.logm(rho)).real / LN2, 'von Neumann entropy')
        return val
    val = np.log(np.sum(w ** alpha)) / ((1 - alpha) * LN2)
    if full_rank(rho):
        cross(val, np.log(rtr(sla.fractional_matrix_power(rho, alpha))) / ((1 - alpha) * LN2), 'Renyi entropy')
    return val


def umegaki(rho, sigma):
    if not supp_inside(rho, sigma):
        return np.inf
    val = rtr(rho @ (psd_log(rho) - psd_log(sigma))) / LN2
    if full_rank(rho, sigma):
        cross(val, rtr(rho @ (sla.logm(rho) - sla.logm(sigma))) / LN2, 'Umegaki')
    return val


def renyi_from_q(q, alpha):
    if q <= 0:
        return np.inf
    return np.log(q) / ((alpha - 1) * LN2)


def petz(rho, sigma, a):
    if orthogonal(rho, sigma) or (a > 1 and not supp_inside(rho, sigma)):
        return np.inf
    q = rtr(psd_pow(rho, a) @ psd_pow(sigma, 1 - a))
    val = renyi_from_q(q, a)
    if full_rank(rho, sigma):
        q2 = rtr(sla.fractional_matrix_power(rho, a) @ sla.fractional_matrix_power(sigma, 1 - a))
        cross(val, renyi_from_q(q2, a), 'Petz')
    return val


def sandwiched(rho, sigma, a):
    if orthogonal(rho, sigma) or (a > 1 and not supp_inside(rho, sigma)):
        return np.inf
    s = psd_pow(sigma, (1 - a) / (2 * a))
    q = rtr(psd_pow(hermitize(s @ rho @ s), a))
    val = renyi_from_q(q, a)
    if full_rank(rho, sigma):
        s2 = sla.fractional_matrix_power(sigma, (1 - a) / (2 * a))
        q2 = rtr(sla.fractional_matrix_power(s2 @ rho @ s2, a))
        cross(val, renyi_from_q(q2, a), 'sandwiched')
    return val


def alpha_z(rho, sigma, a, z):
    """Audenaert-Datta: Q = Tr (sigma^{(1-a)/2z} rho^{a/z} sigma^{(1-a)/2z})^z."""
    if orthogonal(rho, sigma) or (a > 1 and not supp_inside(rho, sigma)):
        return np.inf
    s = psd_pow(sigma, (1 - a) / (2 * z))
    q = rtr(psd_pow(hermitize(s @ psd_pow(rho, a / z) @ s), z))
    val = renyi_from_q(q, a)
    if full_rank(rho, sigma):
        r2 = sla.fractional_matrix_power(rho, a / (2 * z))
        s2 = sla.fractional_matrix_power(sigma, (1 - a) / z)
        q2 = rtr(sla.fractional_matrix_power(r2 @ s2 @ r2, z))  # the other order: same nonzero spectrum
        cross(val, renyi_from_q(q2, a), 'alpha-z')
    return val


def geometric(rho, sigma, a):
    """1/(a-1) log Tr sigma (sigma^{-1/2} rho sigma^{-1/2})^a, on supp sigma (generated only when supp rho
    is inside supp sigma, or a > 1 where the answer is then Infinity)."""
    if not supp_inside(rho, sigma):
        assert a > 1, 'geometric with alpha < 1 and supp rho outside supp sigma is not generated'
        return np.inf
    si = psd_pow(sigma, -0.5)
    x = hermitize(si @ rho @ si)
    q = rtr(sigma @ psd_pow(x, a))
    val = renyi_from_q(q, a)
    if full_rank(rho, sigma):
        si2 = sla.fractional_matrix_power(sigma, -0.5)
        q2 = rtr(sigma @ sla.fractional_matrix_power(si2 @ rho @ si2, a))
        cross(val, renyi_from_q(q2, a), 'geometric')
    return val


def dmax(rho, sigma):
    if not supp_inside(rho, sigma):
        return np.inf
    si = psd_pow(sigma, -0.5)
    val = np.log(sla.eigh(hermitize(si @ rho @ si), eigvals_only=True).max()) / LN2
    if full_rank(sigma):
        si2 = sla.fractional_matrix_power(sigma, -0.5)
        cross(val, np.log(np.max(np.real(np.linalg.eigvals(si2 @ rho @ si2)))) / LN2, 'max')
    return val


def dmin(rho, sigma):
    t = rtr(proj(rho) @ sigma)
    if orthogonal(rho, sigma):
        return np.inf
    return -np.log(t) / LN2


def classical_kl(p, q):
    if np.any((p > 0) & (q <= 0)):
        return np.inf
    k = p > 0
    return float(np.sum(p[k] * np.log(p[k] / q[k])) / LN2)


def measured_variational(rho, sigma):
    """sup_{H Hermitian} Tr rho H + 1 - Tr sigma exp(H), in nats, converted to bits."""
    d = rho.shape[0]
    iu = np.triu_indices(d, 1)

    def unpack(x):
        h = np.diag(x[:d]).astype(complex)
        k = len(iu[0])
        h[iu] = x[d:d + k] + 1j * x[d + k:]
        h[(iu[1], iu[0])] = np.conj(h[iu])
        return h

    def neg(x):
        # f(H) = Tr rho H + 1 - Tr sigma e^H. Its derivative along a Hermitian E is Tr G E with
        # G = rho - L_H[sigma], L_H the Frechet derivative of exp at H (self-adjoint for the trace pairing).
        # For the packing above: d/d diag_j = G_jj, d/d Re H_jk = 2 Re G_jk, d/d Im H_jk = 2 Im G_jk.
        h = unpack(x)
        e, de = sla.expm_frechet(h, sigma)
        f = rtr(rho @ h) + 1 - rtr(sigma @ e)
        gm = hermitize(rho - de)
        grad = np.concatenate([np.real(np.diag(gm)), 2 * np.real(gm[iu]), 2 * np.imag(gm[iu])])
        return -f, -grad

    x0_h = hermitize(psd_log(rho) - psd_log(sigma))
    k = len(iu[0])
    x0 = np.concatenate([np.real(np.diag(x0_h)), np.real(x0_h[iu]), np.imag(x0_h[iu])])
    # verify the gradient packing once by finite differences (guards the sign conventions above)
    f0, g0 = neg(x0)
    step = 1e-6
    for j in range(x0.size):
        e = np.zeros_like(x0)
        e[j] = step
        fd = (neg(x0 + e)[0] - neg(x0 - e)[0]) / (2 * step)
        assert abs(fd - g0[j]) < 1e-5 * max(1, abs(fd)), f'gradient check {j}: {fd} vs {g0[j]}'
    best = None
    for start in [x0, np.zeros_like(x0)]:
        res = sopt.minimize(neg, start, jac=True, method='BFGS', options={'gtol': 1e-12, 'maxiter': 2000})
        if best is None or res.fun < best.fun:
            best = res
    assert np.linalg.norm(best.jac) < 1e-7, f'measured optimisation did not converge: {best.jac}'
    return -best.fun / LN2


def measured_qubit_bases(rho, sigma):
    """sup over orthonormal qubit bases of the classical KL of the outcome distributions (bits)."""
    def kl(t):
        th, ph = t
        psi = np.array([np.cos(th / 2), np.exp(1j * ph) * np.sin(th / 2)])
        a = np.real(psi.conj() @ rho @ psi)
        b = np.real(psi.conj() @ sigma @ psi)
        p = np.array([a, 1 - a])
        q = np.array([b, 1 - b])
        return -np.sum(p * np.log(p / q)) / LN2
    best = None
    for th in np.linspace(0.1, np.pi - 0.1, 9):
        for ph in np.linspace(0, 2 * np.pi, 9, endpoint=False):
            res = sopt.minimize(kl, [th, ph], method='Nelder-Mead',
                                options={'xatol': 1e-12, 'fatol': 1e-15, 'maxiter': 4000})
            if best is None or res.fun < best.fun:
                best = res
    return -best.fun


def fidelity_root(rho, sigma):
    val = np.sum(sla.svdvals(psd_pow(rho, 0.5) @ psd_pow(sigma, 0.5)))
    if full_rank(rho, sigma):
        cross(val, np.sum(sla.svdvals(sla.sqrtm(rho) @ sla.sqrtm(sigma))), 'fidelity')
    return val


def trace_distance(rho, sigma):
    return 0.5 * np.sum(np.abs(sla.eigh(hermitize(rho - sigma), eigvals_only=True)))


def marginal(rho, dims, keep):
    """Partial trace onto the subsystems in `keep` (kept in increasing order), by einsum."""
    n = len(dims)
    t = rho.reshape(list(dims) + list(dims))
    letters = 'abcdefghijklmnopqrstuvwxyz'
    row = [letters[i] for i in range(n)]
    col = [letters[i] if i not in keep else letters[n + i] for i in range(n)]
    keep = sorted(keep)
    out = [letters[i] for i in keep] + [letters[n + i] for i in keep]
    m = np.einsum(''.join(row) + ''.join(col) + '->' + ''.join(out), t)
    dk = int(np.prod([dims[i] for i in keep])) if keep else 1
    return m.reshape(dk, dk)


def cmi(rho, dims, a, b, c):
    s = lambda keep: entropy(marginal(rho, dims, keep), 1) if keep else 0.0
    return s(a + b) + s(b + c) - s(b) - s(a + b + c)


def apply_channel(rho, dims, kraus, on):
    """sum_i (1 ⊗ K_i ⊗ 1) rho (1 ⊗ K_i ⊗ 1)* with K_i acting on subsystem `on` (output kept in place)."""
    out = 0
    for k in kraus:
        factors = [np.eye(d) for d in dims]
        factors[on] = k
        big = factors[0]
        for f in factors[1:]:
            big = np.kron(big, f)
        out = out + big @ rho @ big.conj().T
    return hermitize(out)


# ----------------------------------------------------------------------------------------------------
# case generation


class Cases:
    def __init__(self, small):
        self.small = small
        self.list = []

    def add(self, group, detail, request, expected, tol=TOL, also=None):
        case = {'name': f'{group}: {detail}', 'request': request, 'expected': expected, 'tolerance': tol}
        if also:
            case['also'] = also
        self.list.append(case)


def pair_kinds(g, d):
    """(label, rho, sigma) pairs of the support situations the families need."""
    out = []
    out.append(('rho full rank, sigma full rank', g.state(d), g.state(d)))
    r = max(1, d // 2)
    out.append((f'rho rank {r}, sigma full rank', g.state(d, r), g.state(d)))
    k = max(1, (2 * d) // 3) if d > 2 else 1
    V = g.unitary(d)
    sigma = g.state(d, k, V)
    # rho inside supp sigma: rho = V (A ⊕ 0) V* with A a k x k state of rank <= k
    A = np.zeros((d, d), complex)
    rk = max(1, k - 1) if k > 1 else 1
    A[:k, :k] = g.state(k, rk)
    rho_in = hermitize(V @ A @ V.conj().T)
    rho_in = hermitize(rho_in / np.real(np.trace(rho_in)))
    out.append((f'rho rank {rk} inside supp sigma (rank {k})', rho_in, sigma))
    out.append((f'rho full rank, sigma rank {k} (supp rho not inside supp sigma)', g.state(d), g.state(d, k)))
    return out


def orthogonal_pair(g, d):
    """rho = A ⊕ 0, sigma = 0 ⊕ B with exact zero blocks: orthogonal supports."""
    k = d // 2
    rho = np.zeros((d, d), complex)
    sigma = np.zeros((d, d), complex)
    rho[:k, :k] = g.state(k)
    sigma[k:, k:] = g.state(d - k)
    return rho, sigma


def gen_spectrum(g, C):
    for d in ([2, 3, 5] if C.small else [2, 3, 4, 5, 7, 8, 12, 16]):
        h = g.hermitian(d)
        w = sla.eigh(h, eigvals_only=True)
        cross(w.sum(), np.real(np.trace(h)), 'spectrum trace')
        C.add('spectrum', f'random Hermitian d={d}', {'op': 'spectrum', 'matrix': jmat(h)}, w.tolist())
        if C.small:
            continue
        rho = g.state(d, max(1, d // 3))
        C.add('spectrum', f'density matrix d={d} rank {max(1, d // 3)}',
              {'op': 'spectrum', 'matrix': jmat(rho)}, sla.eigh(rho, eigvals_only=True).tolist())
    if not C.small:
        for d in [4, 9]:
            V = g.unitary(d)
            lam = np.array([-1.0] * (d // 2) + [2.0] * (d - d // 2))
            h = hermitize((V * lam) @ V.conj().T)
            C.add('spectrum', f'degenerate spectrum d={d}', {'op': 'spectrum', 'matrix': jmat(h)},
                  sla.eigh(h, eigvals_only=True).tolist())


def gen_entropy(g, C):
    dims = [2, 3, 4] if C.small else [2, 3, 4, 6, 8, 16]
    alphas = [1, 0.5, 2] if C.small else [1, 0.5, 2, 3, 0.25, 10, 100]
    for d in dims:
        for r in sorted({d, max(1, d // 2)}):
            rho = g.state(d, r)
            for a in (alphas if d <= 8 else [1, 0.5, 100]):
                req = {'op': 'entropy', 'rho': jstate(rho)}
                if a != 1:
                    req['alpha'] = a
                C.add('entropy', f'alpha={a} d={d} rank {r}', req, jnum(entropy(rho, a)))
    rho = g.state(3, 2)
    C.add('entropy', 'alpha=1 d=3 rank 2, base e (nats)',
          {'op': 'entropy', 'rho': jstate(rho), 'base': 'e'}, jnum(entropy(rho, 1) * LN2))


def div_request(family, rho, sigma, **kw):
    req = {'op': 'divergence', 'family': family, 'rho': jstate(rho), 'sigma': jstate(sigma)}
    req.update(kw)
    return req


def gen_divergences(g, C):
    # Small d: every alpha of every family on every support situation. Larger d (bigger JSON): one alpha
    # below and one above 1 per family, on fewer support situations, to keep the committed file small.
    full = {
        'petz': [0.25, 0.5, 0.75, 1.5, 2],
        'sandwiched': [0.5, 0.75, 0.9, 1.5, 2, 3],
        'geometric': [0.3, 0.7, 1.5, 2],
        'alpha-z': [(0.5, 0.7), (0.8, 0.5), (0.3, 2), (1.5, 2), (2, 1.5), (3, 2.5),
                    (0.5, 1), (2, 1), (0.75, 0.75), (2, 2)],
    }
    reduced = {'petz': [0.5, 2], 'sandwiched': [0.75, 2], 'geometric': [0.7, 1.5],
               'alpha-z': [(0.5, 0.7), (1.5, 2)]}
    tiny = {'petz': [0.5], 'sandwiched': [2], 'geometric': [1.5], 'alpha-z': [(1.5, 2)]}
    small = {'petz': [0.5, 2], 'sandwiched': [0.5, 2], 'geometric': [0.5, 1.5],
             'alpha-z': [(0.5, 0.7), (2, 1.5), (0.5, 1), (2, 2)]}
    if C.small:
        plan = [(d, small, None) for d in [2, 3, 4]]
    else:
        plan = [(2, full, None), (3, full, None), (4, full, None), (5, reduced, None), (6, reduced, None),
                (8, reduced, [0, 2, 3]), (12, tiny, [0, 2]), (16, tiny, [0, 2])]
    for d, alphas, which in plan:
        kinds = pair_kinds(g, d)
        if which is not None:
            kinds = [kinds[i] for i in which]
        for label, rho, sigma in kinds:
            det = f'd={d}, {label}'
            C.add('divergence/umegaki', det, div_request('umegaki', rho, sigma), jnum(umegaki(rho, sigma)))
            C.add('divergence/max', det, div_request('max', rho, sigma), jnum(dmax(rho, sigma)))
            C.add('divergence/min', det, div_request('min', rho, sigma), jnum(dmin(rho, sigma)))
            for a in alphas['petz']:
                C.add('divergence/petz', f'alpha={a}, {det}', div_request('petz', rho, sigma, alpha=a),
                      jnum(petz(rho, sigma, a)))
            for a in alphas['sandwiched']:
                C.add('divergence/sandwiched', f'alpha={a}, {det}', div_request('sandwiched', rho, sigma, alpha=a),
                      jnum(sandwiched(rho, sigma, a)))
            for a, z in alphas['alpha-z']:
                v = alpha_z(rho, sigma, a, z)
                if z == 1:
                    assert (v == np.inf and petz(rho, sigma, a) == np.inf) or \
                        abs(v - petz(rho, sigma, a)) < CROSS_CHECK_REL * max(1, abs(v)), 'alpha-z(z=1) != petz'
                if z == a:
                    assert (v == np.inf and sandwiched(rho, sigma, a) == np.inf) or \
                        abs(v - sandwiched(rho, sigma, a)) < CROSS_CHECK_REL * max(1, abs(v)), \
                        'alpha-z(z=alpha) != sandwiched'
                note = ' (z=1: equals petz)' if z == 1 else (' (z=alpha: equals sandwiched)' if z == a else '')
                C.add('divergence/alpha-z', f'alpha={a}, z={z}{note}, {det}',
                      div_request('alpha-z', rho, sigma, alpha=a, z=z), jnum(v))
            inside = supp_inside(rho, sigma)
            for a in alphas['geometric']:
                if not inside and a < 1:
                    continue  # needs the limit definition; not generated
                C.add('divergence/geometric', f'alpha={a}, {det}', div_request('geometric', rho, sigma, alpha=a),
                      jnum(geometric(rho, sigma, a)))
    # orthogonal supports, exact zero blocks: every family infinite (alpha < 1 included: Q = 0)
    for d in ([2] if C.small else [2, 4, 5]):
        rho, sigma = orthogonal_pair(g, d)
        det = f'd={d}, orthogonal supports (exact zero blocks)'
        for fam in ['umegaki', 'max', 'min']:
            C.add(f'divergence/{fam}', det, div_request(fam, rho, sigma), 'Infinity')
        for a in [0.5, 2]:
            C.add('divergence/petz', f'alpha={a}, {det}', div_request('petz', rho, sigma, alpha=a), 'Infinity')
            C.add('divergence/sandwiched', f'alpha={a}, {det}', div_request('sandwiched', rho, sigma, alpha=a),
                  'Infinity')
            assert petz(rho, sigma, a) == np.inf and sandwiched(rho, sigma, a) == np.inf and dmin(rho, sigma) == np.inf
        C.add('divergence/alpha-z', f'alpha=0.5, z=0.7, {det}',
              div_request('alpha-z', rho, sigma, alpha=0.5, z=0.7), jnum(alpha_z(rho, sigma, 0.5, 0.7)))
    # sigma not normalised (positive semidefinite, trace != 1): D(rho||c sigma) = D(rho||sigma) - log c
    if not C.small:
        for d in [3, 4]:
            rho, sigma = g.state(d), 2.5 * g.state(d)
            det = f'd={d}, sigma with trace 2.5'
            C.add('divergence/umegaki', det, div_request('umegaki', rho, sigma), jnum(umegaki(rho, sigma)))
            C.add('divergence/max', det, div_request('max', rho, sigma), jnum(dmax(rho, sigma)))
            C.add('divergence/min', det, div_request('min', rho, sigma), jnum(dmin(rho, sigma)))
            C.add('divergence/petz', f'alpha=0.5, {det}', div_request('petz', rho, sigma, alpha=0.5),
                  jnum(petz(rho, sigma, 0.5)))
            C.add('divergence/sandwiched', f'alpha=2, {det}', div_request('sandwiched', rho, sigma, alpha=2),
                  jnum(sandwiched(rho, sigma, 2)))
            C.add('divergence/geometric', f'alpha=1.5, {det}', div_request('geometric', rho, sigma, alpha=1.5),
                  jnum(geometric(rho, sigma, 1.5)))
        rho, sigma = g.state(3), g.state(3)
        C.add('divergence/umegaki', 'd=3, base e (nats)', div_request('umegaki', rho, sigma, base='e'),
              jnum(umegaki(rho, sigma) * LN2))


def gen_measured(g, C):
    # commuting pairs: classical KL of the eigenvalues in the common basis
    for d, rr, rs in ([(3, 3, 3)] if C.small else [(2, 2, 2), (3, 3, 3), (4, 2, 4), (5, 5, 3), (8, 8, 8)]):
        V = g.unitary(d)
        p = np.zeros(d)
        q = np.zeros(d)
        p[:rr] = g.probs(rr)
        q[:rs] = g.probs(rs)
        g.r.shuffle(q) if rs < d else None
        rho = hermitize((V * p) @ V.conj().T)
        sigma = hermitize((V * q) @ V.conj().T)
        C.add('divergence/measured', f'commuting pair d={d}, rho rank {rr}, sigma rank {rs} (classical KL)',
              div_request('measured', rho, sigma), jnum(classical_kl(p, q)), MEASURED_TOL)
    # general full-rank pairs: variational formula
    for d in ([2] if C.small else [2, 2, 2, 3, 3]):
        rho, sigma = g.state(d), g.state(d)
        v = measured_variational(rho, sigma)
        assert v <= umegaki(rho, sigma) + 1e-9, 'measured exceeds Umegaki'
        if d == 2:
            vb = measured_qubit_bases(rho, sigma)
            assert abs(v - vb) < 1e-7, f'measured: variational {v} vs basis search {vb}'
        C.add('divergence/measured', f'general full-rank pair d={d} (variational formula, scipy BFGS)',
              div_request('measured', rho, sigma), jnum(v), MEASURED_TOL)


def gen_fidelity_td(g, C):
    for d in ([2, 4] if C.small else [2, 3, 4, 6, 8, 16]):
        for label, rho, sigma in (pair_kinds(g, d) if d <= 8 else pair_kinds(g, d)[2:3]):
            f = fidelity_root(rho, sigma)
            C.add('fidelity', f'd={d}, {label}', {'op': 'fidelity', 'rho': jstate(rho), 'sigma': jstate(sigma)},
                  jnum(f * f), also={'root': jnum(f)})
            C.add('trace-distance', f'd={d}, {label}',
                  {'op': 'trace-distance', 'rho': jstate(rho), 'sigma': jstate(sigma)},
                  jnum(trace_distance(rho, sigma)))
    rho, sigma = orthogonal_pair(g, 4)
    C.add('fidelity', 'd=4, orthogonal supports', {'op': 'fidelity', 'rho': jstate(rho), 'sigma': jstate(sigma)},
          jnum(fidelity_root(rho, sigma) ** 2), also={'root': jnum(fidelity_root(rho, sigma))})
    C.add('trace-distance', 'd=4, orthogonal supports',
          {'op': 'trace-distance', 'rho': jstate(rho), 'sigma': jstate(sigma)}, jnum(trace_distance(rho, sigma)))
    # pure states: F = |<psi|phi>|^2 (textbook), trace distance sqrt(1 - F)
    for d in [2, 5]:
        rho, sigma = g.state(d, 1), g.state(d, 1)
        f = fidelity_root(rho, sigma)
        C.add('fidelity', f'd={d}, two pure states', {'op': 'fidelity', 'rho': jstate(rho), 'sigma': jstate(sigma)},
              jnum(f * f), also={'root': jnum(f)})
        td = trace_distance(rho, sigma)
        assert abs(td - np.sqrt(1 - f * f)) < 1e-10
        C.add('trace-distance', f'd={d}, two pure states',
              {'op': 'trace-distance', 'rho': jstate(rho), 'sigma': jstate(sigma)}, jnum(td))


def gen_cmi(g, C):
    setups = [([2, 2, 2], [0], [1], [2]), ([2, 3, 2], [0], [1], [2])] if C.small else [
        ([2, 2, 2], [0], [1], [2]), ([2, 3, 2], [0], [1], [2]), ([2, 2, 3], [2], [0], [1]),
        ([3, 2, 2], [1], [2], [0]), ([2, 2, 2, 2], [0, 3], [1], [2]), ([2, 2, 2, 2], [0], [1, 2], [3]),
        ([2, 2, 2, 2], [1], [3], [0])]
    for dims, a, b, c in setups:
        d = int(np.prod(dims))
        for r in ([d] if C.small else [d, max(1, d // 4)]):
            rho = g.state(d, r)
            C.add('conditional-mutual-information', f'dims={dims} a={a} b={b} c={c} rank {r}',
                  {'op': 'conditional-mutual-information', 'rho': jstate(rho, dims), 'a': a, 'b': b, 'c': c},
                  jnum(cmi(rho, dims, a, b, c)))
    if not C.small:
        # Markov chain built exactly: rho_AB ⊗ rho_C has I(A;C|B) = 0 (product with C)
        dims = [2, 2, 2]
        rho = np.kron(g.state(4, 3), g.state(2))
        rho = hermitize(rho)
        C.add('conditional-mutual-information', 'dims=[2,2,2], rho_AB ⊗ rho_C (I(A;C|B) = 0)',
              {'op': 'conditional-mutual-information', 'rho': jstate(rho, dims), 'a': [0], 'b': [1], 'c': [2]},
              jnum(cmi(rho, dims, [0], [1], [2])))


def gen_channels(g, C):
    setups = [([2, 2], 1, 2, 2), ([2, 3], 0, 2, 3)] if C.small else [
        ([2, 2], 1, 2, 2), ([2, 2], 0, 2, 3), ([2, 3], 1, 3, 2), ([3, 2], 0, 3, 3), ([2, 3], 0, 2, 2),
        ([2, 2, 2], 1, 2, 2), ([2, 4], 1, 4, 1)]
    for dims, on, d_out, n in setups:
        d_in = dims[on]
        dd = int(np.prod(dims))
        for r in ([dd] if C.small else [dd, 1]):
            rho = g.state(dd, r)
            ks = g.kraus(d_in, d_out, n)
            out = apply_channel(rho, dims, ks, on)
            out_dims = list(dims)
            out_dims[on] = d_out
            cross(rtr(out), 1.0, 'channel output trace')
            C.add('apply-channel', f'dims={dims}, {n} Kraus operators {d_in}->{d_out} on subsystem {on}, rank {r}',
                  {'op': 'apply-channel', 'rho': jstate(rho, dims), 'on': [on],
                   'channel': {'kraus': [jmat(k) for k in ks], 'from': [d_in], 'to': [d_out]}},
                  jmat(out))
    # whole system, `on` left out (default: all)
    for d_in, d_out, n in ([(2, 3, 2)] if C.small else [(2, 3, 2), (3, 3, 4)]):
        rho = g.state(d_in)
        ks = g.kraus(d_in, d_out, n)
        out = apply_channel(rho, [d_in], ks, 0)
        C.add('apply-channel', f'single system, {n} Kraus operators {d_in}->{d_out}, on omitted',
              {'op': 'apply-channel', 'rho': jstate(rho),
               'channel': {'kraus': [jmat(k) for k in ks], 'from': [d_in], 'to': [d_out]}},
              jmat(out))


def gen_extras(g, C):
    """Orders next to 1 (where 1/(alpha-1) meets a vanishing logarithm), a large sandwiched order, the
    Hartley entropy (alpha = 0: log rank, rank-deficient by construction) and a numeric log base.
    Drawn after every other case so the earlier cases of a seed do not move."""
    for d in ([2] if C.small else [2, 3, 5]):
        for label, rho, sigma in pair_kinds(g, d)[:3]:
            det = f'd={d}, {label}'
            for a in [0.999, 1.001]:
                C.add('divergence/petz', f'alpha={a}, {det}', div_request('petz', rho, sigma, alpha=a),
                      jnum(petz(rho, sigma, a)))
                C.add('divergence/sandwiched', f'alpha={a}, {det}', div_request('sandwiched', rho, sigma, alpha=a),
                      jnum(sandwiched(rho, sigma, a)))
                C.add('divergence/alpha-z', f'alpha={a}, z=0.8, {det}',
                      div_request('alpha-z', rho, sigma, alpha=a, z=0.8), jnum(alpha_z(rho, sigma, a, 0.8)))
                if supp_inside(rho, sigma):
                    C.add('divergence/geometric', f'alpha={a}, {det}',
                          div_request('geometric', rho, sigma, alpha=a), jnum(geometric(rho, sigma, a)))
            C.add('divergence/sandwiched', f'alpha=10, {det}', div_request('sandwiched', rho, sigma, alpha=10),
                  jnum(sandwiched(rho, sigma, 10)))
    for d, r in ([(3, 2)] if C.small else [(3, 2), (6, 6), (8, 3)]):
        rho = g.state(d, r)
        assert rank(rho) == r
        C.add('entropy', f'alpha=0 (log rank) d={d} rank {r}', {'op': 'entropy', 'rho': jstate(rho), 'alpha': 0},
              jnum(np.log2(r)))
        for a in [0.999, 1.001]:
            C.add('entropy', f'alpha={a} d={d} rank {r}', {'op': 'entropy', 'rho': jstate(rho), 'alpha': a},
                  jnum(entropy(rho, a)))
    rho, sigma = g.state(4), g.state(4, 3)
    C.add('divergence/umegaki', 'd=4, rho full rank, sigma rank 3, base 10',
          div_request('umegaki', rho, sigma, base=10), 'Infinity')
    C.add('divergence/petz', 'alpha=0.5, d=4, rho full rank, sigma rank 3, base 10',
          div_request('petz', rho, sigma, alpha=0.5, base=10), jnum(petz(rho, sigma, 0.5) * LN2 / np.log(10)))


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.split('\n')[0])
    ap.add_argument('--seed', type=int, required=True)
    ap.add_argument('--small', action='store_true', help='a quick batch (small d, one case per setting)')
    ap.add_argument('--out', help='write here instead of standard output')
    args = ap.parse_args(argv)
    g = Gen(args.seed)
    C = Cases(args.small)
    gen_spectrum(g, C)
    gen_entropy(g, C)
    gen_divergences(g, C)
    gen_measured(g, C)
    gen_fidelity_td(g, C)
    gen_cmi(g, C)
    gen_channels(g, C)
    gen_extras(g, C)
    doc = {
        'generator': f'numpy {np.__version__} / scipy {scipy.__version__}',
        'seed': args.seed,
        'tolerance_rule': ('scalars: |got - expected| <= tolerance * max(1, |expected|); "Infinity" exactly; '
                           'spectrum: elementwise, relative to max(1, max |eigenvalue|); matrices: max entry '
                           'difference <= tolerance * max(1, Frobenius norm of expected). measured: tolerance '
                           f'{MEASURED_TOL} (the reference is an optimiser\'s answer).'),
        'cases': C.list,
    }
    text = json.dumps(doc, allow_nan=False, separators=(',', ':'))
    if args.out:
        with open(args.out, 'w') as f:
            f.write(text + '\n')
        print(f'{len(C.list)} cases, {len(text)} bytes -> {args.out}', file=sys.stderr)
    else:
        sys.stdout.write(text + '\n')


if __name__ == '__main__':
    main()
