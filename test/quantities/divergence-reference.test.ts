// Cross-check against numpy/scipy (numpy and scipy pinned in requirements.txt, versions named in the
// assertion messages): scripts/reference/divergences.py evaluates the textbook formulas with
// scipy.linalg.fractional_matrix_power and scipy.linalg.logm on a few random full-rank pairs.
// Orders are kept away from α = 1, where the plain formula loses digits to cancellation in numpy
// (ours does not: see divergence-properties.test.ts for continuity there).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { fileURLToPath } from 'node:url';
import { toRows } from '../../src/linalg/index.js';
import { divergence } from '../../src/quantities/divergences.js';
import { randomDensity, rng } from '../helpers/random.js';
import { runPython } from '../helpers/python.js';

const script = fileURLToPath(new URL('../../scripts/reference/divergences.py', import.meta.url));

describe('divergences against numpy/scipy', () => {
  it('Umegaki, Petz, sandwiched, α-z, geometric and Belavkin–Staszewski agree with scipy.linalg to 1e-9 relative', () => {
    const r = rng(51);
    const cases: { rho: unknown; sigma: unknown; family: string; alpha?: number; z?: number }[] = [];
    const ours: number[] = [];
    for (const n of [2, 3, 4]) {
      const rho = randomDensity(n, r);
      const sigma = randomDensity(n, r);
      const spec: [string, number?, number?][] = [
        ['umegaki'], ['petz', 0.3], ['petz', 1.7], ['sandwiched', 0.6], ['sandwiched', 2.5],
        ['alpha-z', 0.4, 0.7], ['alpha-z', 1.5, 1.1], ['alpha-z', 2, 0.5], ['geometric', 0.4], ['geometric', 1.6],
        ['belavkin-staszewski'],
      ];
      for (const [family, alpha, z] of spec) {
        cases.push({ rho: toRows(rho), sigma: toRows(sigma), family, alpha, z });
        const fam = family === 'belavkin-staszewski' ? 'geometric' : family;
        const a = family === 'belavkin-staszewski' ? 1 : alpha;
        ours.push(divergence(fam, rho, sigma, { alpha: a, z, base: Math.E }).value);
      }
    }
    const ref = runPython<{ numpy: string; scipy: string; values: number[] }>([script], { input: { cases } });
    ref.values.forEach((v, i) => {
      const c = cases[i];
      const rel = Math.abs(ours[i] - v) / Math.max(Math.abs(v), 1e-300);
      assert.ok(
        rel <= 1e-9,
        `${c.family} α=${c.alpha} z=${c.z}: ours ${ours[i]}, numpy ${ref.numpy}/scipy ${ref.scipy} ${v} (relative ${rel})`,
      );
    });
  });
});
