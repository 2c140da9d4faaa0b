/**
 * The op `verify-answer`: re-verify an SDP answer's certificate inside the engine, from the request and
 * the answer alone, for surfaces that have no Python (the browser calculators, the wiki embed). It is
 * the TypeScript twin of the numpy checker kernel-bridge/rhosigma/certificates.py, written from the same
 * published formulations and the same rules: both points' feasibility up to rounding allowances, both
 * bounds recomputed from the points, and `certified` when the recomputed bracket lies within the stated
 * one (up to its width again and a few units in the last place) and contains the value.
 *
 * How independent it is: it reads the points and recomputes the bounds itself, never calling the code
 * that produced them (src/oneshot, src/guessing), so a wrong repair, a wrong sign or a bracket that the
 * points do not prove is caught. It shares the engine's linear algebra (src/linalg's eigensolver), so a
 * fault there would not be; the numpy checker, which shares nothing, is the referee's tool.
 * A certified bracket is evidence under floating point, not a proof (eigenvalues padded by
 * 4√n·u·‖A‖_F; support decisions follow the answer's support tolerance).
 *
 * Deliberately not here: the quantities themselves; answers without points (they are "not checkable").
 * Cost: a few eigendecompositions of the request's sides (guesswork: one per guessing order).
 */
import {
  CMatrix, add, adjoint, eigh, fromSpectrum, hermitianPart, identity, kron, marginal, mul, partialTrace, product, scale, sub, trace,
  traceNorm, traceOfProductRe, zeros, frobeniusNorm,
  traceParts,
} from '../linalg/index.js';
import { krausToChoi } from '../quantum/channels.js';
import { partialTranspose, reorderSubsystems } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';
import { defineOp, type OpResult } from './registry.js';
import { readChannel, readMatrix, readNumber, readOperatorState, readState, readSystems } from './codec.js';
import { dense, sideOf } from './cost.js';

const U = 1.1102230246251565e-16;
const DEFAULT_SUPPORT = 1e-12;

interface Check { check: string; ok: boolean; [k: string]: unknown }

class Checks {
  list: Check[] = [];
  require(check: string, ok: boolean, detail: Record<string, unknown> = {}): void {
    this.list.push({ check, ok: Boolean(ok), ...detail });
  }
}

function num(x: unknown): number {
  if (x === 'Infinity') return Infinity;
  if (x === '-Infinity') return -Infinity;
  if (typeof x !== 'number') throw new RhoError('invalid-argument', `Expected a number in the answer (got ${JSON.stringify(x)}).`, 'answer');
  return x;
}

const allowance = (n: number, norm: number) => 4 * Math.sqrt(Math.max(1, n)) * U * Math.abs(norm);

function spectrum(m: CMatrix): { values: Float64Array; pad: number } {
  const h = hermitianPart(m);
  return { values: eigh(h, { vectors: false }).values, pad: allowance(h.rows, frobeniusNorm(h)) };
}
const minEig = (m: CMatrix) => {
  const s = spectrum(m);
  return { value: s.values[0], pad: s.pad };
};
const maxEigUpper = (m: CMatrix) => {
  const s = spectrum(m);
  return s.values[s.values.length - 1] + s.pad;
};
/** The s ≥ 0 with m + s·I ⪰ 0, with the allowance. */
const shiftToPsd = (m: CMatrix) => {
  const e = minEig(m);
  return Math.max(0, -e.value + e.pad);
};
function psdPart(m: CMatrix): CMatrix {
  const { values, vectors } = eigh(hermitianPart(m), { vectors: true });
  return fromSpectrum(vectors!, Array.from(values, (v) => Math.max(0, v)));
}
/**
 * Columns v_k of the eigenvectors with eigenvalue above tol·λ_max (an orthonormal basis of the support),
 * or √λ_k v_k with `half` (then m = H H* on its support).
 */
function supportColumns(m: CMatrix, tol: number, half = false): CMatrix {
  const { values, vectors } = eigh(hermitianPart(m), { vectors: true });
  const n = m.rows;
  const top = Math.max(values[n - 1], 0);
  const keep = [...values.keys()].filter((k) => values[k] > tol * top && values[k] > 0);
  const h = zeros(n, keep.length);
  keep.forEach((k, c) => {
    const r = half ? Math.sqrt(values[k]) : 1;
    for (let i = 0; i < n; i++) {
      h.re[i * keep.length + c] = vectors!.re[i * n + k] * r;
      h.im[i * keep.length + c] = vectors!.im[i * n + k] * r;
    }
  });
  return h;
}
const supportBasis = (m: CMatrix, tol: number) => supportColumns(m, tol);
const halfOnSupport = (m: CMatrix, tol: number) => supportColumns(m, tol, true);
/** ‖√a √b‖₁ on the supports. */
function rootFidelity(a: CMatrix, b: CMatrix, tol: number): number {
  const ha = halfOnSupport(a, tol);
  const hb = halfOnSupport(b, tol);
  if (ha.cols === 0 || hb.cols === 0) return 0;
  return traceNorm(mul(adjoint(ha), hb));
}
/** G^{−1/2} on the support of G. */
function invSqrt(g: CMatrix): CMatrix {
  const { values, vectors } = eigh(hermitianPart(g), { vectors: true });
  const top = Math.max(values[values.length - 1], 0);
  return fromSpectrum(vectors!, Array.from(values, (v) => (v > 1e-14 * top ? 1 / Math.sqrt(v) : 0)));
}
/** Inverse of a positive definite Hermitian matrix and its smallest eigenvalue. */
function inversePd(y: CMatrix): { inverse: CMatrix; smallest: number } {
  const { values, vectors } = eigh(hermitianPart(y), { vectors: true });
  return { inverse: fromSpectrum(vectors!, Array.from(values, (v) => 1 / v)), smallest: values[0] };
}
const compress = (p: CMatrix, m: CMatrix) => hermitianPart(mul(mul(adjoint(p), m), p));
const opNorm = (m: CMatrix) => {
  const s = spectrum(m);
  return Math.max(Math.abs(s.values[0]), Math.abs(s.values[s.values.length - 1]));
};

type Fn = (req: Record<string, any>, ans: Record<string, any>, c: Checks, tol: number) => [number, number];

const point = (ans: Record<string, any>, side: 'primal' | 'dual', key: string): CMatrix =>
  readMatrix(ans.certificate?.[side]?.[key], `answer.certificate.${side}.${key}`);

function logBase(req: Record<string, any>): number {
  const b = req.base ?? 2;
  return b === 'e' ? 1 : Math.log(b);
}
function supportTolerance(ans: Record<string, any>): number {
  return typeof ans.supportTolerance === 'number' ? ans.supportTolerance : DEFAULT_SUPPORT;
}

/** Σ_jk |A_jk|·|B_kj|: the scale of the rounding of Tr AB (Higham, 2nd ed., §3.1). */
function absoluteTraceScale(a: CMatrix, b: CMatrix): number {
  const n = a.rows;
  let s = 0;
  for (let j = 0; j < n; j++) {
    for (let k = 0; k < n; k++) s += Math.hypot(a.re[j * n + k], a.im[j * n + k]) * Math.hypot(b.re[k * n + j], b.im[k * n + j]);
  }
  return s;
}

const hypothesisTesting: Fn = (req, ans, c, tol) => {
  const rho = readState(req.rho, 'request.rho', tol).matrix;
  const sigma = readOperatorState(req.sigma, 'request.sigma', tol).matrix;
  const eps = readNumber(req.epsilon, 'request.epsilon', { min: 0, max: 1 });
  const lb = logBase(req);
  const d = rho.rows;
  const { hi: trS, lo: trSLo } = traceParts(sigma);
  const mu = num(ans.certificate.dual.mu);
  c.require('dual point μ ≥ 0', mu >= 0, { mu });
  // Each logarithm errs by an ulp or two of its size: relative to D when Tr σ ≈ 1.
  const logPad = (x: number) => 16 * U * (Math.abs(x) + Math.abs(Math.log(trS)) / lb);
  // A trace over d² products errs by at most γ·Σ|A_jk||B_kj|.
  const gamma = (2 * d * d + 8) * U;
  if (ans.certificate.primal.rejection !== undefined) {
    const m = hermitianPart(point(ans, 'primal', 'rejection'));
    const s = spectrum(m);
    c.require('0 ⪯ M ⪯ I', s.values[0] >= -s.pad && s.values[d - 1] <= 1 + s.pad);
    const rej = traceOfProductRe(rho, m);
    const rejUp = rej + gamma * absoluteTraceScale(rho, m);
    c.require('Tr ρM ≤ ε (type-I error)', rej <= eps + 8 * d * U, { rejection: rej });
    const e = spectrum(sub(sigma, scale(rho, mu)));
    let bcUp = mu * eps;
    for (const v of e.values) bcUp += Math.max(0, v + e.pad);
    bcUp = Math.min(bcUp, trS);
    // M/(1 + pad) lies in [0, I]. Where the type-I error may exceed ε, two repairs, the better kept:
    // scaled by ε/Tr ρM it is feasible; or the excess is paid at the rate μ*, the slope of the concave
    // β^c_ε = max{Tr σM : Tr ρM ≤ ε}, which weak duality (M = 0 in με + Tr(σ − μρ)₊ ≥ με + Tr M(σ − μρ))
    // bounds by β^c/ε.
    const bcRaw = Math.max(0, (traceOfProductRe(sigma, m) - gamma * absoluteTraceScale(sigma, m)) / (1 + s.pad));
    const excess = Math.max(0, rejUp - eps);
    const bcLow = excess > 0 ? Math.max(bcRaw * (eps / rejUp), bcRaw - (bcUp / eps) * excess) : bcRaw;
    const fromC = (bc: number) => (bc < trS ? -(Math.log(trS) + Math.log1p((trSLo - bc) / trS)) / lb : Infinity);
    const lo = fromC(bcLow);
    const up = fromC(bcUp);
    return [lo - logPad(lo), up + logPad(up)];
  }
  const t = hermitianPart(point(ans, 'primal', 'test'));
  const s = spectrum(t);
  c.require('0 ⪯ Λ ⪯ I', s.values[0] >= -s.pad && s.values[d - 1] <= 1 + s.pad);
  const acc = traceOfProductRe(rho, t);
  const accLow = (acc - gamma * absoluteTraceScale(rho, t)) / (1 + s.pad);
  c.require('Tr ρΛ ≥ 1 − ε', acc >= 1 - eps - 8 * d * U, { acceptance: acc });
  const e = spectrum(sub(scale(rho, mu), sigma));
  let bLow = mu * (1 - eps);
  for (const v of e.values) bLow -= Math.max(0, v + e.pad);
  // Λ/(1 + pad) lies in [0, I]. Where the acceptance may fall short of 1 − ε, two repairs, the better
  // kept: mixed with I by the t that restores it, it is feasible; or the shortfall is paid at the rate
  // μ*, the slope of the convex β_ε, which weak duality bounds for any 0 ⪯ P ⪯ I with Tr ρP > 1 − ε
  // (g(μ) ≤ Tr σP − μ(Tr ρP − (1 − ε))): μ* ≤ (Tr σP − β)/(Tr ρP − (1 − ε)), with P = I and P = Λ/λ_max(Λ).
  const bRaw = traceOfProductRe(sigma, t) + gamma * absoluteTraceScale(sigma, t);
  const short = Math.max(0, 1 - eps - accLow);
  let bUp = bRaw;
  if (short > 0) {
    const mix = short / (1 - accLow);
    let muBar = (trS + trSLo - bLow) / eps;
    const top = s.values[d - 1] + s.pad;
    if (top > 0 && accLow / top > 1 - eps) muBar = Math.min(muBar, (bRaw / top - bLow) / (accLow / top - (1 - eps)));
    bUp = Math.min((1 - mix) * bRaw + mix * (trS + trSLo), bRaw + Math.max(0, muBar) * short);
  }
  const fromB = (b: number) => (b > 0 ? -Math.log(b) / lb : Infinity);
  const lo = fromB(bUp);
  const up = fromB(bLow);
  return [lo - logPad(lo), up + logPad(up)];
};

const smoothMax: Fn = (req, ans, c, tol) => {
  const rho = readState(req.rho, 'request.rho', tol).matrix;
  const sigma = readOperatorState(req.sigma, 'request.sigma', tol).matrix;
  const eps = readNumber(req.epsilon, 'request.epsilon', { min: 0, max: 1 });
  const lb = logBase(req);
  const st = supportTolerance(ans);
  const n = rho.rows;
  const c2 = (1 - eps) * (1 + eps);
  const rt = hermitianPart(point(ans, 'primal', 'smoothed'));
  const lam = num(ans.certificate.primal.lambda);
  const e0 = minEig(rt);
  c.require('ρ̃ ⪰ 0', e0.value >= -e0.pad, { smallest: e0.value });
  const tr = trace(rt).re;
  c.require('Tr ρ̃ ≤ 1', tr <= 1 + 8 * n * U, { trace: tr });
  const f = rootFidelity(rho, rt, st);
  c.require('ρ̃ in the purified-distance ball: ‖√ρ√ρ̃‖₁ ≥ √(1 − ε²)', f >= Math.sqrt(c2) - 32 * n * U, { rootFidelity: f });
  const e1 = minEig(sub(scale(sigma, lam), rt));
  c.require('λσ − ρ̃ ⪰ 0', e1.value >= -e1.pad, { smallest: e1.value });
  const upper = lam > 0 ? Math.log(lam) / lb : -Infinity;
  const P = supportBasis(sigma, st);
  const Y = compress(P, point(ans, 'dual', 'Y'));
  const nu = num(ans.certificate.dual.nu);
  c.require('ν ≥ 0', nu >= 0, { nu });
  const s = P.cols;
  if (s === 0) return [-Infinity, upper];
  const { values: yw, vectors: yv } = eigh(Y, { vectors: true });
  let yn = 0;
  for (const v of yw) yn += v * v;
  const ypad = allowance(s, Math.sqrt(yn));
  c.require('Y ⪰ 0', yw[0] >= -ypad, { smallest: yw[0] });
  const norm = traceOfProductRe(compress(P, sigma), Y);
  c.require('Tr σY ≤ 1 (to 1e-12; Y is divided by it when above)', norm <= 1 + 1e-12, { traceSigmaY: norm });
  const yl = Array.from(yw, (v) => Math.max(0, v - ypad) / (norm > 1 ? norm : 1));
  const rc = compress(P, rho);
  const w = Array.from({ length: s }, (_, k) => {
    let acc = 0;
    for (let i = 0; i < s; i++) {
      for (let j = 0; j < s; j++) {
        const ar = yv!.re[i * s + k], ai = -yv!.im[i * s + k];
        const br = yv!.re[j * s + k], bi = yv!.im[j * s + k];
        const rr = rc.re[i * s + j], ri = rc.im[i * s + j];
        const tr2 = rr * br - ri * bi, ti = rr * bi + ri * br;
        acc += ar * tr2 - ai * ti;
      }
    }
    return Math.max(0, acc);
  });
  let t = 0;
  let numer = c2 - w.reduce((a, b) => a + b, 0);
  let bad = false;
  for (let k = 0; k < s; k++) {
    if (!(w[k] > 0)) continue;
    const z = yl[k] + nu;
    if (!(z > 0)) bad = true;
    t += w[k] / z;
    numer += (w[k] * yl[k]) / z;
  }
  const lowerLam = bad || !(t > 0) ? -Infinity : numer / t - 32 * s * U * (Math.abs(numer / t) + nu + 1);
  return [lowerLam > 0 ? Math.log(lowerLam) / lb : -Infinity, upper];
};

function bipartite(req: Record<string, any>, tol: number): { rab: CMatrix; da: number; db: number } {
  const st = readState(req.rho, 'request.rho', tol);
  const a = readSystems(req.a, 'request.a', st.dims.length, { labels: st.labels, allowEmpty: false });
  const b = readSystems(req.b ?? [], 'request.b', st.dims.length, { labels: st.labels, allowEmpty: true });
  let rab = marginal(st.matrix, st.dims, [...a, ...b]);
  rab = scale(rab, 1 / trace(rab).re);
  const da = product(a.map((k) => st.dims[k]));
  return { rab, da, db: rab.rows / da };
}

const minEntropy: Fn = (req, ans, c, tol) => {
  const { rab, da, db } = bipartite(req, tol);
  const lb = logBase(req);
  const sig = hermitianPart(point(ans, 'primal', 'sigma'));
  const s = shiftToPsd(sub(kron(identity(da), sig), rab));
  c.require('I_A ⊗ σ_B ⪰ ρ_AB (shift needed, at most rounding)', s <= 1e-9 * Math.max(1, trace(sig).re), { shift: s });
  const up = trace(sig).re + db * s;
  const X = psdPart(point(ans, 'dual', 'X'));
  const g = partialTrace(X, [da, db], [0]);
  const defect = frobeniusNorm(sub(g, identity(db)));
  c.require('tr_A X = I_B (defect at most 1e-9·(1 + ‖X‖_F), then renormalised)', defect <= 1e-9 * (1 + frobeniusNorm(X)), { defect });
  const k = kron(identity(da), invSqrt(g));
  const low = traceOfProductRe(rab, mul(mul(k, X), k));
  const pad = 8 * (da * db) ** 2 * U * Math.max(Math.abs(up), Math.abs(low));
  const h = (x: number) => (x > 0 ? -Math.log(x) / lb : Infinity);
  return [h(up + pad), h(low - pad)];
};

const maxEntropy: Fn = (req, ans, c, tol) => {
  const { rab, da, db } = bipartite(req, tol);
  const lb = logBase(req);
  const st = supportTolerance(ans);
  const sig = hermitianPart(point(ans, 'primal', 'sigma'));
  const e = minEig(sig);
  const tr = trace(sig).re;
  c.require('σ_B is a state', e.value >= -e.pad && Math.abs(tr - 1) <= 8 * db * U, { smallest: e.value, trace: tr });
  const f = rootFidelity(rab, kron(identity(da), scale(psdPart(sig), 1 / tr)), st) ** 2;
  const P = supportBasis(rab, st);
  const Y = compress(P, point(ans, 'dual', 'Y'));
  const { inverse, smallest } = inversePd(Y);
  c.require('Y positive definite on supp ρ_AB', smallest > 0, { smallest });
  const lam = maxEigUpper(partialTrace(mul(mul(P, inverse), adjoint(P)), [da, db], [0]));
  const rootUp = Math.sqrt(Math.max(0, traceOfProductRe(compress(P, rab), Y)) * Math.max(0, lam)) * (1 + 1e-14);
  const rp = 8 * P.cols * P.cols * U;
  const h = (x: number) => (x > 0 ? Math.log(x) / lb : -Infinity);
  return [h(f * (1 - 4e-15) - rp), h((rootUp + rp) ** 2)];
};

const maxInformation: Fn = (req, ans, c, tol) => {
  const { rab, da, db } = bipartite(req, tol);
  const lb = logBase(req);
  const st = supportTolerance(ans);
  const ra = partialTrace(rab, [da, db], [1]);
  const { values: w, vectors: vv } = eigh(hermitianPart(ra), { vectors: true });
  const top = Math.max(w[da - 1], 0);
  const keep = [...w.keys()].filter((k) => w[k] > st * top && w[k] > 0);
  const r = keep.length;
  const left = zeros(r, da);
  keep.forEach((k, row) => {
    const f = 1 / Math.sqrt(w[k]);
    for (let j = 0; j < da; j++) {
      left.re[row * da + j] = f * vv!.re[j * da + k];
      left.im[row * da + j] = -f * vv!.im[j * da + k];
    }
  });
  const K = kron(left, identity(db));
  const tau = hermitianPart(mul(mul(K, rab), adjoint(K)));
  const sig = hermitianPart(point(ans, 'primal', 'sigma'));
  const { values: sw, vectors: sv } = eigh(sig, { vectors: true });
  c.require('σ_B positive definite', sw[0] > 0, { smallest: sw[0] });
  const isq = fromSpectrum(sv!, Array.from(sw, (v) => 1 / Math.sqrt(Math.max(v, 1e-300))));
  const kk = kron(identity(r), isq);
  const lam = maxEigUpper(mul(mul(kk, tau), kk));
  let dropped = 0;
  for (let k = 0; k < da; k++) if (!keep.includes(k)) dropped += Math.max(0, w[k]);
  c.require("ρ_A's dropped weight is rounding", dropped <= 1e-9, { dropped });
  const Z = psdPart(point(ans, 'dual', 'Z'));
  const g = hermitianPart(partialTrace(mul(kron(ra, identity(db)), Z), [da, db], [0]));
  const defect = frobeniusNorm(sub(g, identity(db)));
  c.require('tr_A((ρ_A ⊗ I)Z) = I_B (defect at most 1e-9·(1 + ‖Z‖_F), then renormalised)', defect <= 1e-9 * (1 + frobeniusNorm(Z)), { defect });
  const k2 = kron(identity(da), invSqrt(g));
  const low = traceOfProductRe(rab, mul(mul(k2, Z), k2));
  const cond = r > 0 ? w[keep[r - 1]] / w[keep[0]] : 1;
  const pad = 8 * (da * db) ** 2 * U * Math.max(Math.abs(lam), Math.abs(low)) + 4 * da * db * db * U * cond;
  const h = (x: number) => (x > 0 ? Math.log(x) / lb : -Infinity);
  return [h(low - pad), h(lam + pad)];
};

function povmChecks(ms: CMatrix[], d: number, c: Checks, what: string): { neg: number; defect: number } {
  let neg = 0;
  let sum = zeros(d, d);
  for (const m of ms) {
    neg += Math.max(0, -minEig(m).value);
    sum = add(sum, m);
  }
  const defect = opNorm(sub(sum, identity(d)));
  c.require(`${what} ⪰ 0 and Σ = I (to 1e-9)`, neg <= 1e-9 && defect <= 1e-9, { negative: neg, defect });
  return { neg, defect };
}

function readStates(req: Record<string, any>, tol: number): CMatrix[] {
  if (!Array.isArray(req.states)) throw new RhoError('invalid-argument', 'The request has no list of states.', 'request.states');
  return req.states.map((s: unknown, k: number) => readState(s, `request.states[${k}]`, tol).matrix);
}
function readList(ans: Record<string, any>, key: string): CMatrix[] {
  const list = ans.certificate?.primal?.[key];
  if (!Array.isArray(list)) throw new RhoError('invalid-argument', `The certificate has no list "${key}".`, `answer.certificate.primal.${key}`);
  return list.map((m: unknown, k: number) => hermitianPart(readMatrix(m, `answer.certificate.primal.${key}[${k}]`)));
}

const guessing: Fn = (req, ans, c, tol) => {
  const ps: number[] = req.probabilities;
  const states = readStates(req, tol);
  const d = states[0].rows;
  const ms = readList(ans, 'measurement');
  c.require('one POVM element per state', ms.length === states.length, { elements: ms.length });
  const { neg, defect } = povmChecks(ms, d, c, 'M_x');
  let low = -(neg + defect) * d;
  ms.forEach((m, x) => (low += ps[x] * traceOfProductRe(m, states[x])));
  const Y = hermitianPart(point(ans, 'dual', 'Y'));
  let s = 0;
  states.forEach((r, x) => (s = Math.max(s, shiftToPsd(sub(Y, scale(r, ps[x]))))));
  const up = trace(Y).re + d * s;
  const pad = 8 * states.length * d * d * U;
  return [low - pad, up + pad];
};

function permutations(items: number[]): number[][] {
  if (items.length <= 1) return [items.slice()];
  const out: number[][] = [];
  items.forEach((first, i) => {
    for (const rest of permutations(items.filter((_, j) => j !== i))) out.push([first, ...rest]);
  });
  return out;
}

const guesswork: Fn = (req, ans, c, tol) => {
  const ps: number[] = (req.probabilities as number[]).map((p) => Math.max(0, p));
  const k = req.moment ?? 1;
  const states = readStates(req, tol);
  const d = states[0].rows;
  const sup = ps.map((_, x) => x).filter((x) => ps[x] > 0);
  const zero = ps.map((_, x) => x).filter((x) => ps[x] === 0);
  const cost = (order: number[]) => {
    let m = zeros(d, d);
    order.forEach((x, pos) => {
      if (ps[x] > 0) m = add(m, scale(states[x], ps[x] * Math.pow(pos + 1, k)));
    });
    return m;
  };
  const orders: number[][] = ans.certificate?.primal?.orders;
  if (!Array.isArray(orders)) throw new RhoError('invalid-argument', 'The certificate has no list "orders".', 'answer.certificate.primal.orders');
  const ms = readList(ans, 'measurement');
  c.require('one POVM element per listed order', ms.length === orders.length, { elements: ms.length });
  const sorted = (o: number[]) => [...o].sort((a, b) => a - b).join(',');
  c.require('every listed order orders the support first', orders.every((o) => Array.isArray(o) && sorted(o.slice(0, sup.length)) === sup.join(',')));
  const { neg, defect } = povmChecks(ms, d, c, 'M_g');
  const top = Math.max(...sup.map((x) => ps[x] * Math.pow(ps.length, k)));
  let up = (neg + defect) * d * top * sup.length;
  ms.forEach((m, g) => (up += traceOfProductRe(m, cost(orders[g]))));
  const Y = hermitianPart(point(ans, 'dual', 'Y'));
  let s = 0;
  for (const o of permutations(sup)) s = Math.max(s, shiftToPsd(sub(cost([...o, ...zero]), Y)));
  const low = trace(Y).re - d * s;
  const pad = 8 * Math.max(1, orders.length) * d * d * U * Math.max(Math.abs(up), Math.abs(low));
  return [low - pad, up + pad];
};

const diamond: Fn = (req, ans, c, tol) => {
  const a = readChannel(req.a, 'request.a', tol);
  const b = readChannel(req.b, 'request.b', tol);
  const din = product(a.fromDims);
  const dout = product(a.toDims);
  const psi = point(ans, 'primal', 'purification');
  let nrm = 0;
  for (let k = 0; k < psi.re.length; k++) nrm += psi.re[k] ** 2 + psi.im[k] ** 2;
  nrm = Math.sqrt(nrm);
  c.require('ψ is a unit vector', Math.abs(nrm - 1) <= 1e-9, { norm: nrm });
  // ψ as the din × din matrix P (input, reference), then ((N − M) ⊗ id)(ψψ*) = Σ_k (K P)(K P)* ∓ ...
  const P = zeros(din, din);
  for (let i = 0; i < din * din; i++) {
    P.re[i] = psi.re[i] / nrm;
    P.im[i] = psi.im[i] / nrm;
  }
  let out = zeros(dout * din, dout * din);
  for (const [sign, ch] of [[1, a], [-1, b]] as const) {
    for (const K of ch.kraus) {
      const v = mul(K, P);
      const col = zeros(dout * din, 1);
      col.re.set(v.re);
      col.im.set(v.im);
      out = add(out, scale(mul(col, adjoint(col)), sign));
    }
  }
  const sp = spectrum(out);
  let low = 0;
  for (const v of sp.values) low += Math.abs(v);
  low = 0.5 * low - 0.5 * sp.values.length * sp.pad;
  const J = hermitianPart(sub(krausToChoi(a), krausToChoi(b)));
  const Z = hermitianPart(point(ans, 'dual', 'Z'));
  const s = Math.max(shiftToPsd(Z), shiftToPsd(sub(Z, J)));
  const up = maxEigUpper(partialTrace(add(Z, scale(identity(Z.rows), s)), [din, dout], [1]));
  return [low, up];
};

const fidelitySdp: Fn = (req, ans, c, tol) => {
  const rho = readState(req.rho, 'request.rho', tol).matrix;
  const sigma = readState(req.sigma, 'request.sigma', tol).matrix;
  const st = supportTolerance(ans);
  const n = rho.rows;
  const X = point(ans, 'primal', 'offDiagonal');
  const block = zeros(2 * n, 2 * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const put = (r: number, q: number, re: number, im: number) => {
        block.re[r * 2 * n + q] = re;
        block.im[r * 2 * n + q] = im;
      };
      put(i, j, rho.re[i * n + j], rho.im[i * n + j]);
      put(n + i, n + j, sigma.re[i * n + j], sigma.im[i * n + j]);
      put(i, n + j, X.re[i * n + j], X.im[i * n + j]);
      put(n + j, i, X.re[i * n + j], -X.im[i * n + j]);
    }
  }
  const e = minEig(block);
  c.require('[[ρ, X], [X*, σ]] ⪰ 0', e.value >= -e.pad, { smallest: e.value });
  let reTr = 0;
  for (let i = 0; i < n; i++) reTr += X.re[i * n + i];
  const lowRoot = Math.max(0, reTr - 8 * n * n * U);
  const P = supportBasis(rho, st);
  const Y = compress(P, point(ans, 'dual', 'Y'));
  const { inverse, smallest } = inversePd(Y);
  c.require('Y positive definite on supp ρ', smallest > 0, { smallest });
  const upRoot =
    Math.sqrt(Math.max(0, traceOfProductRe(compress(P, rho), Y)) * Math.max(0, traceOfProductRe(compress(P, sigma), inverse))) * (1 + 1e-14) +
    8 * n * n * U;
  return [lowRoot ** 2, upRoot ** 2];
};

/**
 * F(A;C|B) = max over channels R: B → BC of F(ρ_ABC, (id_A ⊗ R)(ρ_AB)) (Seshadreesan & Wilde, Phys. Rev. A 92,
 * 042321 (2015)). Lower: the closed-form F(ρ_ABC, σ(J)) of the answer's Choi matrix J (checked ⪰ 0 and Tr_out J = 1_B
 * to 1e-9, then made exactly trace preserving by (T^{−1/2} ⊗ 1) J (T^{−1/2} ⊗ 1), T = Tr_out J), with σ(J) =
 * Tr_B[(ρ_AB^{T_B} ⊗ 1)(1_A ⊗ J)] (the Choi–Jamiołkowski identity). Upper: √F(ρ, σ) ≤ √(Tr ρY · Tr σY⁻¹) for Y ≻ 0 on
 * supp ρ (Alberti 1983; the dual of Watrous's fidelity SDP), and Tr σ(J)W = Tr K(W)J with K(W) = Tr_A[(W ⊗ 1_B)(ρ_AB^{T_B}
 * ⊗ 1)] (subsystems A, B, BC), so Tr σ(J)W ≤ Tr Z + d_B·s for every channel once (Z + s·1) ⊗ 1 ⪰ K(W), W = Y⁻¹.
 */
const fidelityOfRecovery: Fn = (req, ans, c, tol) => {
  const st = readState(req.rho, 'request.rho', tol);
  const opts = { labels: st.labels };
  const n = st.dims.length;
  const [ga, gb, gc] = (['a', 'b', 'c'] as const).map((g) => readSystems(req[g], `request.${g}`, n, opts));
  const dA = product(ga.map((k) => st.dims[k]));
  const dB = product(gb.map((k) => st.dims[k]));
  const dC = product(gc.map((k) => st.dims[k]));
  const dO = dB * dC;
  const N = dA * dO;
  let rabc = marginal(st.matrix, st.dims, [...ga, ...gb, ...gc]);
  rabc = hermitianPart(scale(rabc, 1 / trace(rabc).re));
  const rab = partialTrace(rabc, [dA * dB, dC], [1]);
  const stol = typeof req.supportTolerance === 'number' ? req.supportTolerance : DEFAULT_SUPPORT;
  const rabT = kron(partialTranspose(rab, [dA, dB], [1]), identity(dO));
  // Primal: J, a Choi matrix of a channel B → BC (input factor first).
  const J = hermitianPart(point(ans, 'primal', 'choi'));
  c.require('J has the size of a channel B → BC', J.rows === dB * dO, { rows: J.rows });
  const ej = minEig(J);
  c.require('J ⪰ 0 (completely positive)', ej.value >= -ej.pad, { smallest: ej.value });
  const T = partialTrace(J, [dB, dO], [1]);
  const defect = opNorm(sub(T, identity(dB)));
  c.require('Tr_out J = 1_B (trace preserving, to 1e-9)', defect <= 1e-9, { defect });
  const Jp = psdPart(J);
  const S = kron(invSqrt(partialTrace(Jp, [dB, dO], [1])), identity(dO));
  const Jr = hermitianPart(mul(mul(S, Jp), S));
  const sigma = hermitianPart(partialTrace(mul(rabT, kron(identity(dA), Jr)), [dA, dB, dO], [1]));
  const f = rootFidelity(rabc, sigma, stol) ** 2;
  const pad = 8 * N * N * U;
  // Dual: Y on supp ρ_ABC, Z on B.
  const P = supportBasis(rabc, stol);
  const Y = compress(P, point(ans, 'dual', 'Y'));
  const { inverse, smallest } = inversePd(Y);
  c.require('Y positive definite on supp ρ_ABC', smallest > 0, { smallest });
  const W = mul(mul(P, inverse), adjoint(P));
  const Wext = reorderSubsystems(kron(W, identity(dB)), [dA, dO, dB], [0, 2, 1]);
  const K = hermitianPart(partialTrace(mul(Wext, rabT), [dA, dB, dO], [0]));
  const Z = hermitianPart(point(ans, 'dual', 'Z'));
  c.require('Z acts on B', Z.rows === dB, { rows: Z.rows });
  const s = shiftToPsd(sub(kron(Z, identity(dO)), K));
  const mu = trace(Z).re + dB * s;
  const upRoot = Math.sqrt(Math.max(0, traceOfProductRe(compress(P, rabc), Y)) * Math.max(0, mu)) * (1 + 1e-14) + pad;
  return [Math.max(0, f * (1 - 4e-15) - pad), upRoot ** 2];
};

/** Ranges the quantities have by definition: a recomputed bracket is clipped to them (facts, not evidence). */
function entropyRange(req: Record<string, any>, tol: number): [number, number] {
  const { da } = bipartite(req, tol);
  const h = Math.log(da) / logBase(req);
  return [-h, h];
}

const RANGES: Record<string, (req: Record<string, any>, tol: number) => [number, number]> = {
  'fidelity-of-recovery': () => [0, 1],
  'fidelity-sdp': () => [0, 1],
  'diamond-distance': () => [0, 1],
  // −log d_A ≤ H_min, H_max ≤ log d_A; 0 ≤ I_max ≤ 2 log min(d_A, d_B) (the engine's ranges, same sources).
  'conditional-min-entropy': (req, tol) => entropyRange(req, tol),
  'conditional-max-entropy': (req, tol) => entropyRange(req, tol),
  'max-information': (req, tol) => {
    const { da, db } = bipartite(req, tol);
    return [0, (2 * Math.log(Math.min(da, db))) / logBase(req)];
  },
  // At least max_x p_x Tr ρ_x (always guess the likeliest), at most Σ_x p_x Tr ρ_x.
  'guessing-probability': (req, tol) => {
    const w = readStates(req, tol).map((r, x) => Math.max(0, req.probabilities[x]) * trace(r).re);
    const top = Math.max(...w);
    return [top, Math.max(top, w.reduce((x, y) => x + y, 0))];
  },
};

const CHECKERS: Record<string, Fn> = {
  'fidelity-of-recovery': fidelityOfRecovery,
  'smooth-max-divergence': smoothMax,
  'conditional-min-entropy': minEntropy,
  'conditional-max-entropy': maxEntropy,
  'max-information': maxInformation,
  'guessing-probability': guessing,
  guesswork,
  'diamond-distance': diamond,
  'fidelity-sdp': fidelitySdp,
};

const NOTE =
  'Evidence under floating point, not a proof: eigenvalues padded by 4√n·u·‖A‖_F, supports decided with the support tolerance; ' +
  "recomputed with the engine's own linear algebra (kernel-bridge/rhosigma/certificates.py shares none of it).";

/** The verdict on one answer (see the header). */
export function verifyAnswer(req: Record<string, any>, ans: Record<string, any>): OpResult {
  const op = req.op;
  const family = op === 'divergence' ? req.family : undefined;
  const name = family ? `divergence/${family}` : String(op);
  const notCheckable = (reason: string): OpResult => ({ value: false, checkable: false, checked: name, reason, checks: [] });
  if (ans.ok !== true) return notCheckable('the answer is a failure; nothing to check');
  if (op === 'guesswork' && req.stopAfter !== undefined) return notCheckable('guesswork with giving up (stopAfter, giveUpCost) has no checker yet');
  const fn = op === 'divergence' && family === 'hypothesis-testing' ? hypothesisTesting : CHECKERS[op];
  if (!fn) return notCheckable('no SDP certificate with points for this op (nothing to check here)');
  const cert = ans.certificate;
  if (!cert || typeof cert !== 'object' || !cert.primal || !cert.dual || !cert.bounds) {
    return notCheckable("the answer's certificate carries no primal and dual points");
  }
  const tol = typeof req.tolerance === 'number' ? req.tolerance : 1e-9;
  const c = new Checks();
  const value = num(ans.value);
  if (!Number.isFinite(value)) return infinite(req, ans, c, tol, name);
  let [lower, upper] = fn(req, ans, c, tol);
  const range = RANGES[op]?.(req, tol);
  if (range) {
    lower = Math.min(Math.max(lower, range[0]), range[1]);
    upper = Math.min(Math.max(upper, range[0]), range[1]);
  }
  const sl = num(cert.bounds.lower);
  const su = num(cert.bounds.upper);
  const width = Number.isFinite(su - sl) ? su - sl : Infinity;
  const slack = width + 16 * U * (Math.abs(sl) + Math.abs(su)) + 1e-300;
  c.require('recomputed lower bound reaches the stated one', lower >= sl - slack, { recomputed: lower, stated: sl });
  c.require('recomputed upper bound reaches the stated one', upper <= su + slack, { recomputed: upper, stated: su });
  c.require('value inside the recomputed bracket', lower - slack <= value && value <= upper + slack, { value });
  const w = upper - lower;
  return {
    value: c.list.every((x) => x.ok),
    checkable: true,
    checked: name,
    lower,
    upper,
    accuracy: { absolute: w, relative: value !== 0 ? w / Math.abs(value) : w === 0 ? 0 : Infinity },
    checks: c.list,
    note: NOTE,
  };
}

function infinite(req: Record<string, any>, ans: Record<string, any>, c: Checks, tol: number, name: string): OpResult {
  const st = supportTolerance(ans);
  const rho = readState(req.rho, 'request.rho', tol).matrix;
  const sigma = readOperatorState(req.sigma, 'request.sigma', tol).matrix;
  const eps = readNumber(req.epsilon, 'request.epsilon', { min: 0, max: 1 });
  const n = rho.rows;
  const P = supportBasis(sigma, st);
  if (req.op === 'divergence') {
    const t = hermitianPart(point(ans, 'primal', 'test'));
    const s = spectrum(t);
    c.require('0 ⪯ Λ ⪯ I', s.values[0] >= -s.pad && s.values[n - 1] <= 1 + s.pad);
    const acc = traceOfProductRe(rho, t);
    c.require('Tr ρΛ ≥ 1 − ε', acc >= 1 - eps - 8 * n * U, { acceptance: acc });
    const on = P.cols ? trace(compress(P, t)).re : 0;
    c.require('Λ vanishes on supp σ (support decided with the tolerance)', Math.abs(on) <= 1e-9, { onSupport: on });
  } else {
    const inside = P.cols ? trace(compress(P, rho)).re : 0;
    c.require('Tr Π_σ ρ < 1 − ε²', inside < (1 - eps) * (1 + eps), { insideSupport: inside });
  }
  return {
    value: c.list.every((x) => x.ok), checkable: true, checked: name, lower: 'Infinity', upper: 'Infinity', checks: c.list,
    note: 'An infinite value rests on a support decision (eigenvalues below the support tolerance counted as zero).',
  };
}

defineOp({
  name: 'verify-answer',
  summary:
    "Re-verify an SDP answer's certificate from the request and the answer alone: both points' feasibility, both bounds recomputed; value true when the stated bracket and the value are supported (evidence under floating point, not a proof).",
  args: {
    type: 'object',
    properties: {
      request: { type: 'object', description: 'The request that was answered (as sent).' },
      answer: { type: 'object', description: 'Its answer (as received), with its certificate.' },
    },
    required: ['request', 'answer'],
  },
  tolerance: false,
  cost: (req) => {
    const r = (req.request ?? {}) as Record<string, any>;
    const sides = [sideOf(r.rho), sideOf(r.sigma), ...(Array.isArray(r.states) ? r.states.map(sideOf) : [])];
    const n = Math.max(1, ...sides) * 2;
    // Guesswork's dual is checked over every order of the support, all held at once (permutations):
    // K! eigendecompositions and K!·(K + 4) numbers, so that answers of up to 12 symbols (the op's limit)
    // are refused here when the check would not fit, instead of running out of memory.
    const support = Array.isArray(r.probabilities) ? r.probabilities.filter((x: unknown) => x !== 0).length : 0;
    const orders = Array.isArray(r.probabilities) ? [...Array(support).keys()].reduce((a, k) => a * (k + 1), 1) : 1;
    const est = dense(n, 12 + orders, 'a dozen eigendecompositions (one per guessing order for guesswork)');
    return { ...est, bytes: est.bytes + orders * (support + 4) * 8 };
  },
  run(req) {
    const r = req.request as Record<string, any>;
    const a = req.answer as Record<string, any>;
    try {
      return verifyAnswer(r, a);
    } catch (e) {
      if (e instanceof RhoError) throw e;
      throw new RhoError('invalid-argument', `The request or the certificate cannot be read: ${(e as Error).message}`, 'answer');
    }
  },
});
