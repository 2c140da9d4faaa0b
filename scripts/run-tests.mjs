#!/usr/bin/env node
// Runs every test suite under test/ with Node's own test runner (TypeScript through tsx).
// Usage: node scripts/run-tests.mjs [substring ...]  — only test files whose path contains one of them.
import { readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { spawnSync } from 'node:child_process';

const root = new URL('..', import.meta.url).pathname;
function walk(dir) {
  const out = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...walk(p));
    else if (name.endsWith('.test.ts')) out.push(p);
  }
  return out;
}
const filters = process.argv.slice(2);
const files = walk(join(root, 'test'))
  .map((f) => relative(root, f))
  .filter((f) => filters.length === 0 || filters.some((s) => f.includes(s)))
  .sort();
if (files.length === 0) {
  console.error('run-tests: no test files matched');
  process.exit(1);
}
const r = spawnSync(process.execPath, ['--import', 'tsx', '--test', '--test-concurrency=2', ...files], {
  cwd: root,
  stdio: 'inherit',
});
process.exit(r.status ?? 1);
