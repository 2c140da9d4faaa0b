/**
 * What the eigensolver tests (test/linalg/eigh*.test.ts) share: the accuracy contract of a Hermitian
 * eigendecomposition (the defining property HV = VΛ, V*V = I, ascending Λ; common practice, no published
 * source beyond the definition, with the project's tolerance 1e-12·n·‖H‖), random unitaries, and
 * numpy.linalg.eigvalsh (numpy pinned in requirements.txt, LAPACK) as the outside reference, run through
 * test/helpers/python.ts.
 *
 * Deliberately not here: the test matrices and the comparisons with numpy. Under CI=true a missing interpreter or
 * numpy fails the test (numpySkip returns false, and numpyEigvalsh throws); elsewhere the test is skipped
 * with a message.
 * Cost: eighContract, a few O(n³) products; numpy, one python process per call (the matrices cross as JSON).
 */
import assert from 'node:assert/strict';
import {
  type CMatrix, adjoint, diagonal, eigh, frobeniusNorm, identity, mul, operatorNorm, sub,
} from '../../src/linalg/index.js';
import { randomHermitian } from './random.js';
import { PythonUnavailable, runPythonCode } from './python.js';

/** numpy's version from .venv/bin/python, or undefined when the interpreter or numpy is missing. */
export function numpyVersion(): string | undefined {
  try {
    return runPythonCode<string>('import json, numpy\nprint(json.dumps(numpy.__version__))');
  } catch (e) {
    if (e instanceof PythonUnavailable) return undefined;
    throw e;
  }
}

/** The `skip` option of a numpy check: a reason when numpy is missing outside CI, otherwise false. */
export function numpySkip(version: string | undefined): string | false {
  return version === undefined && process.env.CI !== 'true'
    ? '.venv/bin/python with numpy not available (under CI=true this fails instead)'
    : false;
}

/** numpy.linalg.eigvalsh of each matrix (ascending), computed by .venv/bin/python. */
export function numpyEigvalsh(ms: CMatrix[]): number[][] {
  const code = [
    'import json, sys, numpy as np',
    'out = []',
    'for m in json.load(sys.stdin):',
    "    a = (np.array(m['re']) + 1j * np.array(m['im'])).reshape(m['n'], m['n'])",
    '    out.append(np.linalg.eigvalsh(a).tolist())',
    'print(json.dumps(out))',
  ].join('\n');
  return runPythonCode<number[][]>(code, ms.map((m) => ({ n: m.rows, re: Array.from(m.re), im: Array.from(m.im) })));
}

/** A random unitary of order n: the eigenvectors of a random Hermitian matrix. */
export function randomUnitary(n: number, r: () => number): CMatrix {
  return eigh(randomHermitian(n, r)).vectors!;
}

/**
 * Asserts the eigendecomposition contract on h: residual ‖HV − VΛ‖_F ≤ 1e-12·n·‖H‖, ‖V*V − I‖_F ≤ 1e-12·n,
 * eigenvalues ascending. `label` names the matrix in the messages.
 */
export function eighContract(h: CMatrix, label: string): void {
  const n = h.rows;
  const { values, vectors } = eigh(h);
  const V = vectors!;
  const norm = Math.max(operatorNorm(h), Number.MIN_VALUE);
  const residual = frobeniusNorm(sub(mul(h, V), mul(V, diagonal(values))));
  const orth = frobeniusNorm(sub(mul(adjoint(V), V), identity(n)));
  assert.ok(residual <= 1e-12 * n * norm, `${label}: residual ${residual} vs ${1e-12 * n * norm}`);
  assert.ok(orth <= 1e-12 * n, `${label}: orthogonality ${orth}`);
  for (let i = 1; i < n; i++) assert.ok(values[i - 1] <= values[i], `${label}: eigenvalues not ascending`);
}
