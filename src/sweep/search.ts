/**
 * Local refinement of a point's draws for the search mode: the (1+1) evolution strategy with the one-fifth
 * success rule (Rechenberg 1973; Beyer and Schwefel, "Evolution strategies — a comprehensive introduction",
 * Natural Computing 1 (2002) 3, §4.1), a derivative-free method that copes with the tens to hundreds of
 * coordinates a point's draws have (Nelder–Mead needs n + 1 evaluations before its first move).
 *
 * The parametrization: every random op can draw from given coordinates (the standard normals it would
 * consume; src/ops/random-ops.ts), so a point's draws are a smooth function of one real vector x. Starting
 * from the point's own coordinates, each step tries x + σ z with z standard normal; a smaller gap is kept
 * and σ grows by 1.5, otherwise σ shrinks by 1.5^(−1/4) (success rate held near 1/5). The directions come
 * from the spec's seed, stream [index, 0, 1] (draws use [index, k, 0]), so a refinement is reproducible.
 * Coordinates of uniform draws (random-number) are kept in [0, 1].
 *
 * Deliberately not here: choosing which points to refine (src/sweep/runner.ts). Evidence, not proof: a
 * refined gap is a local minimum found numerically; the line's requests replay it exactly.
 * Cost: `evaluations` evaluations of the point.
 */
import { PhiloxStream } from '../linalg/philox.js';
import { evaluatePoint, type PointOutcome } from './point.js';
import type { Spec } from './spec.js';

export interface Refinement {
  start: PointOutcome;
  best: PointOutcome;
  evaluations: number;
}

/** Refines point `index` of `spec` for a smaller gap, within `spec.search.evaluations` evaluations. */
export function refinePoint(spec: Spec, index: number): Refinement {
  const start = evaluatePoint(spec, index, { withCoordinates: true });
  if (start.failed || start.gap === undefined || !Number.isFinite(start.gap) || !start.coordinates) return { start, best: start, evaluations: 0 };
  const sizes = start.coordinates.map((c) => c.length);
  const uniform = spec.draws.map(([, req]) => req.op === 'random-number');
  let x = start.coordinates.flat();
  let best = start;
  let sigma = spec.search.step;
  const directions = new PhiloxStream(spec.seed, [index, 0, 1]);
  let evaluations = 0;
  while (evaluations < spec.search.evaluations && sigma > 1e-10) {
    const y = x.map((v) => v + sigma * directions.normal());
    const split: number[][] = [];
    let offset = 0;
    sizes.forEach((n, k) => {
      const part = y.slice(offset, offset + n);
      split.push(uniform[k] ? part.map((u) => Math.min(1, Math.max(0, u))) : part);
      offset += n;
    });
    const trial = evaluatePoint(spec, index, { coordinates: split });
    evaluations++;
    if (!trial.failed && trial.gap !== undefined && trial.gap < best.gap!) {
      best = trial;
      x = split.flat();
      sigma *= 1.5;
    } else {
      sigma *= 1.5 ** -0.25;
    }
  }
  return { start, best, evaluations };
}
