// Facts about trace distance, Bures distance and purified distance. Sources named in each it(...).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { CMatrix, toRows, scale, fromRows } from '../../src/linalg/index.js';
import { fidelity } from '../../src/quantities/fidelity.js';
import {
  traceDistance, buresDistance, buresAngle, purifiedDistance, generalizedTraceDistance,
} from '../../src/quantities/distances.js';
import { rng, randomDensity } from '../helpers/random.js';
import { runPythonCode } from '../helpers/python.js';
import { extend } from './divergence-fixtures.js';

/** Qubit state (I + r·σ)/2 from a Bloch vector. */
function bloch(x: number, y: number, z: number): CMatrix {
  return fromRows([[(1 + z) / 2, x / 2], [x / 2, (1 - z) / 2]], [[0, -y / 2], [y / 2, 0]]);
}

describe('distances between states', () => {
  it('satisfies the Fuchs–van de Graaf inequalities 1 − √F ≤ T ≤ √(1 − F) (Fuchs & van de Graaf, IEEE Trans. Inf. Theory 45, 1216 (1999))', () => {
    const r = rng(21);
    for (const n of [2, 3, 4, 6]) {
      for (let k = 0; k < 6; k++) {
        const rho = randomDensity(n, r, 1 + (k % n));
        const sigma = randomDensity(n, r, 1 + ((k + 1) % n));
        const f = fidelity(rho, sigma);
        const t = traceDistance(rho, sigma);
        assert.ok(1 - f.root <= t + 1e-12, `lower: ${1 - f.root} > ${t}`);
        assert.ok(t <= Math.sqrt(1 - f.value) + 1e-12, `upper: ${t} > ${Math.sqrt(1 - f.value)}`);
      }
    }
  });

  it('equals √(1 − F) for pure states, the Fuchs–van de Graaf upper bound being tight (Fuchs & van de Graaf 1999)', () => {
    const r = rng(22);
    for (const n of [2, 4]) {
      const rho = randomDensity(n, r, 1);
      const sigma = randomDensity(n, r, 1);
      assert.ok(Math.abs(traceDistance(rho, sigma) - Math.sqrt(1 - fidelity(rho, sigma).value)) < 1e-12);
    }
  });

  it('trace distance of qubits is half the Euclidean distance of their Bloch vectors (Nielsen & Chuang, Sec. 9.2.1)', () => {
    const a = [0.3, -0.2, 0.5];
    const b = [-0.1, 0.6, 0.2];
    const expected = 0.5 * Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
    assert.ok(Math.abs(traceDistance(bloch(a[0], a[1], a[2]), bloch(b[0], b[1], b[2])) - expected) < 1e-15);
  });

  it('trace distance agrees with half the nuclear norm of ρ − σ from numpy 2.4.6', () => {
    const r = rng(23);
    const pairs: [CMatrix, CMatrix][] = [];
    for (const [n, k] of [[2, 1], [3, 3], [5, 2], [8, 8]]) pairs.push([randomDensity(n, r, k), randomDensity(n, r)]);
    const script = [
      'import json, sys, numpy as np',
      'out = []',
      'for a, b in json.load(sys.stdin):',
      '    d = (np.array(a["re"]) - np.array(b["re"])) + 1j * (np.array(a["im"]) - np.array(b["im"]))',
      '    out.append(0.5 * float(np.linalg.norm(d, "nuc")))',
      'print(json.dumps(out))',
    ].join('\n');
    const expected: number[] = runPythonCode(script, pairs.map(([a, b]) => [toRows(a), toRows(b)]));
    pairs.forEach(([a, b], k) => assert.ok(Math.abs(traceDistance(a, b) - expected[k]) < 1e-13));
  });

  it('Bures distance is √(2(1 − √F)) for states and satisfies B²/2 ≤ T ≤ B (Nielsen & Chuang Sec. 9.2.2; Fuchs & van de Graaf 1999)', () => {
    const r = rng(24);
    for (const n of [2, 3, 5]) {
      const rho = randomDensity(n, r);
      const sigma = randomDensity(n, r, 2);
      const f = fidelity(rho, sigma);
      const b = buresDistance(rho, sigma);
      assert.ok(Math.abs(b - Math.sqrt(2 * (1 - f.root))) < 1e-12);
      const t = traceDistance(rho, sigma);
      assert.ok(b * b / 2 <= t + 1e-12 && t <= b + 1e-12);
      assert.ok(Math.abs(Math.cos(buresAngle(rho, sigma)) - f.root) < 1e-12);
    }
  });

  it('Bures distance of pure states is the minimal distance ‖ψ − e^{iφ}φ‖ = √(2 − 2|⟨ψ|φ⟩|) (Bures 1969; Uhlmann 1976)', () => {
    // |ψ⟩ = (1, 0), |φ⟩ = (cos θ, sin θ): overlap cos θ.
    const th = 0.7;
    const psi = fromRows([[1, 0], [0, 0]]);
    const phi = fromRows([[Math.cos(th) ** 2, Math.cos(th) * Math.sin(th)], [Math.cos(th) * Math.sin(th), Math.sin(th) ** 2]]);
    assert.ok(Math.abs(buresDistance(psi, phi) - Math.sqrt(2 - 2 * Math.cos(th))) < 1e-13);
  });

  it('purified distance is √(1 − F) for states and, for subnormalised states, √(1 − F(ρ⊕(1−Tr ρ), σ⊕(1−Tr σ))) (Tomamichel, thesis arXiv:1203.2142, Sec. 3.2; recalled from memory)', () => {
    const r = rng(25);
    for (const n of [2, 4]) {
      const rho = randomDensity(n, r);
      const sigma = randomDensity(n, r, 1);
      assert.ok(Math.abs(purifiedDistance(rho, sigma) - Math.sqrt(1 - fidelity(rho, sigma).value)) < 1e-12);
      const rs = scale(rho, 0.8);
      const ss = scale(sigma, 0.6);
      const direct = Math.sqrt(1 - fidelity(extend(rs, 0.2), extend(ss, 0.4)).value);
      assert.ok(Math.abs(purifiedDistance(rs, ss) - direct) < 1e-12);
    }
  });

  it('purified distance obeys the triangle inequality and dominates the generalized trace distance (Tomamichel, thesis Sec. 3.2; recalled from memory)', () => {
    const r = rng(26);
    for (let k = 0; k < 10; k++) {
      const n = 3;
      const a = scale(randomDensity(n, r), 0.5 + 0.5 * r());
      const b = scale(randomDensity(n, r, 2), 0.5 + 0.5 * r());
      const c = scale(randomDensity(n, r, 1), 0.5 + 0.5 * r());
      assert.ok(purifiedDistance(a, c) <= purifiedDistance(a, b) + purifiedDistance(b, c) + 1e-12);
      assert.ok(generalizedTraceDistance(a, b) <= purifiedDistance(a, b) + 1e-12);
    }
  });
});
