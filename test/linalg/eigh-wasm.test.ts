// The eigensolver's two code paths, WebAssembly SIMD kernels and pure TypeScript, checked against
// the same accuracy contract: the defining property of an eigendecomposition (common practice, no
// published source beyond the definition) with the project's tolerance, residual ‖HV − VΛ‖ and
// ‖V*V − I‖ below 1e-12·n·‖H‖; eigenvalues also against numpy.linalg.eigvalsh (numpy from PyPI,
// .venv/bin/python). Also: the committed kernel module is a fresh compile of its source, and the
// environment switch turns the kernels off.
import { describe, it, afterAll } from '@jest/globals';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import {
  CMatrix, eigh, mul, adjoint, zeros, diagonal, scale, operatorNorm,
} from '../../src/linalg/index.js';
import { setEighWasmEnabled, eighWasmStatus } from '../../src/linalg/eigh-wasm.js';
import { randomHermitian, rng, randomDensity } from '../helpers/random.js';
import { eighContract, numpyEigvalsh, numpySkip, numpyVersion, randomUnitary } from '../helpers/eigh-reference.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '../..');

const NUMPY = numpyVersion();

/** Test matrices covering odd and even sizes, deflation, splitting and scaling. */
function cases(): [string, CMatrix][] {
  const r = rng(21);
  const out: [string, CMatrix][] = [];
  for (const n of [1, 2, 3, 4, 5, 7, 24, 25, 33, 64, 101, 128, 200]) out.push([`random n=${n}`, randomHermitian(n, r)]);
  const U = randomUnitary(97, r);
  out.push(['two eigenvalues n=97', mul(mul(U, diagonal(Array.from({ length: 97 }, (_, i) => (i % 2 ? 1 : -2)))), adjoint(U))]);
  out.push(['clustered n=97', mul(mul(U, diagonal(Array.from({ length: 97 }, (_, i) => 1 + 1e-13 * i))), adjoint(U))]);
  out.push(['rank-5 density matrix n=96', randomDensity(96, r, 5)]);
  out.push(['scaled 1e-150 n=30', scale(randomHermitian(30, r), 1e-150)]);
  out.push(['scaled 1e150 n=30', scale(randomHermitian(30, r), 1e150)]);
  const w = zeros(101, 101);
  for (let i = 0; i < 101; i++) {
    w.re[i * 101 + i] = Math.abs(i - 50);
    if (i + 1 < 101) w.re[i * 101 + i + 1] = w.re[(i + 1) * 101 + i] = 1;
  }
  out.push(['Wilkinson W+ 101 (close eigenvalue pairs)', w]);
  return out;
}

describe('Hermitian eigensolver: WebAssembly SIMD and pure TypeScript paths', () => {
  afterAll(() => setEighWasmEnabled(true));

  it('runs the WebAssembly SIMD path by default on Node 20 (so the checks below exercise it)', () => {
    setEighWasmEnabled(true);
    assert.deepEqual(eighWasmStatus(), { active: true, reason: '' });
  });

  it('below order 16 both settings run the scalar path and agree bit for bit (a design choice of eigh.ts, no published source)', () => {
    const r = rng(22);
    for (const n of [2, 4, 9, 15]) {
      const h = randomHermitian(n, r);
      setEighWasmEnabled(true);
      const a = eigh(h);
      setEighWasmEnabled(false);
      const b = eigh(h);
      assert.deepEqual(Array.from(a.values), Array.from(b.values));
      assert.deepEqual(Array.from(a.vectors!.re), Array.from(b.vectors!.re));
      assert.deepEqual(Array.from(a.vectors!.im), Array.from(b.vectors!.im));
    }
  });

  // Sizes below 16 run the scalar path under both settings; the rest exercise the kernels.
  for (const [path, on] of [['WebAssembly SIMD', true], ['pure TypeScript', false]] as const) {
    it(`${path}: residual and orthogonality within 1e-12·n·‖H‖ on random, degenerate, clustered, low-rank, scaled and Wilkinson matrices`, () => {
      setEighWasmEnabled(on);
      assert.equal(eighWasmStatus().active, on);
      for (const [label, h] of cases()) eighContract(h, `${path}, ${label}`);
    });
  }

  (numpySkip(NUMPY) ? it.skip : it)(
    'both paths agree with numpy.linalg.eigvalsh (numpy, LAPACK) within 1e-12·n·‖H‖',
    () => {
      const ms = cases().map(([, h]) => h).filter((h) => h.rows >= 24 && operatorNorm(h) < 1e100);
      const ref = numpyEigvalsh(ms);
      for (const on of [true, false]) {
        setEighWasmEnabled(on);
        ms.forEach((m, k) => {
          const tol = 1e-12 * m.rows * operatorNorm(m);
          const vals = eigh(m).values;
          for (let i = 0; i < m.rows; i++) {
            assert.ok(Math.abs(vals[i] - ref[k][i]) <= tol, `${on ? 'SIMD' : 'TS'} matrix ${k} eigenvalue ${i}: ${vals[i]} vs ${ref[k][i]}`);
          }
        });
      }
    },
  );

  it('the environment variable RHOSIGMA_EIGH_WASM=0 switches the SIMD path off (common practice, no published source)', () => {
    const code =
      "import { eighWasmStatus } from './src/linalg/eigh-wasm.ts'; console.log(JSON.stringify(eighWasmStatus()));";
    const r = spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', code], {
      cwd: root,
      encoding: 'utf8',
      env: { ...process.env, RHOSIGMA_EIGH_WASM: '0' },
    });
    assert.equal(r.status, 0, r.stderr);
    assert.deepEqual(JSON.parse(r.stdout), { active: false, reason: 'switched off' });
  });

  it('the committed kernel module src/linalg/wasm/eigh-kernels.wasm.ts equals a fresh AssemblyScript compile of eigh-kernels.as', () => {
    const r = spawnSync(process.execPath, [join(root, 'src/linalg/wasm/build.mjs'), '--check'], { encoding: 'utf8' });
    assert.equal(r.status, 0, r.stderr || r.stdout);
  });
});
