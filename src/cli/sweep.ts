/**
 * The `rhosigma sweep` commands (docs/sweeps.md):
 *
 *   rhosigma sweep SPEC [-o OUT] [--workers N] [--shard k/N]   run (or resume) a sweep into JSON Lines
 *   rhosigma sweep merge SHARD... [-o OUT]                      join shard outputs into one run's file
 *   rhosigma sweep summary FILE [--json]                        minimum, maximum, failures, violations
 *   rhosigma sweep plot FILE [-o OUT.svg] [--x P] [--y F] [--color P]   an SVG plot (Vega-Lite, rendered in Node)
 *   rhosigma sweep replay FILE (--index I | --refined R)        the requests that reproduce a line
 *   rhosigma sweep schema                                       the JSON Schema of a spec
 *
 * Exit codes: 0 done (every point answered); 1 done, with failed points recorded as failure lines; 2 a bad
 * spec, file or command line (nothing computed); 130 interrupted (run the same command again to resume).
 * A progress bar with rate and ETA goes to standard error when it is a terminal; a one-line summary always.
 * Deliberately not here: any numerics or file format (src/sweep). Cost: that of the sweep.
 */
import { readFile, writeFile } from 'node:fs/promises';
import { basename, extname, dirname, join } from 'node:path';
import type { Command } from 'commander';
import type cliProgress from 'cli-progress';
import { RhoError } from '../errors.js';
import { readSpec, specSchemaText } from '../sweep/spec.js';
import { runSweep } from '../sweep/runner.js';
import { mergeShards } from '../sweep/merge.js';
import { summarize, formatSummary } from '../sweep/summary.js';
import { readSweepFile, type Shard } from '../sweep/file.js';
import { evaluatePoint } from '../sweep/point.js';
import '../sweep/op.js';
import type { Io } from './main.js';

function fail(io: Io, err: unknown): number {
  if (err instanceof RhoError) {
    io.stderr.write(`rhosigma sweep: ${err.path ? `${err.path}: ` : ''}${err.message}\n`);
    return 2;
  }
  io.stderr.write(`rhosigma sweep: ${err instanceof Error ? err.message : String(err)}\n`);
  return 2;
}

function parseShard(text: string | undefined): Shard | undefined {
  if (text === undefined) return undefined;
  const m = /^(\d+)\/(\d+)$/.exec(text);
  if (!m || Number(m[1]) >= Number(m[2]) || Number(m[2]) < 1) {
    throw new RhoError('invalid-argument', `--shard takes k/N with 0 ≤ k < N (e.g. 0/4 … 3/4), not "${text}".`);
  }
  return { index: Number(m[1]), count: Number(m[2]) };
}

function parseWorkers(text: string | undefined): number {
  if (text === undefined) return 1;
  const n = Number(text);
  if (!Number.isInteger(n) || n < 0 || n > 256) throw new RhoError('invalid-argument', `--workers takes a whole number from 0 to 256, not "${text}".`);
  return n;
}

function defaultOutput(specPath: string, shard?: Shard): string {
  const stem = basename(specPath, extname(specPath));
  return join(dirname(specPath), shard && shard.count > 1 ? `${stem}.shard-${shard.index}-of-${shard.count}.jsonl` : `${stem}.jsonl`);
}

async function readJsonFile(path: string, what: string): Promise<unknown> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (err) {
    throw new RhoError('invalid-argument', `Cannot read the ${what} ${path}: ${(err as NodeJS.ErrnoException).code ?? String(err)}.`);
  }
  try {
    return JSON.parse(text);
  } catch (err) {
    throw new RhoError('parse-error', `The ${what} ${path} is not JSON: ${err instanceof Error ? err.message : String(err)}.`);
  }
}

async function run(specPath: string, opts: { output?: string; workers?: string; shard?: string }, io: Io): Promise<number> {
  let spec, shard, workers;
  try {
    spec = readSpec(await readJsonFile(specPath, 'sweep spec'));
    shard = parseShard(opts.shard);
    workers = parseWorkers(opts.workers);
  } catch (err) {
    return fail(io, err);
  }
  const output = opts.output ?? defaultOutput(specPath, shard);
  const tty = (io.stderr as { isTTY?: boolean }).isTTY === true;
  let bar: cliProgress.SingleBar | undefined;
  const t0 = performance.now();
  let firstDone = -1;
  if (tty) {
    // Loaded on first need: a command that never draws a bar (every engine request) does not pay for it.
    const { default: progress } = await import('cli-progress');
    bar = new progress.SingleBar(
      {
        stream: io.stderr as NodeJS.WriteStream,
        format: 'sweep [{bar}] {percentage}% | {value}/{total} | {rate} points/s | ETA {eta_formatted}',
        hideCursor: true,
        clearOnComplete: true,
        fps: 5,
      },
      progress.Presets.shades_classic,
    );
  }
  let interrupted = false;
  const onSigint = () => {
    interrupted = true;
  };
  process.once('SIGINT', onSigint);
  try {
    const result = await runSweep(spec, {
      output,
      workers,
      shard,
      stopping: () => interrupted,
      onProgress: bar
        ? (done, total) => {
            if (firstDone < 0) {
              firstDone = done;
              bar!.start(total, done, { rate: '—' });
              return;
            }
            const seconds = (performance.now() - t0) / 1000;
            bar!.update(done, { rate: seconds > 0 ? ((done - firstDone) / seconds).toFixed(1) : '—' });
          }
        : undefined,
    });
    bar?.stop();
    const rate = result.written > 0 && result.seconds > 0 ? `, ${(result.written / result.seconds).toFixed(1)} lines/s` : '';
    const what = `${result.points} points${result.refined ? ` and ${result.refined} refined` : ''} (${result.failures} failed, ${result.violations} violations${result.stoppedAt !== undefined ? `, stopped at the first violation, point ${result.stoppedAt}` : ''})`;
    if (result.interrupted) {
      io.stderr.write(`rhosigma sweep: interrupted with ${what} in ${output}; run the same command again to resume.\n`);
      return 130;
    }
    const resumed = result.resumed > 0 ? (result.written > 0 ? ` (resumed after ${result.resumed} lines)` : ' (already complete)') : '';
    io.stderr.write(`rhosigma sweep: ${what} in ${output}${resumed}${rate}.\n`);
    return result.failures > 0 ? 1 : 0;
  } catch (err) {
    bar?.stop();
    return fail(io, err);
  } finally {
    process.removeListener('SIGINT', onSigint);
  }
}

async function writeOut(text: string, output: string | undefined, io: Io): Promise<void> {
  if (output === undefined) io.stdout.write(text);
  else await writeFile(output, text);
}

/** Adds `sweep` and its subcommands to the program. */
export function addSweepCommands(program: Command, io: Io, setCode: (code: number) => void): void {
  const sweep = program
    .command('sweep')
    .description('Run a sweep or a counterexample search from a spec file into JSON Lines (resumable); see the subcommands.')
    .argument('[spec]', 'the sweep spec (JSON); docs/sweeps.md')
    .option('-o, --output <file>', 'the output file (JSON Lines); default SPEC with .jsonl')
    .option('--workers <n>', 'worker threads (0: in this thread)', '1')
    .option('--shard <k/N>', 'run only the points with index ≡ k (mod N), k = 0..N−1')
    .addHelpText(
      'after',
      `
Run again with the same arguments after an interruption: the run resumes, losing and duplicating nothing.
Exit code: 0 done; 1 done with failed points (recorded as failure lines); 2 a bad spec or command line;
130 interrupted.

Examples:
  rhosigma sweep dpi.json --workers 2
  rhosigma sweep dpi.json --shard 0/4 -o part0.jsonl      (one of four array-job tasks)
  rhosigma sweep merge part*.jsonl -o dpi.jsonl
  rhosigma sweep summary dpi.jsonl
  rhosigma sweep plot dpi.jsonl -o dpi.svg
  rhosigma sweep replay dpi.jsonl --index 17 | rhosigma compute`,
    )
    .action(async (specPath: string | undefined, opts: { output?: string; workers?: string; shard?: string }) => {
      if (specPath === undefined) {
        sweep.outputHelp({ error: true });
        setCode(2);
        return;
      }
      setCode(await run(specPath, opts, io));
    });

  sweep
    .command('merge')
    .description('Join the outputs of --shard 0/N … (N−1)/N into exactly the file one run writes.')
    .argument('<shards...>', 'the shard outputs, in any order')
    .option('-o, --output <file>', 'write here instead of standard output')
    .action(async (shards: string[], _opts: unknown, cmd: Command) => {
      // -o after the subcommand may have been taken by `sweep` itself: read both levels.
      const opts = cmd.optsWithGlobals() as { output?: string };
      try {
        await writeOut(mergeShards(shards), opts.output, io);
        setCode(0);
      } catch (err) {
        setCode(fail(io, err));
      }
    });

  sweep
    .command('summary')
    .description('Minimum and maximum of the values and gaps, the failures, and the violations with their reproducers.')
    .argument('<file>', 'a sweep output')
    .option('--json', 'print the summary as JSON')
    .action((file: string, opts: { json?: boolean }) => {
      try {
        const s = summarize(readSweepFile(file));
        io.stdout.write(opts.json ? `${JSON.stringify(s, null, 2)}\n` : formatSummary(s, file));
        setCode(0);
      } catch (err) {
        setCode(fail(io, err));
      }
    });

  sweep
    .command('plot')
    .description('An SVG plot of a sweep output (Vega-Lite, rendered in Node).')
    .argument('<file>', 'a sweep output')
    .option('-o, --output <file>', 'the SVG file; default standard output')
    .option('--x <name>', 'the parameter on the x axis (default: the first parameter, else the point index)')
    .option('--y <field>', 'value, gap, left or right (default: gap when the spec has an inequality, else value)')
    .option('--color <name>', 'a parameter to colour the points by (default: the second parameter, if any)')
    .option('--vega-lite', 'print the Vega-Lite specification instead of the SVG')
    .action(async (file: string, _opts: unknown, cmd: Command) => {
      const opts = cmd.optsWithGlobals() as { output?: string; x?: string; y?: string; color?: string; vegaLite?: boolean };
      try {
        // vega and vega-lite are loaded only for a plot (they are most of the command's code by size).
        const { plotSvg } = await import('../sweep/plot.js');
        const { svg, vegaLite } = await plotSvg(readSweepFile(file), { x: opts.x, y: opts.y, color: opts.color });
        await writeOut(opts.vegaLite ? `${JSON.stringify(vegaLite, null, 2)}\n` : svg, opts.output, io);
        setCode(0);
      } catch (err) {
        setCode(fail(io, err));
      }
    });

  sweep
    .command('replay')
    .description('Print the requests that reproduce a point or a refinement (a JSON array for `rhosigma compute`).')
    .argument('<file>', 'a sweep output')
    .option('--index <i>', 'the point with this index')
    .option('--refined <r>', 'the refinement of this rank (search mode)')
    .action((file: string, opts: { index?: string; refined?: string }) => {
      try {
        if ((opts.index === undefined) === (opts.refined === undefined)) throw new RhoError('invalid-argument', 'Give --index I or --refined R.');
        const parsed = readSweepFile(file);
        const want = Number(opts.index ?? opts.refined);
        const row = parsed.lines.find(({ value: v }) => (opts.index !== undefined ? v.index === want && v.refined === undefined : v.refined === want));
        if (!row) throw new RhoError('invalid-argument', `${file} has no ${opts.index !== undefined ? `point ${want}` : `refinement ${want}`}.`);
        let requests = row.value.reproduce ?? (row.value.failed?.request ? [row.value.failed.request] : undefined);
        if (!requests) {
          // Not a violation: rebuild the point's requests from the spec (the same evaluation the sweep made).
          requests = replayRequests(parsed.header.spec, want);
        }
        io.stdout.write(`${JSON.stringify(requests)}\n`);
        setCode(0);
      } catch (err) {
        setCode(fail(io, err));
      }
    });

  sweep
    .command('schema')
    .description('Print the JSON Schema of a sweep spec.')
    .action(() => {
      io.stdout.write(specSchemaText());
      setCode(0);
    });
}

function replayRequests(source: unknown, index: number): unknown {
  const spec = readSpec(source);
  if (!(Number.isInteger(index) && index >= 0 && index < spec.total)) throw new RhoError('invalid-argument', `The sweep has no point ${index}.`);
  return evaluatePoint(spec, index).requests;
}
