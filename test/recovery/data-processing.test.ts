// Data processing for triples (ρ, σ, N) through the data-processing op: Petz's equality condition both
// ways (Petz 1986/1988), the Junge, Renner, Sutter, Wilde & Winter (2018) bound on random triples, the
// values against numpy/scipy, the tripartite case against the existing ops, and the α-z region.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, adjoint, kron, mul, zeros } from '../../src/linalg/index.js';
import type { Channel } from '../../src/quantum/types.js';
import { applyKraus } from '../../src/quantum/channels.js';
import { divergence } from '../../src/quantities/divergences.js';
import { alphaZRegion } from '../../src/quantities/alpha-z-region.js';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';
import { randomDensity, randomUnitary, rng } from '../helpers/random.js';
import { python, numpyVersions, toData } from '../quantum/numpy-reference.js';
import { randomChannel } from './fixtures.js';

const versions = numpyVersions();
const rows = (m: CMatrix) => toData(m);
const wire = (c: Channel) => ({ kraus: c.kraus.map(rows), from: c.fromDims, to: c.toDims });

function ask(req: Record<string, unknown>): Record<string, any> {
  const a = handle(req) as Record<string, any>;
  assert.equal(a.ok, true, JSON.stringify(a.error));
  return a;
}

/**
 * A channel sufficient for {ρ, σ}: on H = ⊕_j C^{n_j} ⊗ C^{m_j} both states are ⊕_j p_j ρ_j ⊗ ω_j with
 * the same ω_j, and N = ⊕_j (id ⊗ Tr_{m_j}) onto ⊕_j C^{n_j}, conjugated by random unitaries on input
 * and output. N is isometric on the part the states differ in (Petz 1988: N is then sufficient, and the
 * Petz map of σ recovers ρ).
 */
function sufficientTriple(r: () => number, blocks: [number, number][]) {
  const dIn = blocks.reduce((s, [n, m]) => s + n * m, 0);
  const dOut = blocks.reduce((s, [n]) => s + n, 0);
  const build = () => {
    const p = blocks.map(() => 0.3 + r());
    const tot = p.reduce((s, x) => s + x, 0);
    return p.map((x) => x / tot);
  };
  const omegas = blocks.map(([, m]) => randomDensity(m, r));
  const state = () => {
    const w = build();
    const out = zeros(dIn, dIn);
    let off = 0;
    blocks.forEach(([n, m], j) => {
      const b = kron(randomDensity(n, r), omegas[j]);
      for (let i = 0; i < n * m; i++) for (let k = 0; k < n * m; k++) {
        out.re[(off + i) * dIn + off + k] = w[j] * b.re[i * n * m + k];
        out.im[(off + i) * dIn + off + k] = w[j] * b.im[i * n * m + k];
      }
      off += n * m;
    });
    return out;
  };
  const kraus: CMatrix[] = [];
  let offIn = 0;
  let offOut = 0;
  const mMax = Math.max(...blocks.map(([, m]) => m));
  for (let k = 0; k < mMax; k++) {
    const K = zeros(dOut, dIn);
    offIn = 0;
    offOut = 0;
    for (const [n, m] of blocks) {
      if (k < m) for (let i = 0; i < n; i++) K.re[(offOut + i) * dIn + offIn + i * m + k] = 1;
      offIn += n * m;
      offOut += n;
    }
    kraus.push(K);
  }
  const u = randomUnitary(dIn, r);
  const v = randomUnitary(dOut, r);
  const rot = (x: CMatrix) => mul(mul(u, x), adjoint(u));
  const channel: Channel = { kraus: kraus.map((K) => mul(mul(v, K), adjoint(u))), fromDims: [dIn], toDims: [dOut] };
  return { rho: rot(state()), sigma: rot(state()), channel };
}

describe('Petz (1986, 1988): data processing of the Umegaki relative entropy is saturated exactly when R_{σ,N} recovers ρ', () => {
  it('a channel sufficient for {ρ, σ} (isometric on a block structure both share) saturates, and the Petz map recovers ρ exactly', () => {
    const r = rng(401);
    for (const blocks of [[[2, 2], [1, 2]], [[1, 3], [2, 1]]] as [number, number][][]) {
      const { rho, sigma, channel } = sufficientTriple(r, blocks);
      const a = ask({ op: 'data-processing', family: 'umegaki', rho: rows(rho), sigma: rows(sigma), channel: wire(channel) });
      assert.equal(a.verdict.status, 'saturated', a.verdict.statement);
      assert.equal(a.verdict.agreesWithPetzTheorem, true);
      assert.ok(Math.abs(a.value) <= 1e-10, `gap ${a.value}`);
      assert.ok(a.petz.traceDistance <= 1e-9, `Petz recovery ${a.petz.traceDistance}`);
      assert.ok(Math.abs(a.petz.fidelity - 1) <= 1e-9);
      assert.match(a.verdict.caveat, /not a proof/);
    }
  });

  it('the same sufficient channel saturates every family that satisfies data processing (R recovers ρ and σ, so D(ρ‖σ) ≤ D(N(ρ)‖N(σ)); Petz 1988)', () => {
    const r = rng(402);
    const { rho, sigma, channel } = sufficientTriple(r, [[2, 2], [1, 2]]);
    const cases: Record<string, unknown>[] = [
      { family: 'petz', alpha: 0.5 }, { family: 'petz', alpha: 1.7 }, { family: 'sandwiched', alpha: 2 }, { family: 'sandwiched', alpha: 0.6 },
      { family: 'alpha-z', alpha: 0.5, z: 0.8 }, { family: 'geometric', alpha: 1.5 }, { family: 'max' }, { family: 'min' },
    ];
    for (const c of cases) {
      const a = ask({ op: 'data-processing', ...c, rho: rows(rho), sigma: rows(sigma), channel: wire(channel) });
      assert.equal(a.verdict.status, 'saturated', `${JSON.stringify(c)}: ${a.verdict.statement}`);
      assert.ok(a.petz.traceDistance <= 1e-9);
    }
  });

  it('a generic channel (amplitude damping on generic states) does not saturate, and the Petz map does not recover ρ', () => {
    const r = rng(403);
    const g = 0.4;
    const channel: Channel = {
      kraus: [
        { rows: 2, cols: 2, re: new Float64Array([1, 0, 0, Math.sqrt(1 - g)]), im: new Float64Array(4) },
        { rows: 2, cols: 2, re: new Float64Array([0, Math.sqrt(g), 0, 0]), im: new Float64Array(4) },
      ],
      fromDims: [2],
      toDims: [2],
    };
    for (let k = 0; k < 3; k++) {
      const rho = randomDensity(2, r);
      const sigma = randomDensity(2, r);
      const a = ask({ op: 'data-processing', family: 'umegaki', rho: rows(rho), sigma: rows(sigma), channel: wire(channel) });
      assert.equal(a.verdict.status, 'strict', a.verdict.statement);
      assert.equal(a.verdict.saturated, false);
      assert.equal(a.verdict.agreesWithPetzTheorem, true);
      assert.ok(a.value > 1e-4 && a.petz.traceDistance > 1e-3, `gap ${a.value}, distance ${a.petz.traceDistance}`);
    }
  });
});

describe('Junge, Renner, Sutter, Wilde & Winter (Ann. Henri Poincaré 2018, Thm 2.1): D(ρ‖σ) − D(N(ρ)‖N(σ)) ≥ −log F(ρ, R̄_{σ,N}(N(ρ)))', () => {
  it(`holds on random triples, with both sides equal to numpy ${versions.numpy} / scipy ${versions.scipy} (scipy.linalg.logm) values`, () => {
    const r = rng(404);
    const triples = Array.from({ length: 12 }, (_, k) => {
      const dIn = 2 + (k % 3);
      const dOut = 2 + ((k + 1) % 2);
      const env = Math.ceil(dIn / dOut) + (k % 2);
      return { rho: randomDensity(dIn, r, k % 4 === 3 ? 1 : dIn), sigma: randomDensity(dIn, r), channel: randomChannel(dIn, dOut, env, r) };
    });
    const ref = python(
      [
        'def D(a, b):',
        '    w, v = np.linalg.eigh(a)',
        '    keep = w > 1e-13',
        '    la = (v[:, keep] * (w[keep] * np.log2(w[keep]))) @ v[:, keep].conj().T',
        '    return float(np.trace(la - a @ scipy.linalg.logm(b) / np.log(2)).real)',
        'out = []',
        'for t in data:',
        '    rho, sig = M(t["rho"]), M(t["sigma"])',
        '    K = [M(k) for k in t["kraus"]]',
        '    N = lambda x: sum(k @ x @ k.conj().T for k in K)',
        '    out.append([D(rho, sig), D(N(rho), N(sig))])',
        'result = out',
      ].join('\n'),
      triples.map((t) => ({ rho: rows(t.rho), sigma: rows(t.sigma), kraus: t.channel.kraus.map(rows) })),
    );
    let tightest = Infinity;
    triples.forEach((t, k) => {
      const a = ask({ op: 'data-processing', family: 'umegaki', rho: rows(t.rho), sigma: rows(t.sigma), channel: wire(t.channel) });
      assert.ok(Math.abs(a.input.value - ref[k][0]) <= 1e-9 * Math.max(1, Math.abs(ref[k][0])), `triple ${k}: D(ρ‖σ) ${a.input.value} vs ${ref[k][0]}`);
      assert.ok(Math.abs(a.output.value - ref[k][1]) <= 1e-9 * Math.max(1, Math.abs(ref[k][1])), `triple ${k}: D(Nρ‖Nσ)`);
      assert.equal(a.universal.holds, true, `triple ${k}: gap ${a.value} < bound ${a.universal.bound}`);
      assert.ok(a.value >= a.universal.bound - 1e-9, `triple ${k}`);
      assert.ok(a.universal.bound >= 0);
      tightest = Math.min(tightest, a.value - a.universal.bound);
    });
    assert.ok(Number.isFinite(tightest));
  });

  it('gives a bound of 0 (F = 1) on a sufficient triple, where the gap is 0 too (Junge et al. 2018, Sec. 1)', () => {
    const { rho, sigma, channel } = sufficientTriple(rng(405), [[2, 1], [1, 2]]);
    const a = ask({ op: 'data-processing', family: 'umegaki', rho: rows(rho), sigma: rows(sigma), channel: wire(channel) });
    assert.ok(Math.abs(a.universal.bound) <= 1e-9 && Math.abs(a.universal.fidelity - 1) <= 1e-9);
  });
});

describe('the tripartite case: ρ = ρ_ABC, σ = ρ_A ⊗ ρ_BC, N = Tr_C gives the existing ops\' answers', () => {
  it('the gap is I(A;C|B) (conditional-mutual-information) and the Petz fidelity is that of petz-recovery (Petz map of ρ_BC; Hayden, Jozsa, Petz & Winter 2004)', () => {
    const r = rng(406);
    for (const dims of [[2, 2, 2], [2, 3, 2]]) {
      const n = dims[0] * dims[1] * dims[2];
      const rho = randomDensity(n, r);
      const state = { matrix: rows(rho), dims };
      const rhoA = ask({ op: 'partial-trace', matrix: rows(rho), dims, keep: [0] }).value;
      const rhoBC = ask({ op: 'partial-trace', matrix: rows(rho), dims, keep: [1, 2] }).value;
      const toM = (x: any) => (Array.isArray(x) ? { rows: x.length, cols: x.length, re: Float64Array.from(x.flat()), im: new Float64Array(x.length ** 2) } : { rows: x.re.length, cols: x.re.length, re: Float64Array.from(x.re.flat()), im: Float64Array.from(x.im.flat()) });
      const sigma = kron(toM(rhoA), toM(rhoBC));
      const trC = ask({ op: 'channel-preset', name: 'partial-trace', dims, traceOut: [2] }).value;
      const dp = ask({ op: 'data-processing', family: 'umegaki', rho: rows(rho), sigma: rows(sigma), channel: trC });
      const cmi = ask({ op: 'conditional-mutual-information', rho: state, a: [0], b: [1], c: [2] });
      const petz = ask({ op: 'petz-recovery', rho: state, a: [0], b: [1], c: [2] });
      assert.ok(Math.abs(dp.value - cmi.value) <= 1e-10, `dims ${dims}: gap ${dp.value} vs I(A;C|B) ${cmi.value}`);
      assert.ok(Math.abs(dp.petz.fidelity - petz.value) <= 1e-10, `dims ${dims}: ${dp.petz.fidelity} vs ${petz.value}`);
    }
  });
});

describe('α-z: the known data-processing region (H. Zhang, Adv. Math. 2020, Thm 1.2; recalled)', () => {
  it('reports the region, and finds a numerical violation at (α, z) = (3, 1), outside it, on a witness from a seeded search', () => {
    assert.equal(alphaZRegion(3, 1).inside, false);
    const r = rng(407);
    let witness: { rho: CMatrix; sigma: CMatrix; channel: Channel } | null = null;
    for (let k = 0; k < 300 && !witness; k++) {
      const rho = randomDensity(2, r);
      const sigma = randomDensity(2, r);
      const channel = randomChannel(2, 2, 1 + (k % 3), r);
      const before = divergence('alpha-z', rho, sigma, { alpha: 3, z: 1 }).value;
      const after = divergence('alpha-z', applyKraus(channel, rho), applyKraus(channel, sigma), { alpha: 3, z: 1 }).value;
      if (after - before > 1e-6) witness = { rho, sigma, channel };
    }
    assert.ok(witness, 'the seeded search found a violation');
    const a = ask({ op: 'data-processing', family: 'alpha-z', alpha: 3, z: 1, rho: rows(witness.rho), sigma: rows(witness.sigma), channel: wire(witness.channel) });
    assert.equal(a.region.inside, false);
    assert.equal(a.verdict.status, 'violated', a.verdict.statement);
    const inside = ask({ op: 'data-processing', family: 'alpha-z', alpha: 3, z: 2.5, rho: rows(witness.rho), sigma: rows(witness.sigma), channel: wire(witness.channel) });
    assert.equal(inside.region.inside, true);
    assert.notEqual(inside.verdict.status, 'violated');
  });

  it('puts the clause boundaries where the theorem does: z = max(α, 1−α) for α < 1, α/2 for 1 < α ≤ 2, α − 1 for α ≥ 2, z = α above', () => {
    const eps = 1e-9;
    for (const [alpha, lo, hi] of [[0.3, 0.7, Infinity], [0.8, 0.8, Infinity], [1.5, 0.75, 1.5], [2, 1, 2], [3.5, 2.5, 3.5]]) {
      assert.equal(alphaZRegion(alpha, lo).inside, true, `α = ${alpha}, z = ${lo}`);
      assert.equal(alphaZRegion(alpha, lo - eps).inside, false, `α = ${alpha}, z just below ${lo}`);
      if (hi < Infinity) {
        assert.equal(alphaZRegion(alpha, hi).inside, true);
        assert.equal(alphaZRegion(alpha, hi + eps).inside, false);
      }
    }
  });

  it('refuses a channel that is not trace preserving, and fields its family does not use', () => {
    const r = rng(408);
    const rho = randomDensity(2, r);
    const half: Channel = { kraus: [{ rows: 2, cols: 2, re: new Float64Array([0.5, 0, 0, 0.5]), im: new Float64Array(4) }], fromDims: [2], toDims: [2] };
    const a = handle({ op: 'data-processing', family: 'umegaki', rho: rows(rho), sigma: rows(rho), channel: wire(half) }) as Record<string, any>;
    assert.equal(a.error.code, 'not-trace-preserving');
    const b = handle({ op: 'data-processing', family: 'umegaki', alpha: 2, rho: rows(rho), sigma: rows(rho), channel: wire(randomChannel(2, 2, 2, r)) }) as Record<string, any>;
    assert.equal(b.error.code, 'invalid-argument');
    assert.equal(b.error.path, 'alpha');
  });
});
