// Shared by the sweep suites: the `rhosigma` command from source in a real process (test/cli/launch.ts),
// a fresh temporary folder per suite, and small specs of our own.
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = fileURLToPath(new URL('../..', import.meta.url));
export const launcher = fileURLToPath(new URL('../cli/launch.ts', import.meta.url));

export interface Run {
  code: number | null;
  stdout: string;
  stderr: string;
}

/** Runs `rhosigma ARGS` from source and waits for it. */
export function rhosigma(args: string[], options: { cwd?: string; input?: string } = {}): Run {
  const r = spawnSync(process.execPath, ['--import', 'tsx', launcher, ...args], {
    cwd: options.cwd ?? root,
    input: options.input,
    encoding: 'utf8',
    env: { ...process.env, NODE_OPTIONS: '' },
    maxBuffer: 256 * 1024 * 1024,
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Starts `rhosigma ARGS` from source without waiting. */
export function startRhosigma(args: string[], cwd = root) {
  return spawn(process.execPath, ['--import', 'tsx', launcher, ...args], { cwd, stdio: ['ignore', 'pipe', 'pipe'] });
}

export function tempFolder(): { dir: string; file: (name: string, content?: unknown) => string; remove: () => void } {
  const dir = mkdtempSync(join(tmpdir(), 'rhosigma-sweep-'));
  return {
    dir,
    file(name, content) {
      const path = join(dir, name);
      if (content !== undefined) writeFileSync(path, typeof content === 'string' ? content : JSON.stringify(content, null, 2));
      return path;
    },
    remove: () => rmSync(dir, { recursive: true, force: true }),
  };
}

/** Data processing of the sandwiched divergence D̃_α = D_{α,z=α} under a random qubit channel. */
export function dataProcessingSpec(alphas: number[], samples: number, seed: number, extra: Record<string, unknown> = {}) {
  const divergence = (rho: string, sigma: string) => ({
    op: 'divergence', family: 'alpha-z', alpha: { $: 'alpha' }, z: { $: 'alpha' }, rho: { $: rho }, sigma: { $: sigma },
  });
  return {
    sweep: 1,
    seed,
    samples,
    parameters: { alpha: { values: alphas } },
    draws: {
      rho: { op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2] },
      sigma: { op: 'random-state', ensemble: 'hilbert-schmidt', dims: [2] },
      N: { op: 'random-channel', kind: 'stinespring', from: [2], to: [2] },
    },
    steps: {
      Nrho: { op: 'apply-channel', channel: { $: 'N' }, rho: { $: 'rho' } },
      Nsigma: { op: 'apply-channel', channel: { $: 'N' }, rho: { $: 'sigma' } },
    },
    inequality: { left: divergence('Nrho', 'Nsigma'), relation: '<=', right: divergence('rho', 'sigma') },
    ...extra,
  };
}
