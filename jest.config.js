// The TypeScript suites run under jest (DESIGN.md), as ES modules: ts-jest transpiles each file on its own
// (isolatedModules; `npm run typecheck` is the type check), relative imports written with ".js" resolve to
// the ".ts" source. scripts/run-tests.mjs starts jest with --experimental-vm-modules.
/** @type {import('jest').Config} */
export default {
  testEnvironment: 'node',
  roots: ['<rootDir>/test'],
  testMatch: ['**/*.test.ts'],
  extensionsToTreatAsEsm: ['.ts'],
  moduleNameMapper: { '^(\\.{1,2}/.*)\\.js$': '$1' },
  transform: {
    '^.+\\.ts$': ['ts-jest', { useESM: true, diagnostics: false }],
  },
  // Suites with live numpy/cvxopt references or a browser take tens of seconds; none hangs.
  testTimeout: 300_000,
  maxWorkers: 2,
};
