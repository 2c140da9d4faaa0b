// The layering rule of DESIGN.md and docs/surfaces.md: the front end (src/ui, src/widgets, src/lab,
// src/embed, src/worker/client.ts) imports the engine (src/linalg, quantum, quantities, sdp, oneshot,
// recovery, guessing, ops, and the engine's own top-level modules) only with `import type`, so that no
// numerics reach the page's main thread; and the engine never imports the front end or the DOM layer.
// The project's own rule (no published source); the check reads the sources with TypeScript's parser.
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const FRONT = ['src/ui', 'src/widgets', 'src/lab', 'src/embed', 'src/worker/client.ts'];
const ENGINE = ['src/linalg', 'src/quantum', 'src/quantities', 'src/sdp', 'src/oneshot', 'src/recovery', 'src/guessing', 'src/ops', 'src/errors.ts', 'src/limits.ts', 'src/deadline.ts', 'src/index.ts', 'src/worker/engine-worker.ts'];

function files(p: string): string[] {
  const abs = join(root, p);
  if (!existsSync(abs)) return [];
  if (statSync(abs).isFile()) return [abs];
  return readdirSync(abs).flatMap((f) => files(join(p, f))).filter((f) => f.endsWith('.ts'));
}

/** Imports and re-exports of a file: the resolved target and whether the whole statement is type-only. */
function importsOf(file: string): { target: string; typeOnly: boolean; line: number }[] {
  const src = ts.createSourceFile(file, readFileSync(file, 'utf8'), ts.ScriptTarget.ES2022, true);
  const out: { target: string; typeOnly: boolean; line: number }[] = [];
  src.forEachChild((node) => {
    let spec: ts.Expression | undefined;
    let typeOnly = false;
    if (ts.isImportDeclaration(node)) {
      spec = node.moduleSpecifier;
      const clause = node.importClause;
      typeOnly = !!clause && (clause.isTypeOnly || (!clause.name && !!clause.namedBindings && ts.isNamedImports(clause.namedBindings) && clause.namedBindings.elements.length > 0 && clause.namedBindings.elements.every((e) => e.isTypeOnly)));
    } else if (ts.isExportDeclaration(node) && node.moduleSpecifier) {
      spec = node.moduleSpecifier;
      typeOnly = node.isTypeOnly;
    }
    if (spec && ts.isStringLiteral(spec) && spec.text.startsWith('.')) {
      const target = relative(root, resolve(dirname(file), spec.text.replace(/\.js$/, '.ts')));
      out.push({ target, typeOnly, line: src.getLineAndCharacterOfPosition(node.getStart()).line + 1 });
    }
  });
  return out;
}

const inside = (target: string, areas: string[]) => areas.some((a) => target === a || target.startsWith(`${a}/`));

describe('layering', () => {
  it('the front end imports engine modules only with `import type`', () => {
    const bad: string[] = [];
    const front = FRONT.flatMap(files);
    assert.ok(front.length >= 10, `only ${front.length} front-end files found`);
    for (const f of front) {
      for (const imp of importsOf(f)) {
        if (inside(imp.target, ENGINE) && !imp.typeOnly) bad.push(`${relative(root, f)}:${imp.line} imports ${imp.target} for its values`);
      }
    }
    assert.deepEqual(bad, []);
  });

  it('the engine imports nothing of the front end', () => {
    const bad: string[] = [];
    for (const f of ENGINE.flatMap(files)) {
      for (const imp of importsOf(f)) if (inside(imp.target, FRONT)) bad.push(`${relative(root, f)}:${imp.line} imports ${imp.target}`);
    }
    assert.deepEqual(bad, []);
  });

  it('the check sees a value import for what it is (the rule could fail)', () => {
    const probe = importsOf(join(root, 'src/worker/engine-worker.ts'));
    assert.ok(probe.some((i) => i.target === 'src/ops/handle.ts' && !i.typeOnly));
  });
});
