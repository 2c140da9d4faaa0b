/**
 * Runs the benchmark modules in bench/: every bench/*.ts except this file and the helper modules in
 * HELPERS, in name order. Each benchmark module exports a default async function taking the
 * remaining command-line arguments.
 *
 * Usage: npm run bench [-- <filter> ...] [-- --slow]
 *   <filter>  run only modules whose file name contains one of the given substrings (e.g. `eigh`).
 *   Arguments starting with `--` are passed through to every module (e.g. `--slow`).
 *
 * Benchmarks print medians and ratios only; they are not tests and assert nothing.
 */
import { readdirSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { dirname, join } from 'node:path';

const here = dirname(fileURLToPath(import.meta.url));
/** Modules of bench/ that benchmarks import and that are not benchmarks themselves. */
const HELPERS = new Set(['run.ts', 'timing.ts']);
const args = process.argv.slice(2);
const filters = args.filter((a) => !a.startsWith('--'));
const flags = args.filter((a) => a.startsWith('--'));
const modules = readdirSync(here)
  .filter((f) => f.endsWith('.ts') && !HELPERS.has(f) && !f.endsWith('.d.ts'))
  .filter((f) => filters.length === 0 || filters.some((s) => f.includes(s)))
  .sort();
if (modules.length === 0) {
  console.error(`bench: no module in bench/ matches ${filters.join(', ')}`);
  process.exit(1);
}
for (const file of modules) {
  const mod = (await import(pathToFileURL(join(here, file)).href)) as { default?: (argv: string[]) => unknown };
  if (typeof mod.default !== 'function') {
    console.error(`bench: ${file} has no default export function; skipped`);
    continue;
  }
  console.log(`\n=== bench/${file} ===`);
  await mod.default(flags);
}
