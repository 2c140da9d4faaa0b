/**
 * The engine's version as sweep headers and the op `sweep-points` report it: the "version" of the
 * package.json beside src/ or dist/ (also beside the command's one-file bundle in dist/cli/).
 *
 * Read through `process.getBuiltinModule` (a property lookup, not an import), so that this module, and the
 * op that uses it, also run in a browser worker, where there is no file to read: there the version is
 * "unknown" (a sweep's rows never depend on it).
 *
 * Deliberately not here: anything else of the sweep file (file.ts). Cost: one small file read per call in Node.
 */
export function engineVersion(): string {
  const fs = (globalThis as { process?: { getBuiltinModule?: (id: string) => unknown } }).process?.getBuiltinModule?.('node:fs') as
    | { readFileSync(path: URL, encoding: 'utf8'): string }
    | undefined;
  if (!fs) return 'unknown';
  // A literal, so that browser bundles (webpack) copy the file it names, unread; the command's bundle and the
  // wheel's (scripts/bundle-cli.mjs) find it two folders up, as the compiled modules do.
  try {
    const pkg = JSON.parse(fs.readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version?: string };
    return pkg.version ?? 'unknown';
  } catch {
    return 'unknown';
  }
}
