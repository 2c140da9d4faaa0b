#!/usr/bin/env node
// Compiles the byte-level reader of numeric matrices in JSON text (src/ops/wasm/json-numbers.as,
// AssemblyScript) and writes it, base64-encoded, into src/ops/wasm/json-numbers.wasm.ts, the generated
// module that src/ops/json-matrices.ts loads. Run by `npm run build:wasm` (part of `npm run build`);
// the generated module is committed, and test/ops/json-matrices.test.ts checks that it equals a fresh
// compile. The source is compiled behind a prelude written here: the Eisel–Lemire table of the 128
// leading bits of 10^e, rounded down, for e in [-348, 347] (exact integer arithmetic with BigInt).
// What it does not do: download anything, or touch any file but the generated module.
// Cost: a few seconds.
//
// Usage: node src/ops/wasm/build.mjs [--check]   (--check: exit 1 if the committed module differs)
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { base64Module, compileAssemblyScript, writeOrCheck } from '../../linalg/wasm/build.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const SOURCE = join(here, 'json-numbers.as');
const TARGET = join(here, 'json-numbers.wasm.ts');

/** The compiler's options; changing them changes the committed bytes. */
export const ASC_FLAGS = ['-O3', '--runtime', 'stub', '--noAssert', '--importMemory', '--noExportMemory'];

export const POW10_MIN = -348;
export const POW10_MAX = 347;

/** The 128 leading bits of 10^e, rounded down (most significant bit set), as a BigInt. */
export function pow10Mantissa(e) {
  const bitLength = (v) => v.toString(2).length;
  if (e >= 0) {
    const v = 10n ** BigInt(e);
    const b = bitLength(v);
    return b > 128 ? v >> BigInt(b - 128) : v << BigInt(128 - b);
  }
  const d = 10n ** BigInt(-e);
  return (1n << BigInt(127 + bitLength(d))) / d;
}

/** The prelude: the table as static data (pairs of u64, low word first) and its exponent range. */
export function prelude() {
  const mask = (1n << 64n) - 1n;
  const words = [];
  for (let e = POW10_MIN; e <= POW10_MAX; e++) {
    const m = pow10Mantissa(e);
    words.push(`0x${(m & mask).toString(16)}`, `0x${(m >> 64n).toString(16)}`);
  }
  const rows = [];
  for (let k = 0; k < words.length; k += 8) rows.push(`  ${words.slice(k, k + 8).join(', ')},`);
  return (
    `const POW10_MIN: i32 = ${POW10_MIN};\nconst POW10_MAX: i32 = ${POW10_MAX};\n` +
    `const POW10: usize = memory.data<u64>([\n${rows.join('\n')}\n]);\n`
  );
}

export async function compileReader() {
  return compileAssemblyScript('json-numbers', prelude() + readFileSync(SOURCE, 'utf8'), ASC_FLAGS);
}

/** The text of the generated module for the given bytes. */
export function generatedModule(bytes) {
  return base64Module(bytes, {
    script: 'src/ops/wasm/build.mjs',
    from: 'json-numbers.as',
    what: 'The reader of numeric matrices in JSON text',
    name: 'JSON_NUMBERS_WASM_BASE64',
    flags: ASC_FLAGS,
  });
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  writeOrCheck(TARGET, generatedModule(await compileReader()), 'src/ops/wasm/json-numbers.wasm.ts');
}
