/**
 * Runs outside references in the checkout's Python environment (.venv/bin/python: numpy, scipy, cvxopt,
 * mpmath from the pinned requirements.txt, installed by scripts/setup.sh) for tests and benchmarks: the input crosses as JSON on stdin, the script prints one JSON value on stdout.
 *
 *  - runPython / runPythonCode: the parsed JSON, or a thrown error carrying python's stderr. A missing
 *    interpreter or module throws PythonUnavailable, anything else a plain Error.
 *  - liveReference: for references that may be missing on a developer's machine (cvxopt): under
 *    CI=true a missing python or module fails the test; otherwise it warns, saying what to install, and
 *    returns undefined. A script that runs and fails for another reason always fails.
 *  - missingPython: why the interpreter or some modules are unavailable (for suites that decide at
 *    registration time which tests exist), or undefined.
 *
 * Deliberately not here: any reference computation (scripts/reference/*.py and the tests' inline
 * scripts), and any fallback to another interpreter (the python3 on PATH is bare). OPENBLAS_NUM_THREADS
 * is set to 1: the machine's cores are shared, and the references are small.
 * Cost: one process start per call (about 0.1–0.3 s with numpy imported).
 */
import assert from 'node:assert/strict';
import { existsSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

/** The interpreter of the checkout's virtual environment (scripts/setup.sh creates it). */
export const PYTHON = fileURLToPath(new URL('../../.venv/bin/python', import.meta.url));

/** A missing interpreter or a module that python could not import. */
export class PythonUnavailable extends Error {}

export interface PythonOptions {
  /** Written to stdin: a string as is, anything else as JSON. */
  input?: unknown;
  /** Milliseconds (default: none). */
  timeout?: number;
  /** Largest stdout in bytes (default 64 MiB). */
  maxBuffer?: number;
}

/** Runs .venv/bin/python with `args` (a script path and its arguments, or ['-c', code]); returns stdout as JSON. */
export function runPython<T = any>(args: readonly string[], options: PythonOptions = {}): T {
  const input = options.input === undefined ? undefined : typeof options.input === 'string' ? options.input : JSON.stringify(options.input);
  const what = args[0] === '-c' ? `${PYTHON} -c <inline script>` : `${PYTHON} ${args.join(' ')}`;
  if (!existsSync(PYTHON)) throw new PythonUnavailable(`${PYTHON} not found`);
  const r = spawnSync(PYTHON, args, {
    input,
    encoding: 'utf8',
    env: { ...process.env, OPENBLAS_NUM_THREADS: '1' },
    timeout: options.timeout,
    maxBuffer: options.maxBuffer ?? 64 * 1024 * 1024,
  });
  if (r.error) {
    const code = (r.error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT' || code === 'EACCES') throw new PythonUnavailable(`${what} could not start: ${r.error.message}`);
    throw new Error(`${what} failed: ${r.error.message}`);
  }
  if (r.status !== 0) {
    const tail = (r.stderr ?? '').trim().slice(-2000);
    if (/\b(ModuleNotFoundError|ImportError)\b/.test(tail)) throw new PythonUnavailable(`${what}: ${tail.split('\n').pop()}`);
    throw new Error(`${what} failed (status ${r.status}): ${tail}`);
  }
  return JSON.parse(r.stdout) as T;
}

/** runPython(['-c', code], { input }). */
export function runPythonCode<T = any>(code: string, input?: unknown, options: Omit<PythonOptions, 'input'> = {}): T {
  return runPython<T>(['-c', code], { ...options, input });
}

/**
 * A live reference: the parsed JSON, or undefined (with a warning on the console) when python or a module
 * is missing outside CI; the caller then returns early. Under CI=true (process.env.CI === 'true') a
 * missing reference fails the test; any other failure of the script fails it everywhere. `install` names
 * what to install ("cvxopt (bash scripts/setup.sh)").
 */
export function liveReference<T = any>(args: readonly string[], install: string, options: PythonOptions = {}): T | undefined {
  try {
    return runPython<T>(args, { timeout: 60_000, ...options });
  } catch (e) {
    if (!(e instanceof PythonUnavailable)) throw e;
    if (process.env.CI === 'true') assert.fail(`${e.message} (CI=true: a missing reference is a failure)`);
    console.warn(`${e.message} — this live check did not run (outside CI only); install ${install} to run it`);
    return undefined;
  }
}

/** Why .venv/bin/python or one of `modules` is unavailable, or undefined when all import. */
export function missingPython(modules: readonly string[]): string | undefined {
  try {
    runPython(['-c', `import json, ${modules.join(', ')}\nprint(json.dumps(None))`]);
    return undefined;
  } catch (e) {
    if (e instanceof PythonUnavailable) return e.message;
    throw e;
  }
}
