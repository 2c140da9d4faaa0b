// Types of scripts/bundle-engine.mjs for the TypeScript tests that import it.
/** Bundles test/browser/engine-worker.ts for the browser and copies the test page into outDir. */
export function bundleEngine(outDir: string): Promise<{ files: string[]; bytes: number }>;
