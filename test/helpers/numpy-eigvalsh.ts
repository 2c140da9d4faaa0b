/**
 * numpy.linalg.eigvalsh (Debian's python3-numpy, LAPACK) as the outside reference of the eigensolver
 * tests (test/linalg/eigh*.test.ts), run through test/helpers/python.ts.
 *
 * Deliberately not here: the checks themselves, any tolerance. Under CI=true a missing interpreter or
 * numpy fails the test (numpySkip returns false, and numpyEigvalsh throws); elsewhere the test is skipped
 * with a message.
 * Cost: one python process per call (the matrices cross as JSON).
 */
import type { CMatrix } from '../../src/linalg/index.js';
import { PythonUnavailable, runPythonCode } from './python.js';

/** numpy's version from /usr/bin/python3, or undefined when the interpreter or numpy is missing. */
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
    ? '/usr/bin/python3 with numpy not available (under CI=true this fails instead)'
    : false;
}

/** numpy.linalg.eigvalsh of each matrix (ascending), computed by /usr/bin/python3. */
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
