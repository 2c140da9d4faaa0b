/**
 * The part of mathjs that the expression reader (./expressions.ts) uses in browsers: its parser and its
 * complex numbers, made with mathjs's own `create()` from just their factories, so that the bundles that
 * load it (the wiki embed's expressions chunk, the page worker, the labextension, the Python wheel's engine)
 * carry about 90 kB gzip of mathjs instead of the whole library's 172 kB. The parser is the same code as
 * the full library's; Node loads the full single-file bundle instead (faster to load; see expressions.ts).
 *
 * Deliberately not here: evaluation (expressions.ts walks the tree itself). Cost: mathjs's load, once.
 */
import { create, parseDependencies, ComplexDependencies } from 'mathjs';

const math = create({ parseDependencies, ComplexDependencies });

export const parse = math.parse;
// The class is exported at run time; mathjs's typings name only the `complex` function.
export const Complex = (math as unknown as { Complex: unknown }).Complex;
