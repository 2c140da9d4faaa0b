// The embed's prebuilt formulas (src/embed/formulas.generated.ts, scripts/write-formulas.ts) against
// KaTeX itself, the outside reference: the file is what the generator writes now (fails while stale:
// run `npm run schema`), every calculator formula is in it, and each tree written back as markup is
// KaTeX's own MathML markup for that TeX (katex.renderToString, display mode, MathML output; KaTeX's
// markup writes a space character as <mtext>, its DOM output as a text node, which the tree keeps).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import katex from 'katex';
import { FAMILIES } from '../../src/ui/families.js';
import { FORMULAS, type MathTree } from '../../src/embed/formulas.generated.js';
import { FORMULAS_FILE, formulasSource } from '../../scripts/write-formulas.js';

const SPACES = new Set(['\u200a', '\u2009', '\u2005', '\u2005\u200a', '\u200a\u2063', '\u2009\u2063', '\u205f\u2063', '\u2005\u200a\u2063']);
const escape = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

function markup(t: MathTree | string, parentTag = ''): string {
  if (typeof t === 'string') return SPACES.has(t) && parentTag !== 'mtext' ? `<mtext>${t}</mtext>` : escape(t);
  const [tag, attrs, ...children] = t;
  const a = Object.entries(attrs).map(([k, v]) => ` ${k}="${escape(v)}"`).join('');
  if (tag === 'mspace' && children.length === 0) return `<mspace${a}/>`;
  return `<${tag}${a}>${children.map((c) => markup(c, tag)).join('')}</${tag}>`;
}

describe('the embed\'s prebuilt formulas', () => {
  it('are what scripts/write-formulas.ts writes now (run `npm run schema` when this fails)', () => {
    assert.equal(readFileSync(FORMULAS_FILE, 'utf8'), formulasSource());
  });

  it('hold every formula of the divergence calculator, each equal to KaTeX\'s MathML for its TeX', () => {
    for (const f of FAMILIES) {
      assert.ok(Object.hasOwn(FORMULAS, f.tex), f.name);
      const reference = katex.renderToString(f.tex, { displayMode: true, output: 'mathml', throwOnError: false });
      assert.equal(`<span class="katex">${markup(FORMULAS[f.tex])}</span>`, reference, f.name);
    }
  });
});
