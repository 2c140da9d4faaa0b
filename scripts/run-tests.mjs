#!/usr/bin/env node
// Runs every TypeScript test suite under test/ with jest (ES modules through ts-jest; jest.config.js).
// Usage: node scripts/run-tests.mjs [substring ...]  — only test files whose path contains one of them.
import { spawnSync } from 'node:child_process';

const root = new URL('..', import.meta.url).pathname;
const jest = new URL('node_modules/jest/bin/jest.js', new URL('..', import.meta.url)).pathname;
const filters = process.argv.slice(2).map((s) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&'));
const r = spawnSync(process.execPath, ['--experimental-vm-modules', '--no-warnings=ExperimentalWarning', jest, '--ci', ...(filters.length ? ['--testPathPatterns', filters.join('|')] : [])], {
  cwd: root,
  stdio: 'inherit',
});
process.exit(r.status ?? 1);
