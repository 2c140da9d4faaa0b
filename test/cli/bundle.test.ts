// Facts about the built command (bin/rhosigma.js running dist/cli/bundle.cjs with its code cache,
// scripts/bundle-cli.mjs), on a copy of the launcher and the bundle in a temporary folder so that no
// other test's command sees the cache being replaced. Needs the build (`npm run build`): skipped without
// it, failed without it under CI=true. Sources: the eigenvalues of [[2, 1], [1, 2]] are 1 and 3 (closed
// form: trace 4, determinant 3); V8 refuses cached data that is not its own (vm.Script's
// cachedDataRejected, Node's documentation of vm.Script); which built-in modules a process has loaded is
// process.moduleLoadList (common practice, no published source: Node's own tests read it).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = fileURLToPath(new URL('../..', import.meta.url));
const built = existsSync(join(root, 'dist/cli/bundle.cjs')) && existsSync(join(root, 'dist/cli/bundle.cjs.cache'));
if (!built && process.env.CI === 'true') throw new Error('test/cli/bundle.test.ts needs the build (npm run build)');
const maybe = built ? it : it.skip;

/** A fresh copy of bin/rhosigma.js and the bundle with its cache; returns the paths. */
function copy(): { dir: string; bin: string; bundle: string; cache: string } {
  const dir = mkdtempSync(join(tmpdir(), 'rhosigma-bundle-test-'));
  mkdirSync(join(dir, 'bin'));
  mkdirSync(join(dir, 'dist/cli'), { recursive: true });
  writeFileSync(join(dir, 'package.json'), JSON.stringify({ name: 'rhosigma', version: '0.0.0-test', type: 'module' }));
  copyFileSync(join(root, 'bin/rhosigma.js'), join(dir, 'bin/rhosigma.js'));
  const bundle = join(dir, 'dist/cli/bundle.cjs');
  copyFileSync(join(root, 'dist/cli/bundle.cjs'), bundle);
  copyFileSync(join(root, 'dist/cli/bundle.cjs.cache'), `${bundle}.cache`);
  // The copy keeps the build's order of modification times (the cache is not older than the bundle).
  const t = statSync(join(root, 'dist/cli/bundle.cjs')).mtime;
  utimesSync(bundle, t, t);
  utimesSync(`${bundle}.cache`, new Date(t.getTime() + 1000), new Date(t.getTime() + 1000));
  const request = join(dir, 'one.json');
  writeFileSync(request, JSON.stringify({ op: 'spectrum', matrix: [[2, 1], [1, 2]] }));
  return { dir, bin: join(dir, 'bin/rhosigma.js'), bundle, cache: `${bundle}.cache` };
}

function compute(bin: string, dir: string, extra: string[] = []): { value: number[]; stderr: string } {
  const r = spawnSync(process.execPath, [...extra, bin, 'compute', join(dir, 'one.json')], { encoding: 'utf8' });
  assert.equal(r.status, 0, `the command failed: ${r.stderr}`);
  const answer = JSON.parse(r.stdout) as { ok: boolean; value: number[] };
  assert.equal(answer.ok, true);
  return { value: answer.value, stderr: r.stderr };
}

function closeTo(values: number[], expected: number[]): void {
  assert.equal(values.length, expected.length);
  values.forEach((v, k) => assert.ok(Math.abs(v - expected[k]) < 1e-12, `eigenvalue ${k}: ${v}, expected ${expected[k]}`));
}

describe('the built command (bundle with its code cache)', () => {
  maybe('answers through the bundle: the eigenvalues of [[2, 1], [1, 2]] are 1 and 3 (closed form)', () => {
    const { dir, bin } = copy();
    closeTo(compute(bin, dir).value, [1, 3]);
  });

  maybe('uses the cache the build wrote: a run leaves it byte for byte as it was (a rejected cache is rewritten)', () => {
    const { dir, bin, cache } = copy();
    const before = readFileSync(cache);
    closeTo(compute(bin, dir).value, [1, 3]);
    assert.ok(readFileSync(cache).equals(before), 'the cache was rewritten, so V8 rejected it');
  });

  maybe('rewrites a cache that V8 rejects (bytes that are not a code cache) and answers the same', () => {
    const { dir, bin, cache } = copy();
    const junk = Buffer.alloc(4096, 7);
    writeFileSync(cache, junk);
    closeTo(compute(bin, dir).value, [1, 3]);
    const fresh = readFileSync(cache);
    assert.ok(!fresh.equals(junk) && fresh.length > 10_000, 'the rejected cache was not replaced by a real one');
    const again = readFileSync(cache);
    closeTo(compute(bin, dir).value, [1, 3]);
    assert.ok(readFileSync(cache).equals(again), 'the rewritten cache was itself rejected');
  });

  maybe('does not offer V8 a cache older than the bundle (V8 checks only the length), and writes a new one', () => {
    const { dir, bin, bundle, cache } = copy();
    const t = statSync(bundle).mtime;
    utimesSync(cache, new Date(t.getTime() - 10_000), new Date(t.getTime() - 10_000));
    closeTo(compute(bin, dir).value, [1, 3]);
    assert.ok(statSync(cache).mtimeMs >= statSync(bundle).mtimeMs, 'the old cache was left in place');
  });

  maybe('keeps the cache in the user cache folder ($RHOSIGMA_CACHE_DIR) when it cannot be written beside the bundle, and uses it there', () => {
    const { dir, bin, cache } = copy();
    // Something that is not a file in the cache's place stands for a read-only folder (the tests run as
    // root, for whom file modes do not refuse a write): neither readable as a cache nor replaceable.
    rmSync(cache);
    mkdirSync(join(cache, 'in-the-way'), { recursive: true });
    const userDir = join(dir, 'user-cache');
    const env = { ...process.env, RHOSIGMA_CACHE_DIR: userDir };
    const run = () => {
      const r = spawnSync(process.execPath, [bin, 'compute', join(dir, 'one.json')], { encoding: 'utf8', env });
      assert.equal(r.status, 0, `the command failed: ${r.stderr}`);
      closeTo((JSON.parse(r.stdout) as { value: number[] }).value, [1, 3]);
    };
    run();
    const files = readdirSync(userDir);
    assert.equal(files.length, 1, `expected one cache file in the user folder, found ${files.join(', ')}`);
    const userCache = join(userDir, files[0]);
    assert.ok(statSync(userCache).size > 10_000, 'the user-folder cache is not a real code cache');
    assert.equal(readdirSync(join(dir, 'dist/cli')).sort().join(' '), 'bundle.cjs bundle.cjs.cache', 'a temporary file was left beside the bundle');
    const before = readFileSync(userCache);
    run();
    assert.ok(readFileSync(userCache).equals(before), 'the user-folder cache was rewritten, so it was not used (or V8 rejected it)');
  });

  maybe('loads none of child_process, crypto and worker_threads for one request (they load on first use)', () => {
    const { dir, bin } = copy();
    const hook = join(dir, 'modules.cjs');
    writeFileSync(hook, "process.on('exit', () => process.stderr.write(`modules: ${JSON.stringify(process.moduleLoadList)}\\n`));");
    const { stderr } = compute(bin, dir, ['--require', hook]);
    const m = /modules: (.*)/.exec(stderr);
    assert.ok(m, `no module list in ${stderr}`);
    const loaded = JSON.parse(m[1]) as string[];
    for (const name of ['child_process', 'crypto', 'worker_threads']) {
      assert.ok(!loaded.includes(`NativeModule ${name}`), `${name} was loaded at start-up`);
    }
    // The list is the real one: the modules the command does use are in it.
    assert.ok(loaded.includes('NativeModule vm'), 'process.moduleLoadList does not list node:vm, which the launcher uses');
  });

  maybe('runs `sweep --workers 2` on worker threads from the bundle (the compiled dist/sweep/worker.js beside it), with the same bytes as one worker (the sweep\'s determinism contract, docs/sweeps.md)', async () => {
    const { sweepWorkerFile } = await import('../../src/sweep/pool.js');
    // The bundle's own location: the pool module inside it resolves the worker from there.
    assert.equal(sweepWorkerFile(pathToFileURL(join(root, 'dist/cli/bundle.cjs')).href), join(root, 'dist/sweep/worker.js'));
    // A copy of the bundle with no dist/sweep beside it has no worker file: the jobs then run in its own thread.
    const { dir } = copy();
    assert.equal(sweepWorkerFile(pathToFileURL(join(dir, 'dist/cli/bundle.cjs')).href), undefined);
    const spec = JSON.parse(readFileSync(join(root, 'docs/sweeps/strong-subadditivity.json'), 'utf8')) as { samples: number };
    spec.samples = 40;
    writeFileSync(join(dir, 'spec.json'), JSON.stringify(spec));
    const run = (workers: number) => {
      const out = join(dir, `out-${workers}.jsonl`);
      const r = spawnSync(process.execPath, [join(root, 'bin/rhosigma.js'), 'sweep', join(dir, 'spec.json'), '-o', out, '--workers', String(workers)], { encoding: 'utf8' });
      assert.equal(r.status, 0, `the sweep with ${workers} workers failed: ${r.stderr}`);
      return readFileSync(out);
    };
    assert.ok(run(2).equals(run(1)), 'two worker threads wrote other bytes than one');
  });

  maybe('draws the progress bar in a terminal through the cached bundle (a script compiled from V8\'s code cache cannot import(): the bundle holds none)', () => {
    // No import() call is left in the bundle (esbuild turns them into require(); Node 20's vm.Script drops
    // the dynamic-import callback of a script compiled from cached data).
    assert.equal(/\bimport\(\s*["'`]/.exec(readFileSync(join(root, 'dist/cli/bundle.cjs'), 'utf8')), null, 'the bundle still calls import()');
    const dir = mkdtempSync(join(tmpdir(), 'rhosigma-bundle-tty-'));
    const spec = JSON.parse(readFileSync(join(root, 'docs/sweeps/strong-subadditivity.json'), 'utf8')) as { samples: number };
    spec.samples = 20;
    writeFileSync(join(dir, 'spec.json'), JSON.stringify(spec));
    const out = join(dir, 'out.jsonl');
    // util-linux's script(1) gives the command a pseudo-terminal (Debian's essential bsdutils).
    const command = [process.execPath, join(root, 'bin/rhosigma.js'), 'sweep', join(dir, 'spec.json'), '-o', out].map((a) => `'${a}'`).join(' ');
    const r = spawnSync('script', ['-qec', command, '/dev/null'], { encoding: 'utf8' });
    assert.equal(r.status, 0, `the sweep in a terminal failed: ${r.stdout}${r.stderr}`);
    const lines = readFileSync(out, 'utf8').trim().split('\n');
    const { points } = JSON.parse(lines[0]) as { points: number };
    assert.ok(points > 0 && lines.length > points, `${lines.length} lines for ${points} points`);
    assert.ok(r.stdout.includes(`${points}/${points}`), 'no progress bar was drawn');
  });

  maybe('computes a sweep through the bundle, with the spec hash (SHA-256 by @noble/hashes, the spec validator precompiled)', () => {
    const { dir, bin } = copy();
    const spec = JSON.parse(readFileSync(join(root, 'docs/sweeps/strong-subadditivity.json'), 'utf8')) as { samples: number };
    spec.samples = 2;
    writeFileSync(join(dir, 'spec.json'), JSON.stringify(spec));
    const out = join(dir, 'out.jsonl');
    const r = spawnSync(process.execPath, [bin, 'sweep', join(dir, 'spec.json'), '-o', out], { encoding: 'utf8' });
    assert.equal(r.status, 0, `the sweep failed: ${r.stderr}`);
    const header = JSON.parse(readFileSync(out, 'utf8').split('\n')[0]) as { specHash: string; points: number };
    assert.match(header.specHash, /^sha256:[0-9a-f]{64}$/);
    assert.ok(header.points > 0);
  });
});
