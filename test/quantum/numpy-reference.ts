/**
 * Runs a short numpy/scipy script in .venv/bin/python as an outside reference for tests.
 * Matrices cross as {re, im} arrays of rows. The script reads `data` (parsed JSON input) and assigns
 * `result`; helpers `M(x)` (to a complex ndarray) and `W(a)` (back to {re, im}) are predefined.
 */
import { CMatrix, fromRows, toRows } from '../../src/linalg/index.js';
import { runPythonCode } from '../helpers/python.js';

const PRELUDE = `
import json, sys
import numpy as np
import scipy, scipy.linalg
def M(x):
    return np.array(x["re"], dtype=float) + 1j * np.array(x["im"], dtype=float)
def W(a):
    a = np.asarray(a, dtype=complex)
    return {"re": a.real.tolist(), "im": a.imag.tolist()}
data = json.loads(sys.stdin.read())
`;

export function python(script: string, data: unknown): any {
  const code = `${PRELUDE}\n${script}\nprint(json.dumps(result))\n`;
  return runPythonCode(code, data);
}

/** numpy's and scipy's version strings, read from the modules themselves. */
export function numpyVersions(): { numpy: string; scipy: string } {
  return python('result = {"numpy": np.__version__, "scipy": scipy.__version__}', {});
}

export function toData(m: CMatrix): { re: number[][]; im: number[][] } {
  return toRows(m);
}

export function fromData(x: { re: number[][]; im: number[][] }): CMatrix {
  return fromRows(x.re, x.im);
}
