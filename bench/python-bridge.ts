/**
 * Benchmark of the headless Python path (issue 8's goal: a request after start-up costs under 2 ms
 * beyond the engine's own time). Not a test; asserts nothing.
 *
 * WHAT IS COMPARED, on the same requests in the same run:
 *  - Python: kernel-bridge/bench_overhead.py times `rhosigma.compute(request)` (numpy in, Answer out)
 *    against the long-lived `rhosigma serve` process: the conversion to the protocol (large matrices
 *    packed), JSON, the pipe both ways, the engine's line handling and handle(), the JSON answer back
 *    and its conversion. Median of K calls after a warm-up of at least 1 s. Beside it the package's own
 *    CPU time per request (encoding and decoding only, process time: steady under other load).
 *  - A Node client of its own: the same request lines written to a fresh `rhosigma serve` from this
 *    process, one at a time, median round trip of K after the warm-up. Python minus this column is
 *    what the Python package adds; this column minus the next is the serve process's transport
 *    (pipe, line reading, JSON.parse/stringify).
 *  - The engine's own time: handle() on the very requests the Python side sent (as JSON data, packed
 *    matrices included), in this process, after the same kind of warm-up; median of K calls.
 * "added" = Python − handle(): what the headless path costs beyond the engine's own time. R rounds,
 * each a fresh Python process (fresh engine), then the Node client, then the in-process timing;
 * printed per round, then the median over rounds.
 *
 * Usage: npm run bench -- python-bridge [-- --slow]   (--slow: more rounds)
 */
import { spawn, spawnSync } from 'node:child_process';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import { PYTHON } from '../test/helpers/python.js';
import '../src/ops/all.js';
import { handle } from '../src/ops/handle.js';
import { median, timeCalls, warmUp } from './timing.js';

const root = fileURLToPath(new URL('..', import.meta.url));
const script = `${root}kernel-bridge/bench_overhead.py`;
const K = 200;
const GOAL_MS = 2;

interface PythonCase {
  name: string;
  request: unknown;
  medianMs: number;
  pythonCpuMs: number;
}

function pythonRound(): PythonCase[] {
  const out = spawnSync(PYTHON, [script, String(K)], {
    encoding: 'utf8',
    env: { ...process.env, OPENBLAS_NUM_THREADS: '1' },
    maxBuffer: 1 << 28,
  });
  if (out.status !== 0) throw new Error(`bench_overhead.py failed: ${out.stderr}`);
  return (JSON.parse(out.stdout) as { cases: PythonCase[] }).cases;
}

/** Median round trip of K requests through a fresh `rhosigma serve`, from this process, after warm-up. */
async function serveMedian(request: unknown): Promise<number> {
  const child = spawn(process.execPath, [`${root}bin/rhosigma.js`, 'serve'], { stdio: ['pipe', 'pipe', 'inherit'] });
  const lines = createInterface({ input: child.stdout })[Symbol.asyncIterator]();
  await lines.next(); // the ready line
  const text = `${JSON.stringify(request)}\n`;
  const once = async (): Promise<number> => {
    const t0 = performance.now();
    child.stdin.write(text);
    await lines.next();
    return performance.now() - t0;
  };
  const warmEnd = performance.now() + 1000;
  for (let n = 0; n < 50 || performance.now() < warmEnd; n++) await once();
  const ts: number[] = [];
  for (let k = 0; k < K; k++) ts.push(await once());
  child.stdin.end();
  await new Promise((resolve) => child.once('exit', resolve));
  return median(ts);
}

function engineMedian(request: unknown): number {
  warmUp(() => handle(request), 50, 1000);
  return timeCalls(() => handle(request), K);
}

export default async function run(flags: string[]): Promise<void> {
  const rounds = flags.includes('--slow') ? 7 : 3;
  const perCase = new Map<string, { py: number[]; cpu: number[]; node: number[]; engine: number[] }>();
  const f = (x: number) => x.toFixed(3).padStart(8);
  const header = `  ${'case'.padEnd(36)} ${'python'.padStart(8)} ${'py CPU'.padStart(8)} ${'node→serve'.padStart(10)} ${'handle()'.padStart(8)} ${'added'.padStart(8)}`;
  for (let r = 0; r < rounds; r++) {
    const cases = pythonRound();
    console.log(`round ${r + 1} (ms, medians of ${K}):\n${header}`);
    for (const c of cases) {
      const n = await serveMedian(c.request);
      const e = engineMedian(c.request);
      const slot = perCase.get(c.name) ?? { py: [], cpu: [], node: [], engine: [] };
      slot.py.push(c.medianMs);
      slot.cpu.push(c.pythonCpuMs);
      slot.node.push(n);
      slot.engine.push(e);
      perCase.set(c.name, slot);
      console.log(`  ${c.name.padEnd(36)} ${f(c.medianMs)} ${f(c.pythonCpuMs)} ${f(n).padStart(10)} ${f(e)} ${f(c.medianMs - e)}`);
    }
  }
  console.log(`\nmedian over ${rounds} rounds; added = python − handle(), goal < ${GOAL_MS} ms; python − node→serve is the Python package's own share:`);
  console.log(`${header}  python/node→serve`);
  for (const [name, { py, cpu, node, engine }] of perCase) {
    const p = median(py);
    const c = median(cpu);
    const n = median(node);
    const e = median(engine);
    console.log(`  ${name.padEnd(36)} ${f(p)} ${f(c)} ${f(n).padStart(10)} ${f(e)} ${f(p - e)}  ${(p / n).toFixed(2)}×`);
  }
}
