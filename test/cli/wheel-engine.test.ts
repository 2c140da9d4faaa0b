// The engine the Python wheel ships (scripts/bundle-cli.mjs bundleWheelEngine, `npm run
// build:engine-bundle`), built into a temporary folder outside the checkout so that nothing can be found in
// the checkout's node_modules: it must answer with only `node` and its own files. Sources: the eigenvalues
// of [[1, i], [-i, 2π]] are (1 + 2π ± √((2π − 1)² + 4))/2 (closed form of a 2 × 2 Hermitian matrix:
// trace and determinant); the sweep's determinism contract (docs/sweeps.md: the same bytes whatever the
// number of workers) and the checkout's own command as the referee of the wheel's rows and plot.
import { beforeAll, describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { sweepWorkerFile } from '../../src/sweep/pool.js';

const root = fileURLToPath(new URL('../..', import.meta.url));
const built = existsSync(join(root, 'dist/cli/bundle.cjs'));
if (!built && process.env.CI === 'true') throw new Error('test/cli/wheel-engine.test.ts needs the build (npm run build)');
const maybe = built ? it : it.skip;

let dir = '';
let bin = '';
beforeAll(async () => {
  if (!built) return;
  dir = mkdtempSync(join(tmpdir(), 'rhosigma-wheel-engine-'));
  const { bundleWheelEngine } = (await import(pathToFileURL(join(root, 'scripts/bundle-cli.mjs')).href)) as { bundleWheelEngine(dir: string): Promise<void> };
  await bundleWheelEngine(join(dir, '_bundle'));
  bin = join(dir, '_bundle/bin/rhosigma.js');
});

function run(args: string[], env: NodeJS.ProcessEnv = process.env): string {
  const r = spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', cwd: dir, env });
  assert.equal(r.status, 0, `rhosigma ${args.join(' ')} failed: ${r.stderr}`);
  return r.stdout;
}

describe("the wheel's engine (one folder, nothing from node_modules outside it)", () => {
  maybe('reads expression entries (mathjs from its own folder) and answers the closed-form eigenvalues; writes its code cache beside the bundle', () => {
    const file = join(dir, 'expr.json');
    writeFileSync(file, JSON.stringify({ op: 'spectrum', matrix: [['1', 'i'], ['-i', '2*pi']] }));
    const answer = JSON.parse(run(['compute', file])) as { ok: boolean; value: number[] };
    assert.equal(answer.ok, true);
    const t = 1 + 2 * Math.PI;
    const r = Math.sqrt((2 * Math.PI - 1) ** 2 + 4);
    [(t - r) / 2, (t + r) / 2].forEach((e, k) => assert.ok(Math.abs(answer.value[k] - e) < 1e-12, `eigenvalue ${k}: ${answer.value[k]} against ${e}`));
    assert.ok(readdirSync(join(dir, '_bundle/dist/cli')).includes('bundle.cjs.cache'), 'no code cache was written beside the bundle');
  });

  maybe('runs `sweep --workers 2` on its own worker file with the bytes of one worker and of the checkout, and plots with its own vega', () => {
    assert.equal(sweepWorkerFile(pathToFileURL(join(dir, '_bundle/dist/cli/bundle.cjs')).href), join(dir, '_bundle/dist/sweep/worker.js'));
    const spec = JSON.parse(readFileSync(join(root, 'docs/sweeps/strong-subadditivity.json'), 'utf8')) as { samples: number };
    spec.samples = 30;
    const specFile = join(dir, 'spec.json');
    writeFileSync(specFile, JSON.stringify(spec));
    const out = (name: string) => join(dir, `${name}.jsonl`);
    run(['sweep', specFile, '-o', out('one'), '--workers', '1']);
    run(['sweep', specFile, '-o', out('two'), '--workers', '2']);
    const checkout = spawnSync(process.execPath, [join(root, 'bin/rhosigma.js'), 'sweep', specFile, '-o', out('checkout')], { encoding: 'utf8' });
    assert.equal(checkout.status, 0, checkout.stderr);
    const one = readFileSync(out('one'));
    assert.ok(readFileSync(out('two')).equals(one), 'two worker threads wrote other bytes than one');
    assert.ok(readFileSync(out('checkout')).equals(one), "the wheel's engine wrote other bytes than the checkout's command");
    run(['sweep', 'plot', out('one'), '-o', join(dir, 'wheel.svg')]);
    const ref = spawnSync(process.execPath, [join(root, 'bin/rhosigma.js'), 'sweep', 'plot', out('one'), '-o', join(dir, 'checkout.svg')], { encoding: 'utf8' });
    assert.equal(ref.status, 0, ref.stderr);
    const svg = readFileSync(join(dir, 'wheel.svg'), 'utf8');
    assert.match(svg, /^<svg /);
    assert.equal(svg, readFileSync(join(dir, 'checkout.svg'), 'utf8'), "the wheel's plot differs from the checkout's");
  });
});
