/**
 * Benchmark of the first SDP solve in a fresh engine process, with and without `warmUp()` (src/ops/
 * warm-up.ts; issue 6 §3: a long-lived engine that warms while idle should run the first solve a user
 * waits for within 2× of steady state). For each request (SDPs of shapes the warm-up does not itself
 * run), in fresh Node processes on the build (dist/): the first call's time, and the median of the next
 * ten (steady state); cold (no warm-up) and warm (after `await warmUp()`), alternating processes, several
 * rounds. Prints medians and the ratios first/steady. The reference is the engine's own steady state,
 * measured in the same process. Asserts nothing (not a test). Cost: about half a minute.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { median } from './timing.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const OPS = pathToFileURL(join(root, 'dist/ops/index.js')).href;

const mixed = (d: number) => Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? 1 / d : 0.3 / d)));
const REQUESTS: Record<string, object> = {
  'diamond-distance d = 4': {
    op: 'diamond-distance',
    a: { kraus: [[[1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1]]] },
    b: { kraus: [[[0, 1, 0, 0], [1, 0, 0, 0], [0, 0, 0, 1], [0, 0, 1, 0]]] },
  },
  'conditional-min-entropy 3 × 3': { op: 'conditional-min-entropy', rho: { matrix: mixed(9), dims: [3, 3] }, a: [0], b: [1] },
  'guessing-probability 4 states, d = 4': {
    op: 'guessing-probability',
    probabilities: [0.25, 0.25, 0.25, 0.25],
    states: [mixed(4), [[1, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0, 0]], [[0.5, 0.5, 0, 0], [0.5, 0.5, 0, 0], [0, 0, 0, 0], [0, 0, 0, 0]], [[0, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0.5, 0], [0, 0, 0, 0.5]]],
  },
};

function child(warm: boolean, request: object): { first: number; steady: number } {
  const code = `
    const { handle, warmUp } = await import(${JSON.stringify(OPS)});
    const request = ${JSON.stringify(request)};
    if (${warm}) await warmUp();
    let t0 = performance.now();
    const a = handle(request);
    const first = performance.now() - t0;
    if (!a.ok) throw new Error(JSON.stringify(a.error));
    const ts = [];
    for (let k = 0; k < 10; k++) { t0 = performance.now(); handle(request); ts.push(performance.now() - t0); }
    ts.sort((x, y) => x - y);
    console.log(JSON.stringify({ first, steady: ts[5] }));`;
  const r = spawnSync(process.execPath, ['--input-type=module', '-e', code], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`warm-up child failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').pop()!);
}

export default async function warmupBench(): Promise<void> {
  if (!existsSync(join(root, 'dist/ops/index.js'))) throw new Error('bench/warmup.ts needs `npm run build` first');
  const rounds = 5;
  console.log(`First SDP solve in a fresh process, cold and after warmUp(); median of ${rounds} rounds, ms:`);
  console.log('  request                                 cold first  steady  ratio   warm first  steady  ratio (goal ≤ 2)');
  for (const [name, request] of Object.entries(REQUESTS)) {
    const cold: { first: number; steady: number }[] = [];
    const warm: { first: number; steady: number }[] = [];
    for (let r = 0; r < rounds; r++) {
      cold.push(child(false, request));
      warm.push(child(true, request));
    }
    const row = (xs: { first: number; steady: number }[]) => {
      const first = median(xs.map((x) => x.first));
      const steady = median(xs.map((x) => x.steady));
      const ratio = median(xs.map((x) => x.first / x.steady));
      return `${first.toFixed(1).padStart(10)}  ${steady.toFixed(1).padStart(6)}  ${ratio.toFixed(2).padStart(5)}`;
    };
    console.log(`  ${name.padEnd(38)}${row(cold)}   ${row(warm)}`);
  }
}
