// The op verify-answer (src/ops/verify-ops.ts): re-verifies SDP certificates from request and answer alone.
// Facts: it certifies the engine's answers on the committed reference instances (cvxopt 1.3.0 through
// scripts/reference/cvxopt_oneshot.py, cvxopt_guessing.py, cvxopt_guesswork.py; 50-digit mpmath closed forms
// of scripts/reference/mpmath_hypothesis.py) with the reference value inside the bracket it recomputes, and
// rejects perturbed points, a moved value and a bracket claimed narrower than the points prove.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import '../../src/ops/all.js';
import { handle } from '../../src/ops/handle.js';

const data = (f: string) => JSON.parse(readFileSync(new URL(`../reference/data/${f}.json`, import.meta.url), 'utf8'));

function referenceCases(): { request: Record<string, unknown>; value: number; source: string }[] {
  const out: { request: Record<string, unknown>; value: number; source: string }[] = [];
  const one = data('oneshot-cases');
  for (const c of one.cases) {
    const request =
      c.kind === 'hypothesis-testing'
        ? { op: 'divergence', family: 'hypothesis-testing', rho: c.rho, sigma: c.sigma, epsilon: c.epsilon }
        : c.kind === 'smooth-max-divergence'
          ? { op: c.kind, rho: c.rho, sigma: c.sigma, epsilon: c.epsilon }
          : { op: c.kind, rho: { matrix: c.rho, dims: c.dims }, a: [0], b: [1] };
    out.push({ request, value: c.value, source: `cvxopt ${one.cvxopt}: ${c.name}` });
  }
  const g = data('guessing-cases');
  g.guessing.slice(0, 4).forEach((c: any, i: number) => out.push({ request: { op: 'guessing-probability', probabilities: c.probabilities, states: c.states }, value: c.value, source: `cvxopt guessing #${i}` }));
  g.diamond.slice(0, 4).forEach((c: any, i: number) => out.push({ request: { op: 'diamond-distance', a: c.a, b: c.b }, value: c.value, source: `cvxopt diamond #${i}` }));
  g.recovery.forEach((c: any, i: number) => out.push({ request: { op: 'fidelity-of-recovery', rho: c.rho, a: c.a, b: c.b, c: c.c }, value: c.value, source: `cvxopt recovery #${i}` }));
  const gw = data('guesswork-cases');
  gw.cases.slice(0, 4).forEach((c: any) => out.push({ request: { op: 'guesswork', probabilities: c.probabilities, states: c.states, moment: c.moment }, value: c.value, source: `cvxopt ${c.name}` }));
  const h = data('hypothesis-closed-forms');
  h.cases.filter((_: unknown, i: number) => i % 3 === 0).forEach((c: any) => out.push({ request: { op: 'divergence', family: 'hypothesis-testing', rho: c.rho, sigma: c.sigma, epsilon: c.epsilon }, value: Number(c.value), source: `mpmath 50 digits: ${c.name}` }));
  return out;
}

const verify = (request: unknown, answer: unknown) => handle({ op: 'verify-answer', request, answer }) as Record<string, any>;

function perturbed(m: any, size: number, seed: number): any {
  const rows: number[][] = Array.isArray(m) ? m : m.re;
  const im: number[][] = Array.isArray(m) ? rows.map((r) => r.map(() => 0)) : (m.im ?? rows.map((r) => r.map(() => 0)));
  let s = seed;
  const next = () => ((s = (s * 16807) % 2147483647) / 2147483647) - 0.5;
  return { re: rows.map((r) => r.map((x) => x + size * next())), im: im.map((r) => r.map((x) => x + size * next())) };
}
const isMatrix = (x: any) => (x && typeof x === 'object' && !Array.isArray(x) && 're' in x) || (Array.isArray(x) && Array.isArray(x[0]) && typeof x[0][0] === 'number');

describe('verify-answer', () => {
  const cases = referenceCases();
  const answered = cases.map((c) => ({ ...c, answer: JSON.parse(JSON.stringify(handle(c.request))) }));

  it('certifies the engine on every committed reference instance, and the outside reference value lies in its recomputed bracket', () => {
    assert.ok(answered.length >= 40);
    for (const { request, answer, value, source } of answered) {
      assert.ok(answer.ok, `${source}: ${JSON.stringify(answer.error)}`);
      const v = verify(request, answer);
      assert.ok(v.ok && v.value === true, `${source}: ${JSON.stringify(v.checks?.filter((c: any) => !c.ok) ?? v.error)}`);
      const slack = source.startsWith('mpmath') ? 0 : 2e-8 * Math.max(1, Math.abs(value));
      assert.ok(v.lower - slack <= value && value <= v.upper + slack, `${source}: ${value} outside [${v.lower}, ${v.upper}]`);
    }
  });

  it('rejects answers whose primal or dual point was perturbed by 1e-3', () => {
    answered.filter((_, i) => i % 3 === 0).forEach(({ request, answer, source }, i) => {
      for (const side of ['primal', 'dual'] as const) {
        const t = JSON.parse(JSON.stringify(answer));
        const p = t.certificate[side];
        for (const k of Object.keys(p)) {
          if (k === 'orders') p[k] = [[...p[k][0]].reverse(), ...p[k].slice(1)];
          else if (typeof p[k] === 'number') p[k] = p[k] * 1.001 + 1e-3;
          else if (isMatrix(p[k])) p[k] = perturbed(p[k], 1e-3, 7 + i);
          else if (Array.isArray(p[k])) p[k] = p[k].map((m: any, j: number) => perturbed(m, 1e-3, 11 + i + j));
        }
        const v = verify(request, t);
        assert.ok(!(v.ok && v.value === true), `${source}: ${side} perturbed yet certified`);
      }
    });
  });

  it('rejects a value moved out of its bracket and a bracket claimed narrower than the points prove', () => {
    answered.filter((_, i) => i % 4 === 0).forEach(({ request, answer, source }) => {
      const b = answer.certificate.bounds;
      const width = b.upper - b.lower;
      const moved = { ...answer, value: answer.value + 10 * width + 1e-6 * Math.max(1, Math.abs(answer.value)) };
      assert.equal(verify(request, moved).value, false, source);
      if (width > 1e-13 * Math.max(1, Math.abs(answer.value))) {
        const narrow = { ...answer, certificate: { ...answer.certificate, bounds: { lower: answer.value - 1e-3 * width, upper: answer.value + 1e-3 * width } } };
        assert.equal(verify(request, narrow).value, false, source);
      }
    });
  });

  it('rejects fidelity-of-recovery answers whose Choi matrix J, dual Y or dual Z alone was perturbed by 1e-3 (J: Tr_out J = 1_B fails; Y, Z: the bound √(Tr ρY · Tr Z) rises above the stated bracket)', () => {
    const rec = answered.filter((x) => x.request.op === 'fidelity-of-recovery');
    assert.ok(rec.length >= 3);
    rec.forEach(({ request, answer, source }, i) => {
      for (const [side, key] of [['primal', 'choi'], ['dual', 'Y'], ['dual', 'Z']] as const) {
        const t = JSON.parse(JSON.stringify(answer));
        t.certificate[side][key] = perturbed(t.certificate[side][key], 1e-3, 23 + i);
        const v = verify(request, t);
        assert.ok(v.ok && v.value === false, `${source}: ${side}.${key} perturbed yet certified`);
      }
    });
  });

  it('certifies range-clipped answers (F(A;C|B) = 1 on a Markov chain ρ_A ⊗ ρ_BC, a diamond distance of 1, p_guess = 1): the recomputed bracket is clipped to the same range', () => {
    const prod = { matrix: [[0.5, 0, 0, 0, 0, 0, 0, 0], [0, 0.5, 0, 0, 0, 0, 0, 0], [0, 0, 0, 0, 0, 0, 0, 0], [0, 0, 0, 0, 0, 0, 0, 0], [0, 0, 0, 0, 0, 0, 0, 0], [0, 0, 0, 0, 0, 0, 0, 0], [0, 0, 0, 0, 0, 0, 0, 0], [0, 0, 0, 0, 0, 0, 0, 0]], dims: [2, 2, 2] };
    const requests = [
      { op: 'fidelity-of-recovery', rho: prod, a: [2], b: [0], c: [1] },
      { op: 'diamond-distance', a: { kraus: [[[1, 0], [0, 1]]] }, b: { kraus: [[[0, 1], [1, 0]]] } },
      { op: 'guessing-probability', probabilities: [0.5, 0.5], states: [[[1, 0], [0, 0]], [[0, 0], [0, 1]]] },
    ];
    for (const request of requests) {
      const answer = JSON.parse(JSON.stringify(handle(request)));
      assert.ok(answer.ok, JSON.stringify(answer.error));
      assert.ok(Math.abs(answer.value - 1) <= 1e-6 && answer.certificate.bounds.upper <= 1, `${request.op}: ${answer.value}`);
      const v = verify(request, answer);
      assert.ok(v.ok && v.value === true, `${request.op}: ${JSON.stringify(v.checks?.filter((c: any) => !c.ok))}`);
    }
  });

  it('reports an answer without points (guesswork without side information, a closed form: Massey 1994) as not checkable', () => {
    const request = { op: 'guesswork', probabilities: [0.5, 0.3, 0.2] };
    const v = verify(request, JSON.parse(JSON.stringify(handle(request))));
    assert.ok(v.ok && v.value === false && v.checkable === false, JSON.stringify(v));
  });

  it('refuses a certificate it cannot read with invalid-argument, never a crash', () => {
    const { request, answer } = answered[0];
    const broken = { ...answer, certificate: { ...answer.certificate, dual: { mu: 'many' } } };
    const v = verify(request, broken);
    assert.ok(!v.ok && v.error.code === 'invalid-argument', JSON.stringify(v));
  });
});
