// Published properties of the quantum divergences, checked on random states (seeded).
// Sources are named in each it(...): Klein's inequality (Nielsen & Chuang 2000, Thm 11.7);
// Müller-Lennert, Dupuis, Szehr, Fehr & Tomamichel, J. Math. Phys. 54, 122203 (2013) [MDSFT];
// Wilde, Winter & Yang, Commun. Math. Phys. 331, 593 (2014) [WWY]; Datta, IEEE Trans. Inf. Theory 55,
// 2816 (2009); Audenaert & Datta, J. Math. Phys. 56, 022202 (2015) for the α-z family; Zhang,
// Adv. Math. 365, 107053 (2020) for its data-processing region.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { mul, sqrtm, traceNorm, scale, identity, diagonal, fromRows, CMatrix } from '../../src/linalg/index.js';
import { divergence, alphaZDataProcessing, DivergenceResult } from '../../src/quantities/divergences.js';
import { RhoError } from '../../src/errors.js';
import { randomDensity, rng, eigenbasisUnitary, inBasis } from '../helpers/random.js';
import { close } from './divergence-fixtures.js';

function pairs(seed: number, count: number, rankRho?: number) {
  const r = rng(seed);
  return Array.from({ length: count }, (_, k) => {
    const n = 2 + (k % 4);
    return { rho: randomDensity(n, r, rankRho ? Math.min(rankRho, n) : n), sigma: randomDensity(n, r) };
  });
}

const isRhoError = (code: string, path?: string) => (e: unknown) =>
  e instanceof RhoError && e.code === code && (path === undefined || e.path === path);

describe('properties of quantum divergences', () => {
  it("D(ρ‖σ) ≥ 0 with equality iff ρ = σ (Klein's inequality, Nielsen & Chuang Thm 11.7)", () => {
    for (const { rho, sigma } of pairs(31, 8)) {
      assert.ok(divergence('umegaki', rho, sigma).value > 1e-6, 'positive for distinct states');
      assert.ok(Math.abs(divergence('umegaki', rho, rho).value) <= 1e-12, 'zero for equal states');
    }
    for (const { rho } of pairs(32, 4, 1)) assert.ok(Math.abs(divergence('umegaki', rho, rho).value) <= 1e-12, 'zero for an equal pure state');
  });

  it('sandwiched D̃_{1/2}(ρ‖σ) = −log F(ρ,σ) with F = ‖√ρ√σ‖₁² (MDSFT 2013, §3)', () => {
    for (const { rho, sigma } of pairs(33, 6)) {
      const F = traceNorm(mul(sqrtm(rho), sqrtm(sigma))) ** 2;
      close(divergence('sandwiched', rho, sigma, { alpha: 0.5 }).value, -Math.log2(F), 1e-11, 'α = 1/2');
    }
    // Rank-deficient ρ: the trace norm in the check sums √(eigenvalues of A*A), and each zero singular
    // value contributes √(rounding) ≈ 1e-8, so the comparison is only as good as that.
    for (const { rho, sigma } of pairs(34, 4, 2)) {
      const F = traceNorm(mul(sqrtm(rho), sqrtm(sigma))) ** 2;
      close(divergence('sandwiched', rho, sigma, { alpha: 0.5 }).value, -Math.log2(F), 1e-7, 'α = 1/2, rank 2');
    }
  });

  it('sandwiched D̃_α increases with α and tends to D_max as α → ∞ (MDSFT 2013 Thm 5 and Thm 7)', () => {
    for (const { rho, sigma } of pairs(35, 5)) {
      const dmax = divergence('max', rho, sigma).value;
      let prev = -Infinity;
      let prevGap = Infinity;
      for (const a of [0.5, 0.8, 1, 1.5, 3, 10, 100, 1e3, 1e4, 1e5]) {
        const v = divergence('sandwiched', rho, sigma, { alpha: a }).value;
        assert.ok(v >= prev - 1e-12, `monotone at α=${a}`);
        assert.ok(v <= dmax + 1e-12, `below D_max at α=${a}`);
        if (a > 1) {
          assert.ok(dmax - v <= prevGap + 1e-12, `gap to D_max shrinks at α=${a}`);
          prevGap = dmax - v;
        }
        prev = v;
      }
      assert.ok(prevGap <= 1e-3, `at α = 1e5 within 1e-3 of D_max (gap ${prevGap})`);
      close(divergence('sandwiched', rho, sigma, { alpha: Infinity }).value, dmax, 0, 'α = ∞ is D_max');
    }
  });

  it('Petz D̄_α → D_min = −log Tr Π_ρ σ as α → 0, also for rank-deficient ρ (Datta 2009, Lemma 2)', () => {
    for (const { rho, sigma } of [...pairs(36, 4), ...pairs(37, 4, 1)]) {
      const dmin = divergence('min', rho, sigma).value;
      close(divergence('petz', rho, sigma, { alpha: 0 }).value, dmin, 0, 'α = 0 is D_min');
      for (const a of [1e-4, 1e-6, 1e-8]) {
        assert.ok(Math.abs(divergence('petz', rho, sigma, { alpha: a }).value - dmin) <= 50 * a, `α = ${a}`);
      }
    }
  });

  it('every Rényi family is continuous across α = 1 from both sides, joining Umegaki (MDSFT 2013 Thm 5; Audenaert & Datta 2015)', () => {
    for (const { rho, sigma } of [...pairs(38, 4), ...pairs(39, 4, 2)]) {
      const d = divergence('umegaki', rho, sigma).value;
      for (const dlt of [1e-3, 1e-6, 1e-9, 1e-12]) {
        for (const a of [1 - dlt, 1 + dlt]) {
          // |D_α − D| = O(|α − 1|); 20 bounds the slope for these states.
          const tol = 20 * dlt + 1e-13;
          assert.ok(Math.abs(divergence('petz', rho, sigma, { alpha: a }).value - d) <= tol, `petz α=${a}`);
          assert.ok(Math.abs(divergence('sandwiched', rho, sigma, { alpha: a }).value - d) <= tol, `sandwiched α=${a}`);
          for (const z of [0.6, 1.7]) {
            assert.ok(Math.abs(divergence('alpha-z', rho, sigma, { alpha: a, z }).value - d) <= tol, `α-z α=${a} z=${z}`);
          }
        }
      }
      const bs = divergence('geometric', rho, sigma, { alpha: 1 }).value;
      for (const a of [1 - 1e-9, 1 + 1e-9]) {
        assert.ok(Math.abs(divergence('geometric', rho, sigma, { alpha: a }).value - bs) <= 1e-8, `geometric α=${a}`);
      }
      // The measured divergences are maxima found by an optimiser (to about 1e-10 here).
      const dm = divergence('measured', rho, sigma).value;
      for (const a of [1 - 1e-6, 1 + 1e-6, 1 - 1e-12, 1 + 1e-12]) {
        assert.ok(Math.abs(divergence('measured', rho, sigma, { alpha: a }).value - dm) <= 20 * Math.abs(a - 1) + 1e-9, `measured α=${a}`);
      }
    }
  });

  it('the α-z divergence is Petz at z = 1 and sandwiched at z = α (Audenaert & Datta 2015, §1)', () => {
    for (const { rho, sigma } of pairs(40, 6, 3)) {
      for (const a of [0.6, 0.9, 1.4, 3]) {
        close(divergence('alpha-z', rho, sigma, { alpha: a, z: 1 }).value, divergence('petz', rho, sigma, { alpha: a }).value, 1e-11, `z=1, α=${a}`);
        close(divergence('alpha-z', rho, sigma, { alpha: a, z: a }).value, divergence('sandwiched', rho, sigma, { alpha: a }).value, 1e-11, `z=α=${a}`);
      }
    }
  });

  it('sandwiched ≤ Petz for every α, by the Araki–Lieb–Thirring inequality (WWY 2014, §2)', () => {
    for (const { rho, sigma } of pairs(41, 8)) {
      for (const a of [0.5, 0.7, 1.5, 2, 5]) {
        const s = divergence('sandwiched', rho, sigma, { alpha: a }).value;
        const p = divergence('petz', rho, sigma, { alpha: a }).value;
        assert.ok(s <= p + 1e-12, `α=${a}: ${s} > ${p}`);
      }
    }
  });

  it('support conditions: +∞ with a reason for order ≥ 1 when supp ρ ⊄ supp σ, finite below 1, +∞ for orthogonal supports; never NaN (MDSFT 2013 Def. 3; Datta 2009)', () => {
    const r = rng(42);
    const U = eigenbasisUnitary(3, r);
    const rho = inBasis(U, [0.6, 0.4, 0]);
    const sigmaPartial = inBasis(U, [0.5, 0, 0.5]); // overlaps ρ but misses part of it
    const sigmaOrth = inBasis(U, [0, 0, 1]);
    const infinite = (d: DivergenceResult) => d.value === Infinity && typeof d.reason === 'string' && d.reason.length > 0;
    for (const [fam, a] of [['umegaki'], ['max'], ['measured'], ['petz', 1.5], ['sandwiched', 2], ['alpha-z', 1.5], ['geometric', 1.5], ['geometric', 1]] as const) {
      const d = divergence(fam, rho, sigmaPartial, { alpha: a, z: 1.2 });
      assert.ok(infinite(d), `${fam} α=${a}: ${d.value}`);
    }
    for (const [fam, a] of [['petz', 0.5], ['sandwiched', 0.7], ['alpha-z', 0.5], ['geometric', 0.5], ['min', undefined], ['petz', 0]] as const) {
      const d = divergence(fam, rho, sigmaPartial, { alpha: a, z: 0.8 });
      assert.ok(Number.isFinite(d.value) && d.value > 0, `${fam} α=${a} finite: ${d.value}`);
    }
    for (const [fam, a] of [['petz', 0.5], ['sandwiched', 0.7], ['alpha-z', 0.5], ['geometric', 0.5], ['min', undefined], ['umegaki', undefined]] as const) {
      assert.ok(infinite(divergence(fam, rho, sigmaOrth, { alpha: a, z: 0.8 })), `${fam} orthogonal`);
    }
  });

  it('D_min(ρ‖σ) = −log Tr σ exactly when ρ has full rank (Π_ρ = 1; Datta 2009), so 0 for σ of trace exactly 1; a value at rounding level carries a note saying so (common practice)', () => {
    for (const { rho, sigma } of pairs(47, 6)) {
      let t = 0;
      for (let i = 0; i < sigma.rows; i++) t += sigma.re[i * sigma.cols + i];
      const d = divergence('min', rho, sigma);
      const ref = -Math.log2(t) + 0;
      assert.ok(Math.abs(d.value - ref) <= 4 * Number.EPSILON * Math.abs(ref), `Tr σ = ${t}: ${d.value} vs ${ref}`);
      const unit = divergence('min', rho, diagonal(Array.from({ length: rho.rows }, () => 1 / 2 ** Math.ceil(Math.log2(rho.rows))).map((x, i, a) => (i === 0 ? 1 - x * (a.length - 1) : x))));
      assert.equal(unit.value, 0);
    }
    // D_max(ρ‖ρ) = 0 in exact arithmetic (Datta 2009); in floating point it lands within rounding of 0, and
    // a nonzero value there is reported with the note.
    for (const { rho } of pairs(53, 6)) {
      const d = divergence('max', rho, rho);
      assert.ok(Math.abs(d.value) < 1e-12, String(d.value));
      assert.equal(d.value !== 0, (d.notes ?? []).some((n) => /0 within rounding/.test(n)), `${d.value} ${JSON.stringify(d.notes)}`);
    }
  });

  it('an unnormalised σ shifts every divergence by −log Tr σ (scaling of the definitions; common practice, no published source)', () => {
    for (const { rho, sigma } of pairs(43, 4)) {
      const c = 3.7;
      const s2 = scale(sigma, c);
      for (const [fam, a, z] of [['umegaki'], ['petz', 0.4], ['sandwiched', 2], ['alpha-z', 1.3, 0.9], ['geometric', 1.5], ['max'], ['min']] as const) {
        close(divergence(fam, rho, s2, { alpha: a, z }).value, divergence(fam, rho, sigma, { alpha: a, z }).value - Math.log2(c), 1e-11, fam);
      }
    }
  });

  it('Zhang 2020 data-processing region: 0<α<1 needs z ≥ max(α,1−α); α>1 needs max(α/2, α−1) ≤ z ≤ α', () => {
    assert.equal(alphaZDataProcessing(0.5, 0.5), true);
    assert.equal(alphaZDataProcessing(0.3, 0.6), false);
    assert.equal(alphaZDataProcessing(0.3, 0.7), true);
    assert.equal(alphaZDataProcessing(2, 1), true);
    assert.equal(alphaZDataProcessing(2, 2), true);
    assert.equal(alphaZDataProcessing(2, 2.1), false);
    assert.equal(alphaZDataProcessing(3, 1.9), false);
    assert.equal(alphaZDataProcessing(1.5, 0.7), false);
    const d = divergence('alpha-z', identity(2), scale(identity(2), 0.5), { alpha: 2, z: 3 });
    assert.equal(d.dataProcessing, false);
  });

  it('parameters outside a family\'s range are refused with invalid-argument naming the parameter (common practice, no published source)', () => {
    const rho = diagonal([0.5, 0.5]);
    const check = (fam: string, p: object, path: string, code = 'invalid-argument') =>
      assert.throws(() => divergence(fam, rho, rho, p), isRhoError(code, path), `${fam} ${JSON.stringify(p)}`);
    check('petz', { alpha: -0.1 }, 'alpha');
    check('sandwiched', { alpha: 0.4 }, 'alpha');
    check('sandwiched', { alpha: 0 }, 'alpha');
    check('alpha-z', { alpha: 0, z: 1 }, 'alpha');
    check('alpha-z', { alpha: 1.5, z: 0 }, 'z');
    check('alpha-z', { alpha: 1.5, z: -1 }, 'z');
    check('geometric', { alpha: 2.5 }, 'alpha');
    check('geometric', { alpha: 0 }, 'alpha');
    check('petz', {}, 'alpha', 'missing-argument');
    assert.throws(() => divergence('quantum-kl', rho, rho), (e: unknown) => e instanceof RhoError && e.code === 'unknown-family' && /umegaki/.test(e.message));
  });

  it('a tiny genuine leakage below the tolerance is reported in the diagnostics (common practice, no published source)', () => {
    // ρ = |ψ⟩⟨ψ| with ψ = (cos θ, sin θ): weight sin²θ ≈ 9e-14 outside supp σ = span{e_0}.
    const th = 3e-7;
    const rho: CMatrix = fromRows([[Math.cos(th) ** 2, Math.cos(th) * Math.sin(th)], [Math.cos(th) * Math.sin(th), Math.sin(th) ** 2]]);
    const sigma = diagonal([1, 0]);
    const d = divergence('umegaki', rho, sigma, { tol: 1e-12 });
    assert.ok(d.supportIncluded && d.leakage > 0 && d.leakage < 1e-12 && Number.isFinite(d.value), `leakage ${d.leakage}`);
    assert.ok(Array.isArray(d.notes) && d.notes.length > 0, 'a note explains the neglected leakage');
    const strict = divergence('umegaki', rho, sigma, { tol: 1e-15 });
    assert.equal(strict.value, Infinity);
  });
});
