// Commuting inputs: every quantum divergence reduces to its classical counterpart on the eigenvalues.
// Classical formulas written out here from the textbook definitions: Kullback–Leibler
// D(p‖q) = Σ p log(p/q) and Rényi D_α(p‖q) = log(Σ p^α q^{1−α})/(α−1) (Rényi 1961); max-divergence
// log max p/q and D_min = −log Σ_{p>0} q (Datta, IEEE Trans. Inf. Theory 55 (2009) 2816, Def. 1–2).
// That all of Petz, sandwiched, α-z and geometric collapse to the classical Rényi divergence on
// commuting pairs is noted in Tomamichel, Quantum Information Processing with Finite Resources (2016), §4.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { divergence } from '../../src/quantities/divergences.js';
import { rng, eigenbasisUnitary, inBasis, randomProbabilities } from '../helpers/random.js';
import { close } from './divergence-fixtures.js';

const kl = (p: number[], q: number[]) => p.reduce((s, x, i) => (x > 0 ? s + x * Math.log2(x / q[i]) : s), 0);
const renyi = (p: number[], q: number[], a: number) =>
  Math.log2(p.reduce((s, x, i) => (x > 0 && q[i] > 0 ? s + x ** a * q[i] ** (1 - a) : s), 0)) / (a - 1);

describe('divergences of commuting states reduce to classical ones', () => {
  const r = rng(21);
  const pairs = Array.from({ length: 4 }, (_, k) => {
    const n = 3 + k;
    const U = eigenbasisUnitary(n, r);
    const p = randomProbabilities(n, r, k === 3 ? [0] : []); // the last pair has a rank-deficient ρ
    const q = randomProbabilities(n, r).map((x) => x * (k === 2 ? 2.5 : 1)); // one unnormalised σ
    return { p, q, rho: inBasis(U, p), sigma: inBasis(U, q) };
  });

  it('Umegaki relative entropy equals the Kullback–Leibler divergence of the eigenvalues', () => {
    for (const { p, q, rho, sigma } of pairs) close(divergence('umegaki', rho, sigma).value, kl(p, q), 1e-12, 'KL');
  });

  it('Petz, sandwiched, α-z and geometric Rényi divergences equal the classical Rényi divergence', () => {
    for (const { p, q, rho, sigma } of pairs) {
      for (const a of [0.5, 0.7, 1.3, 2]) {
        const want = renyi(p, q, a);
        close(divergence('petz', rho, sigma, { alpha: a }).value, want, 1e-11, `petz α=${a}`);
        close(divergence('sandwiched', rho, sigma, { alpha: a }).value, want, 1e-11, `sandwiched α=${a}`);
        close(divergence('alpha-z', rho, sigma, { alpha: a, z: 0.8 }).value, want, 1e-11, `α-z α=${a}`);
        close(divergence('geometric', rho, sigma, { alpha: a }).value, want, 1e-11, `geometric α=${a}`);
      }
      close(divergence('petz', rho, sigma, { alpha: 0.1 }).value, renyi(p, q, 0.1), 1e-11, 'petz α=0.1');
      close(divergence('alpha-z', rho, sigma, { alpha: 5, z: 3 }).value, renyi(p, q, 5), 1e-11, 'α-z α=5');
    }
  });

  it('max- and min-relative entropies equal log max p/q and −log Σ_{p>0} q (Datta 2009)', () => {
    for (const { p, q, rho, sigma } of pairs) {
      close(divergence('max', rho, sigma).value, Math.log2(Math.max(...p.map((x, i) => x / q[i]))), 1e-12, 'max');
      close(divergence('min', rho, sigma).value, -Math.log2(q.reduce((s, x, i) => (p[i] > 0 ? s + x : s), 0)), 1e-12, 'min');
    }
  });

  it('the measured relative entropy equals the Kullback–Leibler divergence (Berta, Fawzi & Tomamichel 2017)', () => {
    for (const { p, q, rho, sigma } of pairs) {
      const m = divergence('measured', rho, sigma);
      close(m.value, kl(p, q), 1e-9, 'measured');
      assert.ok(Array.isArray(m.p) && (m.p as number[]).length === p.length, 'one outcome per basis vector');
    }
  });

  it('the measured Rényi divergence equals the classical Rényi divergence (measuring the common eigenbasis is optimal, and D^M_α ≤ D̃_α = classical; Berta, Fawzi & Tomamichel 2017)', () => {
    for (const { p, q, rho, sigma } of pairs) {
      for (const a of [0.5, 0.8, 1.5, 3]) close(divergence('measured', rho, sigma, { alpha: a }).value, renyi(p, q, a), 1e-9, `measured α=${a}`);
    }
  });
});
