#!/usr/bin/env node
// Entry point of the `rhosigma` command; the compiled CLI lives in dist/ (run `npm run build`).
import { existsSync } from 'node:fs';
const target = new URL('../dist/cli/main.js', import.meta.url);
if (!existsSync(target)) {
  process.stderr.write('rhosigma: the compiled engine is missing; run `npm run build` (or bash scripts/setup.sh) first.\n');
  process.exit(2);
}
const { main } = await import(target.href);
process.exitCode = await main(process.argv.slice(2));
