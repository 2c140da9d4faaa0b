/**
 * Ops that editors use while a person types: `state-check` (what is wrong with a candidate density
 * matrix, and where), `repair-state` (the repairs the person chose, each saying what it changed) and
 * `data-processing-region` (where the α-z Rényi divergences are known to satisfy data processing).
 *
 * `state-check` never refuses a matrix for being a bad state: that is its job to report. It answers the
 * Hermiticity defect with the worst entry's row and column, the spectrum of the Hermitian part with the
 * most negative eigenvalue and its index, the trace and its defect, and whether the dims fit, all with
 * the decisions made at the tolerance as in src/quantum/validate.ts (defect and negative eigenvalue
 * relative to ‖M‖_F, trace absolute). `repair-state` does only the actions listed, in the order listed.
 *
 * Deliberately not here: silent repair (readState never repairs beyond rounding), numerics beyond one
 * eigendecomposition (src/linalg), the α-z divergence itself (src/quantities).
 * Cost: one Hermitian eigendecomposition O(n³) per check or clip; the region op O(points).
 */
import { alphaZBand } from '../quantities/alpha-z-region.js';
import { CMatrix, frobeniusNorm, hermitianPart, hermiticityDefect, mul, adjoint, scale, sub, trace } from '../linalg/cmatrix.js';
import { eigh, eigvalsh } from '../linalg/eigh.js';
import { fromSpectrum } from '../linalg/functions.js';
import { product } from '../linalg/subsystems.js';
import { RhoError } from '../errors.js';
import { defineOp } from './registry.js';
import { readKet, readLabels, readNumber, readSquareMatrix, schemas, writeMatrix, writeNumber } from './codec.js';
import { dense, plain, sideOf } from './cost.js';

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** The matrix of a state value without any state validation (a ket v gives v v*, unnormalised), plus its form. */
function readCandidate(value: unknown, path: string): { matrix: CMatrix; form: 'matrix' | 'ket'; obj: Record<string, unknown>; at: (k: string) => string } {
  const bare = !isObject(value) || 're' in value || 'packed' in value;
  const obj: Record<string, unknown> = bare ? { matrix: value } : (value as Record<string, unknown>);
  const at = (k: string) => (bare ? path : `${path}.${k}`);
  for (const key of Object.keys(obj)) {
    if (!['matrix', 'ket', 'dims', 'labels'].includes(key)) {
      throw new RhoError('invalid-argument', `A state has no field "${key}" (it takes matrix or ket, dims, labels).`, `${path}.${key}`);
    }
  }
  if ((obj.matrix === undefined) === (obj.ket === undefined)) {
    throw new RhoError('invalid-argument', 'Give a state either as "matrix" or as "ket".', path);
  }
  if (obj.ket !== undefined) {
    const v = readKet(obj.ket, at('ket'));
    return { matrix: mul(v, adjoint(v)), form: 'ket', obj, at };
  }
  return { matrix: readSquareMatrix(obj.matrix, at('matrix')), form: 'matrix', obj, at };
}

/** Whether the dims (if given) are positive integers multiplying to n; a report, never a refusal. */
function dimsReport(obj: Record<string, unknown>, n: number, path: string) {
  if (obj.dims === undefined) return { ok: true, dims: [n], product: n, side: n };
  const dims = obj.dims as number[];
  const p = product(dims);
  if (p !== n) {
    return {
      ok: false, dims, product: p, side: n, path,
      message: `The subsystem dimensions [${dims.join(', ')}] multiply to ${p}, but the matrix side is ${n}.`,
    };
  }
  return { ok: true, dims, product: p, side: n };
}

defineOp({
  name: 'state-check',
  summary:
    'What keeps a candidate state from being a density matrix, and where: the Hermiticity defect with the worst entry (row, column), the spectrum of the Hermitian part with the most negative eigenvalue and its index, the trace and its defect |Tr ρ − 1|, and whether dims fit; value: true when all hold at the tolerance. Never refuses a bad state.',
  args: {
    type: 'object',
    properties: { state: schemas.state },
    required: ['state'],
  },
  cost: (req) => dense(sideOf(req.state), 1, 'one eigendecomposition'),
  run(req, { tolerance }) {
    const { matrix: m, form, obj, at } = readCandidate(req.state, 'state');
    const n = m.rows;
    const dims = dimsReport(obj, n, at('dims'));
    let labels: { ok: boolean; message?: string } = { ok: true };
    if (obj.labels !== undefined) {
      try {
        readLabels(obj.labels, at('labels'), (dims.dims as number[]).length);
      } catch (e) {
        if (!(e instanceof RhoError)) throw e;
        labels = { ok: false, message: e.message };
      }
    }
    const norm = frobeniusNorm(m);
    const scaleOf = Math.max(norm, 1e-300);
    const defect = hermiticityDefect(m);
    const hermitian = defect.size <= tolerance * scaleOf;
    const values = eigvalsh(hermitianPart(m));
    let minIndex = 0;
    for (let k = 1; k < n; k++) if (values[k] < values[minIndex]) minIndex = k;
    const minEigenvalue = values[minIndex];
    const positive = minEigenvalue >= -tolerance * scaleOf;
    const tr = trace(m);
    const traceDefect = Math.hypot(tr.re - 1, tr.im);
    const unitTrace = traceDefect <= tolerance;
    const negatives: number[] = [];
    values.forEach((x, k) => {
      if (x < -tolerance * scaleOf) negatives.push(k);
    });
    return {
      value: hermitian && positive && unitTrace && dims.ok && labels.ok,
      form,
      hermitian: { ok: hermitian, defect: defect.size, relativeDefect: defect.size / scaleOf, row: defect.row, column: defect.col },
      spectrum: Array.from(values),
      positive: { ok: positive, minEigenvalue, index: minIndex, negativeIndices: negatives },
      trace: { ok: unitTrace, re: tr.re, im: tr.im, defect: traceDefect },
      dims,
      labels,
      frobeniusNorm: norm,
      tolerance,
      convention:
        'Spectrum: eigenvalues of the Hermitian part (M + M*)/2, ascending, index counted from 0. Hermiticity defect max|M_ij − conj(M_ji)| at (row, column), and the most negative eigenvalue, are judged against tolerance·‖M‖_F; the trace defect |Tr M − 1| against the tolerance. Numerical judgements, not proofs: an eigenvalue of size ~1e-16·‖M‖ is rounding.',
    };
  },
});

const ACTIONS = ['hermitian', 'clip', 'normalize'] as const;
type Action = (typeof ACTIONS)[number];

defineOp({
  name: 'repair-state',
  summary:
    'Apply the chosen repairs, in the order listed, to a candidate density matrix: "hermitian" (replace M by (M + M*)/2), "clip" (set negative eigenvalues to zero; needs a Hermitian matrix), "normalize" (divide by the trace). Each action says what it changed; nothing is done that was not asked for.',
  args: {
    type: 'object',
    properties: {
      state: schemas.state,
      actions: { type: 'array', minItems: 1, maxItems: 3, items: { enum: [...ACTIONS] }, description: 'The repairs, applied in this order.' },
    },
    required: ['state', 'actions'],
  },
  cost: (req) => dense(sideOf(req.state), 2, 'an eigendecomposition with vectors'),
  run(req, { tolerance }) {
    const { matrix: m0, obj, at } = readCandidate(req.state, 'state');
    if (obj.ket !== undefined) {
      throw new RhoError('invalid-argument', 'repair-state repairs density matrices; normalise a ket in place instead.', at('ket'));
    }
    const actions = req.actions as Action[];
    actions.forEach((a, k) => {
      if (actions.indexOf(a) !== k) throw new RhoError('invalid-argument', `The action "${a}" is listed twice.`, `actions[${k}]`);
    });
    let m = m0;
    const changes: Record<string, unknown>[] = [];
    actions.forEach((action, k) => {
      const path = `actions[${k}]`;
      if (action === 'hermitian') {
        const d = hermiticityDefect(m);
        const h = hermitianPart(m);
        const moved = frobeniusNorm(sub(m, h));
        changes.push({ action, changed: moved > 0, defectBefore: d.size, row: d.row, column: d.col, frobeniusChange: moved });
        m = h;
      } else if (action === 'clip') {
        const d = hermiticityDefect(m);
        if (d.size > tolerance * Math.max(frobeniusNorm(m), 1e-300)) {
          throw new RhoError('not-hermitian', `Clipping eigenvalues needs a Hermitian matrix: entry [${d.row}][${d.col}] is off by ${d.size.toExponential(3)}; make it Hermitian first.`, path, { defect: d.size });
        }
        const { values, vectors } = eigh(hermitianPart(m), { vectors: true });
        const clipped = Array.from(values, (x) => Math.max(0, x));
        const removed = Array.from(values).filter((x) => x < 0);
        const before = m;
        m = hermitianPart(fromSpectrum(vectors!, clipped));
        changes.push({
          action, changed: removed.length > 0, clippedCount: removed.length,
          clippedEigenvalues: removed, removedWeight: -removed.reduce((a, b) => a + b, 0),
          frobeniusChange: frobeniusNorm(sub(before, m)),
        });
      } else {
        const tr = trace(m);
        if (Math.abs(tr.im) > tolerance * Math.max(1, Math.abs(tr.re))) {
          throw new RhoError('invalid-argument', `The trace ${tr.re} + ${tr.im}i is not real; make the matrix Hermitian first.`, path, { traceIm: tr.im });
        }
        if (!(tr.re > 0)) {
          throw new RhoError('trace-not-one', `The trace is ${tr.re}; only a positive trace can be normalised.`, path, { trace: tr.re });
        }
        m = scale(m, 1 / tr.re);
        changes.push({ action, changed: tr.re !== 1, traceBefore: tr.re });
      }
    });
    const state: Record<string, unknown> = { matrix: writeMatrix(m) };
    if (obj.dims !== undefined) state.dims = obj.dims;
    if (obj.labels !== undefined) state.labels = obj.labels;
    return { value: writeMatrix(m), state, changes };
  },
});

// ---------------------------------------------------------------------------------------------------
// data-processing-region

const REGION_SOURCE =
  'H. Zhang, "From Wigner-Yanase-Dyson conjecture to Carlen-Frank-Lieb conjecture", Adv. Math. 365 (2020) 107053, Theorem 1.2: D_{α,z} satisfies data processing for all states and channels if and only if 0 < α < 1 and z ≥ max(α, 1 − α), or 1 < α ≤ 2 and α/2 ≤ z ≤ α, or 2 ≤ α < ∞ and α − 1 ≤ z ≤ α (the "only if" part with earlier work of Audenaert–Datta and Carlen–Frank–Lieb). α = 1 is the limit, the Umegaki relative entropy, which satisfies it (Lindblad 1975).';

/** The z-interval [low, high] of the region at α: the engine's one statement of it (quantities/alpha-z-region.ts). */
export const regionAt = alphaZBand;

/** The α-intervals where (α, z) lies in the region, for fixed z > 0, clipped to [lo, hi]; merged. */
function alphaIntervals(z: number, lo: number, hi: number): [number, number][] {
  const pieces: [number, number][] = [];
  // 0 < α < 1: z ≥ α and z ≥ 1 − α  ⇔  1 − z ≤ α ≤ z.
  if (z >= 0.5) pieces.push([Math.max(1 - z, 0), Math.min(z, 1)]);
  pieces.push([1, 1]);
  // 1 < α ≤ 2: α/2 ≤ z ≤ α  ⇔  z ≤ α ≤ 2z.
  const a2 = [Math.max(1, z), Math.min(2, 2 * z)];
  if (a2[0] <= a2[1]) pieces.push([a2[0], a2[1]]);
  // α ≥ 2: α − 1 ≤ z ≤ α  ⇔  z ≤ α ≤ z + 1.
  const a3 = [Math.max(2, z), z + 1];
  if (a3[0] <= a3[1]) pieces.push([a3[0], a3[1]]);
  const clipped = pieces
    .map(([a, b]) => [Math.max(a, lo), Math.min(b, hi)] as [number, number])
    .filter(([a, b]) => a <= b)
    .sort((p, q) => p[0] - q[0]);
  const merged: [number, number][] = [];
  for (const p of clipped) {
    const last = merged[merged.length - 1];
    if (last && p[0] <= last[1]) last[1] = Math.max(last[1], p[1]);
    else merged.push([p[0], p[1]]);
  }
  return merged;
}

defineOp({
  name: 'data-processing-region',
  summary:
    'Whether the α-z Rényi divergence D_{α,z} at (alpha, z) is known to satisfy data processing (H. Zhang, Adv. Math. 2020), with the region as plotting data: its z-band [low, high] at sampled α in (0, alphaMax], and for the given z the α-intervals inside it.',
  args: {
    type: 'object',
    properties: {
      alpha: { type: 'number', exclusiveMinimum: 0, description: 'The order α > 0 to classify (optional).' },
      z: { type: 'number', exclusiveMinimum: 0, description: 'The parameter z > 0 to classify, and for which the α-intervals are given (optional).' },
      alphaMax: { type: 'number', exclusiveMinimum: 0, maximum: 1000, description: 'Largest α of the boundary data (default 4).' },
      zMax: { type: 'number', exclusiveMinimum: 0, maximum: 1000, description: 'Where the band is cut off above for plotting when it is unbounded (default alphaMax).' },
      points: { type: 'integer', minimum: 2, maximum: 4096, description: 'Number of sampled α (default 161), the kinks α = 1/2, 1, 2 always included.' },
    },
  },
  tolerance: false,
  cost: (req) => plain(100 * (Number(req.points) || 161), 64 * (Number(req.points) || 161), 'sampling the boundary'),
  run(req) {
    const alphaMax = req.alphaMax === undefined ? 4 : readNumber(req.alphaMax, 'alphaMax', { min: 0, minExclusive: true });
    const zMax = req.zMax === undefined ? alphaMax : readNumber(req.zMax, 'zMax', { min: 0, minExclusive: true });
    const points = req.points === undefined ? 161 : (req.points as number);
    const alphas = new Set<number>();
    for (let k = 1; k <= points; k++) alphas.add((alphaMax * k) / points);
    for (const kink of [0.5, 1, 2]) if (kink <= alphaMax) alphas.add(kink);
    const band = [...alphas].sort((a, b) => a - b).map((alpha) => {
      const r = regionAt(alpha)!;
      return { alpha, low: r.low, high: Math.min(r.high, zMax), unbounded: r.high === Infinity };
    });
    const out: Record<string, unknown> & { value: unknown } = { value: null, band, alphaMax, zMax, source: REGION_SOURCE };
    if (req.alpha !== undefined && req.z === undefined) {
      throw new RhoError('missing-argument', 'To classify a point give "z" beside "alpha" (z alone gives the α-intervals).', 'z');
    }
    if (req.alpha !== undefined) {
      const r = regionAt(req.alpha)!;
      const inside = req.z >= r.low && req.z <= r.high;
      out.value = inside;
      out.zRange = { low: r.low, high: writeNumber(r.high) };
      out.status = inside ? 'holds' : 'fails';
      out.note = inside
        ? 'Data processing D(N(ρ)‖N(σ)) ≤ D(ρ‖σ) holds for all states and channels at this (α, z), by the theorem cited.'
        : 'Outside the region: by the theorem cited, some states and a channel violate data processing at this (α, z).';
    }
    if (req.z !== undefined) out.alphaIntervals = alphaIntervals(req.z, 0, alphaMax);
    return out;
  },
});
