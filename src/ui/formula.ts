/**
 * Typesetting the calculators' defining formulas: KaTeX, loaded with import() on first use (a chunk of
 * its own where the bundler splits), writing its HTML and MathML into the target.
 *
 * The wiki embed replaces this module at build time (webpack.embed.config.cjs) with
 * src/embed/formula-mathml.ts, which writes the same MathML from trees KaTeX made at build time, so the
 * embed ships no KaTeX at all (it shows only the MathML, which the browser typesets itself).
 * Deliberately not here: the formulas (the calculators own them). Cost: KaTeX's load on first use.
 */
let katexModule: Promise<typeof import('katex').default> | null = null;

/** Whether typesetFormula can run without fetching anything (KaTeX already loaded or loading). */
export function formulasReady(): boolean {
  return katexModule !== null;
}

/** Typesets `tex` (display mode) into `target`, replacing its content; rejects if KaTeX cannot load. */
export async function typesetFormula(target: HTMLElement, tex: string): Promise<void> {
  const katex = await (katexModule ??= import(/* webpackChunkName: "katex" */ 'katex').then((m) => m.default));
  katex.render(tex, target, { throwOnError: false, displayMode: true, output: 'htmlAndMathml' });
}
