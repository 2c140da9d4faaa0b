/**
 * The embed's formulas (replaces src/ui/formula.ts in webpack.embed.config.cjs): the MathML KaTeX wrote
 * at build time for each formula (formulas.generated.ts, scripts/write-formulas.ts), built with
 * createElementNS and text nodes, in the wrapper KaTeX's own output has (span.katex-display > span.katex
 * > span.katex-mathml > math), so the embed's stylesheet treats it as before. Nothing is fetched, and the
 * embed ships no KaTeX; the browser typesets the MathML itself.
 *
 * Deliberately not here: TeX parsing (a formula not in the table is refused: the calculator then shows its
 * TeX source as text). Cost: a few dozen elements per formula.
 */
import { FORMULAS, type MathTree } from './formulas.generated.js';

const MATHML = 'http://www.w3.org/1998/Math/MathML';

function build(tree: MathTree): Element {
  const [tag, attrs, ...children] = tree;
  const node = document.createElementNS(MATHML, tag);
  for (const [k, v] of Object.entries(attrs)) if (k !== 'xmlns') node.setAttribute(k, v);
  for (const c of children) node.append(typeof c === 'string' ? document.createTextNode(c) : build(c));
  return node;
}

/** Always true: nothing to load. */
export function formulasReady(): boolean {
  return true;
}

/** Writes the MathML of `tex` into `target`, replacing its content; rejects for a formula not in the table. */
export async function typesetFormula(target: HTMLElement, tex: string): Promise<void> {
  const tree = Object.hasOwn(FORMULAS, tex) ? FORMULAS[tex] : undefined;
  if (!tree) throw new Error('formula not in the embed table (scripts/write-formulas.ts)');
  const span = (cls: string, child: Node) => {
    const s = document.createElement('span');
    s.className = cls;
    s.append(child);
    return s;
  };
  target.replaceChildren(span('katex-display', span('katex', span('katex-mathml', build(tree)))));
}
