// Facts about von Neumann and Rényi entropies of a single density matrix. Sources: Nielsen & Chuang,
// Quantum Computation and Quantum Information (2000), §11.2–11.3 (von Neumann entropy, binary entropy);
// Rényi, "On measures of entropy and information" (1961) for H_α and its limits α = 0, 1, ∞
// (the formulas below are the textbook definitions, written out in each test from the eigenvalues).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, identity, scale } from '../../src/linalg/index.js';
import { entropy, renyiEntropy, vonNeumannEntropy } from '../../src/quantities/entropy.js';
import { RhoError } from '../../src/errors.js';
import { eigenbasisUnitary, inBasis, randomDensity, rng } from '../helpers/random.js';

function withSpectrum(p: number[], r: () => number): CMatrix {
  return inBasis(eigenbasisUnitary(p.length, r), p);
}

const close = (a: number, b: number, tol: number, what: string) =>
  assert.ok(Math.abs(a - b) <= tol * Math.max(1, Math.abs(b)), `${what}: ${a} vs ${b}`);

describe('entropies of a density matrix', () => {
  it('the von Neumann entropy of a qubit with eigenvalues p, 1−p is the binary entropy h(p) (Nielsen & Chuang §11.2.1)', () => {
    const r = rng(11);
    for (const p of [0.5, 0.1, 0.01, 0.37, 1e-6]) {
      const h = -p * Math.log2(p) - (1 - p) * Math.log2(1 - p);
      close(vonNeumannEntropy(withSpectrum([p, 1 - p], r)), h, 1e-13, `h(${p})`);
    }
  });

  it('a pure state has entropy 0 and the maximally mixed state log d, for every order α (textbook)', () => {
    const r = rng(12);
    const pure = withSpectrum([1, 0, 0, 0], r);
    for (const a of [0, 0.5, 1, 2, Infinity]) {
      close(renyiEntropy(pure, a), 0, 1e-12, `pure, α=${a}`);
      close(renyiEntropy(scale(identity(5), 0.2), a), Math.log2(5), 1e-13, `mixed, α=${a}`);
    }
  });

  it('Rényi entropies equal log(Σ p^α)/(1−α), with H_0 = log rank and H_∞ = −log max p (Rényi 1961)', () => {
    const r = rng(13);
    const p = [0.5, 0.3, 0.15, 0.05, 0];
    const rho = withSpectrum(p, r);
    const pos = p.filter((x) => x > 0);
    for (const a of [0.2, 0.5, 0.9, 1.5, 2, 3, 17]) {
      const want = Math.log2(pos.reduce((s, x) => s + x ** a, 0)) / (1 - a);
      close(renyiEntropy(rho, a), want, 1e-12, `α=${a}`);
    }
    close(renyiEntropy(rho, 0), Math.log2(4), 1e-13, 'α=0: log rank');
    close(renyiEntropy(rho, Infinity), -Math.log2(0.5), 1e-13, 'α=∞: min-entropy');
    assert.equal(entropy(rho, 0).rank, 4);
  });

  it('H_α is non-increasing in α and joins the von Neumann entropy continuously from both sides (Rényi 1961)', () => {
    const r = rng(14);
    const rho = randomDensity(6, r, 4);
    const h1 = vonNeumannEntropy(rho);
    let prev = Infinity;
    for (const a of [0, 0.1, 0.5, 0.9, 1 - 1e-9, 1, 1 + 1e-9, 1.1, 2, 10, 100, Infinity]) {
      const h = renyiEntropy(rho, a);
      assert.ok(h <= prev + 1e-12, `not monotone at α=${a}`);
      prev = h;
    }
    for (const d of [1e-4, 1e-7, 1e-10, 1e-13]) {
      // |H_{1±δ} − H| = O(δ); the slope −Var(log p)/2·ln 2 is below 10 for this spectrum.
      assert.ok(Math.abs(renyiEntropy(rho, 1 + d) - h1) <= 10 * d + 1e-14, `from above, δ=${d}`);
      assert.ok(Math.abs(renyiEntropy(rho, 1 - d) - h1) <= 10 * d + 1e-14, `from below, δ=${d}`);
    }
  });

  it('changing the logarithm base rescales the entropy by 1/ln(base) (textbook)', () => {
    const rho = randomDensity(3, rng(15));
    close(entropy(rho, 1, { base: Math.E }).value, vonNeumannEntropy(rho) * Math.LN2, 1e-14, 'nats');
    close(entropy(rho, 2, { base: 10 }).value, renyiEntropy(rho, 2) * Math.log10(2), 1e-14, 'base 10');
  });

  it('rejects a negative order with invalid-argument naming alpha (common practice, no published source)', () => {
    assert.throws(() => renyiEntropy(identity(2), -1), (e: unknown) => e instanceof RhoError && e.code === 'invalid-argument' && e.path === 'alpha');
  });
});
