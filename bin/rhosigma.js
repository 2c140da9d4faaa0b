#!/usr/bin/env node
// Entry point of the `rhosigma` command: the one-file bundle dist/cli/bundle.mjs when it is there (it
// starts fastest; scripts/bundle-cli.mjs), else the compiled modules in dist/ (run `npm run build`).
import { existsSync } from 'node:fs';
const bundle = new URL('../dist/cli/bundle.mjs', import.meta.url);
const modules = new URL('../dist/cli/main.js', import.meta.url);
const target = existsSync(bundle) ? bundle : modules;
if (!existsSync(target)) {
  process.stderr.write('rhosigma: the compiled engine is missing; run `npm run build` (or bash scripts/setup.sh) first.\n');
  process.exit(2);
}
const { main } = await import(target.href);
process.exitCode = await main(process.argv.slice(2));
