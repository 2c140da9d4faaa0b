// Guessing probability and diamond distance against cvxopt (cvxopt from PyPI in .venv,
// cvxopt.solvers.sdp), which solves the DUAL problems built independently with numpy in
// scripts/reference/cvxopt_guessing.py (min Tr Y s.t. Y ⪰ p_x ρ_x; Watrous's dual for the diamond
// norm, min ‖Tr_out Z‖_∞ s.t. Z ⪰ 0, Z ⪰ J). A committed batch (test/reference/data/guessing-cases.json)
// and a small fresh batch generated in this run. Under CI=true a missing python3/cvxopt fails.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { fromRows, type CMatrix } from '../../src/linalg/index.js';
import { guessingProbability } from '../../src/oneshot/guessing.js';
import { diamondDistance } from '../../src/oneshot/diamond.js';
import type { Channel } from '../../src/quantum/types.js';
import { liveReference } from '../helpers/python.js';

type Plain = { re: number[][]; im: number[][] };
/** A channel in the protocol's plain-data form ("from": input dims, "to": output dims). */
type PlainChannel = { kraus: Plain[]; from: number[]; to: number[] };
interface ReferenceFile {
  cvxopt: string;
  numpy: string;
  seed: number;
  guessing: { probabilities: number[]; states: Plain[]; value: number; cvxoptStatus: string }[];
  diamond: { a: PlainChannel; b: PlainChannel; value: number; cvxoptStatus: string }[];
}

const root = fileURLToPath(new URL('../..', import.meta.url));
const script = `${root}scripts/reference/cvxopt_guessing.py`;
const m = (x: Plain): CMatrix => fromRows(x.re, x.im);
const ch = (c: PlainChannel): Channel => ({
  kraus: c.kraus.map(m), fromDims: c.from, toDims: c.to,
});

function live(): ReferenceFile | undefined {
  return liveReference<ReferenceFile>([script, '--seed', '31', '--count', '3', '--recovery', '0', '--out', '-'], 'cvxopt (bash scripts/setup.sh)');
}

function relErr(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(1, Math.abs(b));
}

function checkGuessing(ref: ReferenceFile, origin: string): void {
  assert.ok(ref.guessing.length > 0);
  ref.guessing.forEach((c, k) => {
    assert.equal(c.cvxoptStatus, 'optimal');
    const g = guessingProbability(c.probabilities, c.states.map(m));
    const where = `${origin} guessing #${k} (cvxopt ${ref.cvxopt}, numpy ${ref.numpy}, seed ${ref.seed})`;
    assert.equal(g.certificate.status, 'optimal', where);
    assert.ok(relErr(g.value, c.value) <= 1e-6, `${where}: ours ${g.value}, cvxopt ${c.value}`);
    assert.ok(relErr(g.certificate.dualObjective, c.value) <= 1e-6, `${where}: our dual ${g.certificate.dualObjective}`);
  });
}

function checkDiamond(ref: ReferenceFile, origin: string): void {
  assert.ok(ref.diamond.length > 0);
  ref.diamond.forEach((c, k) => {
    assert.equal(c.cvxoptStatus, 'optimal');
    const d = diamondDistance(ch(c.a), ch(c.b));
    const where = `${origin} diamond #${k} (cvxopt ${ref.cvxopt}, numpy ${ref.numpy}, seed ${ref.seed})`;
    assert.equal(d.certificate.status, 'optimal', where);
    assert.ok(relErr(d.value, c.value) <= 1e-6, `${where}: ours ${d.value}, cvxopt ${c.value}`);
  });
}

const committed = JSON.parse(readFileSync(`${root}test/reference/data/guessing-cases.json`, 'utf8')) as ReferenceFile;

describe('guessing probability and diamond distance against cvxopt.solvers.sdp', () => {
  it('p_guess matches cvxopt on the committed random ensembles (2–4 states, d = 2–4, mixed ranks) to 1e-6 relative', () => {
    checkGuessing(committed, 'committed');
  });

  it('½‖N − M‖_⋄ matches cvxopt on the committed random channel pairs (d_in, d_out = 2–3) to 1e-6 relative', () => {
    checkDiamond(committed, 'committed');
  });

  it('both match cvxopt on a fresh batch generated in this run (seed 31) to 1e-6 relative', () => {
    const ref = live();
    if (!ref) return;
    checkGuessing(ref, 'live');
    checkDiamond(ref, 'live');
  });
});
