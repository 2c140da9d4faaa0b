/**
 * The restricted expression reader behind expression matrices (PROTOCOL.md, "Values"): a string such
 * as "1/2", "i/sqrt(2)" or "exp(i*pi/4)/2" becomes one finite complex number.
 *
 * How: mathjs's parser builds the node tree (we do not write a parser of our own), then this module walks
 * the tree itself and accepts only an allow-list: finite numeric literals, the symbols `i`, `pi`, `e`,
 * + − * / (binary), unary minus and plus, ^, parentheses, and the one-argument functions listed in
 * `FUNCTIONS`. The accepted tree is evaluated here with complex.js (re-exported by mathjs as `Complex`),
 * never with mathjs's `evaluate`, so nothing a user writes can reach mathjs's scope, imports or units.
 *
 * Conventions (mathjs's grammar): `^` binds tighter than unary minus (-2^2 = -4) and is right-associative
 * (2^3^2 = 512); functions use principal branches (sqrt(-1) = i, log of a negative real has imaginary part +π);
 * signed zeros are dropped at every step, so -1 is −1 + 0i and never falls on the lower side of a branch cut.
 * A number written directly before i is an imaginary literal, as in Python ("2i", "1/2i" = 1/(2i));
 * any other implicit multiplication ("2 i", "2pi") is refused because its precedence surprises readers.
 *
 * Deliberately not supported: variables, assignment, user functions, units, matrices, strings, booleans,
 * comparisons, factorial, modulo. Every refusal is a RhoError 'parse-error' naming the entry's path.
 * Cost: linear in the length of the string, which is capped at MAX_EXPRESSION_LENGTH characters (about
 * 10 µs per character through mathjs's parser); the first use loads mathjs (about 100 ms).
 */
import { RhoError } from '../errors.js';

/** The part of complex.js's interface used here (mathjs exports the class at run time; its typings do not). */
interface C {
  re: number;
  im: number;
  add(z: C): C;
  sub(z: C): C;
  mul(z: C): C;
  div(z: C): C;
  pow(z: C): C;
  neg(): C;
  sqrt(): C;
  exp(): C;
  log(): C;
  sin(): C;
  cos(): C;
  tan(): C;
  asin(): C;
  acos(): C;
  atan(): C;
  sinh(): C;
  cosh(): C;
  tanh(): C;
  conjugate(): C;
  abs(): number;
}
// mathjs is loaded on first need, not at import: it is most of the engine's start-up time (about 80 ms
// of a cold command's 400), and most requests hold no expression string. Its single-file bundle (an
// export listed in its package.json) loads several times faster than its ESM tree; it is the same parser.
const MATHJS_BUNDLE = 'mathjs/lib/browser/math.js';
let Complex: new (re: number, im: number) => C;
let parse: ((text: string) => unknown) | undefined;

function adopt(module: unknown): void {
  const lib = ((module as { default?: unknown }).default ?? module) as { Complex: typeof Complex; parse: (text: string) => unknown };
  Complex = lib.Complex;
  parse = lib.parse;
}

/** Whether the expression reader is loaded (it loads on first use in Node, or by loadExpressionReader()). */
export function expressionReaderLoaded(): boolean {
  return parse !== undefined;
}

/**
 * Loads the expression reader ahead of need. In Node the reader also loads by itself on first use
 * (synchronously); in a browser or worker, call this (or the engine's warmUp) before `handle` meets an
 * expression string, or answer through `handleAsync`, which does it when a request needs it.
 */
export async function loadExpressionReader(): Promise<void> {
  if (parse || requireInNode()) return;
  // Each webpack build decides where its mathjs parser (./mathjs-parser.ts: the parser and complex numbers
  // only) goes: the wheel's engine, the browser worker and the labextension keep it in their one file (a
  // rule with dynamicImportMode "eager" for this module), the wiki embed's worker loads it as a chunk beside
  // it (rhosigma-embed-expressions.js) on first need.
  adopt(await import(/* webpackChunkName: "expressions" */ './mathjs-parser.js'));
}

/**
 * Node with mathjs beside us (the checkout, the command's bundle): load its single-file bundle synchronously
 * through a CommonJS require (the bundle is UMD). process.getBuiltinModule is a property lookup, not an
 * import, so browser bundles carry no Node built-in for it. False where it cannot (a browser, a bundle run
 * outside the checkout).
 */
function requireInNode(): boolean {
  const nodeModule = (globalThis as { process?: { getBuiltinModule?: (id: string) => unknown } }).process?.getBuiltinModule?.('node:module') as
    | { createRequire(from: string): (id: string) => unknown }
    | undefined;
  if (!nodeModule) return false;
  try {
    adopt(nodeModule.createRequire(import.meta.url)(MATHJS_BUNDLE));
    return true;
  } catch {
    return false;
  }
}

function reader(): (text: string) => unknown {
  if (parse || requireInNode()) return parse!;
  throw new RhoError(
    'internal-error',
    'The expression reader is not loaded here; the engine must call loadExpressionReader() (or warmUp(), or answer through handleAsync) before reading expression strings.',
  );
}

/** An optional sign, digits with an optional point (or a point and digits), an optional exponent; nothing else. */
const PLAIN_DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** Longest expression string accepted. */
export const MAX_EXPRESSION_LENGTH = 500;

const SYMBOLS: Record<string, () => C> = {
  i: () => new Complex(0, 1),
  pi: () => new Complex(Math.PI, 0),
  e: () => new Complex(Math.E, 0),
};

const FUNCTIONS: Record<string, (z: C) => C> = {
  sqrt: (z) => z.sqrt(),
  exp: (z) => z.exp(),
  log: (z) => z.log(),
  sin: (z) => z.sin(),
  cos: (z) => z.cos(),
  tan: (z) => z.tan(),
  asin: (z) => z.asin(),
  acos: (z) => z.acos(),
  atan: (z) => z.atan(),
  sinh: (z) => z.sinh(),
  cosh: (z) => z.cosh(),
  tanh: (z) => z.tanh(),
  conj: (z) => z.conjugate(),
  abs: (z) => new Complex(z.abs(), 0),
  re: (z) => new Complex(z.re, 0),
  im: (z) => new Complex(z.im, 0),
};

const BINARY: Record<string, (a: C, b: C) => C> = {
  add: (a, b) => a.add(b),
  subtract: (a, b) => a.sub(b),
  multiply: (a, b) => a.mul(b),
  divide: (a, b) => {
    if (b.re === 0 && b.im === 0) throw new ExpressionError('division by zero');
    return a.div(b);
  },
  pow: (a, b) => power(a, b),
};

/** Names accepted in expressions, for documentation and error messages. */
export const EXPRESSION_SYMBOLS = Object.keys(SYMBOLS);
export const EXPRESSION_FUNCTIONS = Object.keys(FUNCTIONS);

class ExpressionError extends Error {}

/** a^b; integer exponents by repeated squaring so that i^2 is exactly −1, otherwise exp(b log a). */
function power(a: C, b: C): C {
  if (b.im === 0 && Number.isInteger(b.re) && Math.abs(b.re) <= 1024) {
    let n = Math.abs(b.re);
    let result = new Complex(1, 0);
    let base = a;
    while (n > 0) {
      if (n & 1) result = result.mul(base);
      base = base.mul(base);
      n >>= 1;
    }
    if (b.re < 0) {
      if (result.re === 0 && result.im === 0) throw new ExpressionError('zero raised to a negative power');
      result = new Complex(1, 0).div(result);
    }
    return result;
  }
  if (a.re === 0 && a.im === 0) {
    if (b.re > 0) return new Complex(0, 0);
    throw new ExpressionError('zero raised to a power whose real part is not positive');
  }
  return a.pow(b);
}

interface Node {
  type: string;
  [key: string]: any;
}

function evaluateNode(node: Node, vars: Record<string, C> = {}): C {
  let z: C;
  switch (node.type) {
    case 'ConstantNode': {
      if (typeof node.value !== 'number') throw new ExpressionError(`only numbers are allowed, not ${describeConstant(node.value)}`);
      if (!Number.isFinite(node.value)) throw new ExpressionError('numbers must be finite');
      z = new Complex(node.value, 0);
      break;
    }
    case 'SymbolNode': {
      if (Object.hasOwn(vars, node.name)) {
        z = vars[node.name];
        break;
      }
      const make = Object.hasOwn(SYMBOLS, node.name) ? SYMBOLS[node.name] : undefined;
      if (!make) throw new ExpressionError(`unknown symbol "${node.name}" (allowed: ${EXPRESSION_SYMBOLS.join(', ')})`);
      z = make();
      break;
    }
    case 'ParenthesisNode':
      z = evaluateNode(node.content, vars);
      break;
    case 'OperatorNode': {
      const args: Node[] = node.args;
      if (node.implicit) throw new ExpressionError('write multiplication explicitly (2*i, not 2i)');
      if (args.length === 1 && node.fn === 'unaryMinus') z = evaluateNode(args[0], vars).neg();
      else if (args.length === 1 && node.fn === 'unaryPlus') z = evaluateNode(args[0], vars);
      else if (args.length === 2 && Object.hasOwn(BINARY, node.fn)) {
        z = BINARY[node.fn](evaluateNode(args[0], vars), evaluateNode(args[1], vars));
      } else throw new ExpressionError(`the operator "${node.op}" is not allowed (allowed: + - * / ^)`);
      break;
    }
    case 'FunctionNode': {
      const fn = node.fn as Node;
      const name = fn && fn.type === 'SymbolNode' ? String(fn.name) : undefined;
      if (name === undefined || !Object.hasOwn(FUNCTIONS, name)) {
        throw new ExpressionError(
          `${name === undefined ? 'this call' : `the function "${name}"`} is not allowed (allowed: ${EXPRESSION_FUNCTIONS.join(', ')})`,
        );
      }
      if (node.args.length !== 1) throw new ExpressionError(`${name} takes exactly one argument`);
      z = FUNCTIONS[name](evaluateNode(node.args[0], vars));
      break;
    }
    default:
      throw new ExpressionError(`${describeNode(node.type)} is not allowed; only numbers, i, pi, e, + - * / ^ and functions`);
  }
  if (!Number.isFinite(z.re) || !Number.isFinite(z.im)) throw new ExpressionError('the value is not finite');
  // No signed zeros: -1 must mean −1 + 0i, or log(-1) and sqrt(-4) would land on the far side of the branch cut.
  if (Object.is(z.re, -0) || Object.is(z.im, -0)) z = new Complex(z.re === 0 ? 0 : z.re, z.im === 0 ? 0 : z.im);
  return z;
}

function describeConstant(v: unknown): string {
  if (typeof v === 'string') return 'strings';
  if (typeof v === 'boolean') return 'true/false';
  return String(v);
}

function describeNode(type: string): string {
  switch (type) {
    case 'AssignmentNode':
    case 'FunctionAssignmentNode':
      return 'assignment';
    case 'ArrayNode':
      return 'a matrix or list';
    case 'ObjectNode':
      return 'an object';
    case 'AccessorNode':
    case 'IndexNode':
      return 'indexing or property access';
    case 'ConditionalNode':
      return 'a conditional';
    case 'BlockNode':
      return 'a sequence of expressions';
    case 'RangeNode':
      return 'a range';
    case 'RelationalNode':
      return 'a comparison';
    default:
      return `this construct (${type})`;
  }
}

/**
 * Parse and evaluate one expression string to a finite complex number `{re, im}`.
 * Throws RhoError('parse-error', ..., path) for anything outside the allow-list, any syntax error,
 * any non-finite intermediate or final value, and strings longer than MAX_EXPRESSION_LENGTH.
 */
export function readExpression(text: unknown, path: string): { re: number; im: number } {
  if (typeof text !== 'string') throw new RhoError('parse-error', 'An expression must be a string.', path);
  if (text.length > MAX_EXPRESSION_LENGTH) {
    throw new RhoError('parse-error', `The expression is longer than ${MAX_EXPRESSION_LENGTH} characters.`, path);
  }
  if (text.trim() === '') throw new RhoError('parse-error', 'The expression is empty.', path);
  // A plain decimal literal ("0.4", "-1e-3"), what editors send for most entries: the same double as the
  // parser's path (mathjs reads a numeric literal with Number(); `+ 0` drops a signed zero as evaluateNode
  // does), without the parse: it halves the engine's time for a small matrix of such entries. Anything else,
  // including a literal that overflows to ±Infinity (refused below), goes through the parser.
  if (PLAIN_DECIMAL.test(text)) {
    const x = Number(text) + 0;
    if (Number.isFinite(x)) return { re: x, im: 0 };
  }
  let tree: Node;
  try {
    tree = reader()(imaginaryLiterals(text)) as unknown as Node;
  } catch (err) {
    const why = err instanceof Error ? err.message : String(err);
    throw new RhoError('parse-error', `Cannot read the expression "${clip(text)}": ${clip(why)}.`, path);
  }
  try {
    const z = evaluateNode(tree);
    return { re: z.re, im: z.im };
  } catch (err) {
    if (err instanceof ExpressionError) {
      throw new RhoError('parse-error', `Cannot use the expression "${clip(text)}": ${err.message}.`, path);
    }
    // Anything else (a stack overflow on absurd nesting, a bug) is still the user's input we refuse.
    throw new RhoError('parse-error', `Cannot evaluate the expression "${clip(text)}".`, path);
  }
}

/**
 * Imaginary literals: a number written directly before `i` ("2i", "0.25i", "1e-3i") is one literal, as in
 * Python's "2j" (Python language reference, "Imaginary literals"): "1/2i" is 1/(2i) = −i/2, "0.5+0.25i" is
 * 0.5 + 0.25i. Rewritten as "(2*i)" before mathjs parses, so that mathjs's implicit multiplication, whose
 * precedence surprises ("1/2x" is (1/2)·x there), is still never used: "2 i", "2pi", "(1)i" are refused.
 */
const IMAGINARY_LITERAL = /(?<![\w.])((?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)i(?![\w.(])/g;

function imaginaryLiterals(text: string): string {
  return text.replace(IMAGINARY_LITERAL, '($1*i)');
}

function clip(s: string, n = 80): string {
  return s.length > n ? `${s.slice(0, n)}…` : s;
}

/**
 * A real function of one variable from an expression string in that variable (e.g. "(1+t)/2" in t),
 * with the same allow-list as readExpression plus the variable name (which must not be i, pi or e).
 * Parsed once; a syntax error or a disallowed construct throws RhoError('parse-error', ..., path) at
 * once (the expression is also tried at the variable = 1/2 to surface those). Each call returns the
 * real part, or NaN where the value is undefined (division by zero, non-finite) or has an imaginary
 * part above 1e-12 relative: callers decide what NaN means (a removable singularity, an error).
 */
export function compileRealFunction(text: unknown, variable: string, path: string): (x: number) => number {
  if (typeof text !== 'string') throw new RhoError('parse-error', 'An expression must be a string.', path);
  if (text.length > MAX_EXPRESSION_LENGTH) {
    throw new RhoError('parse-error', `The expression is longer than ${MAX_EXPRESSION_LENGTH} characters.`, path);
  }
  if (text.trim() === '') throw new RhoError('parse-error', 'The expression is empty.', path);
  if (Object.hasOwn(SYMBOLS, variable)) throw new Error(`compileRealFunction: "${variable}" is a reserved symbol`);
  let tree: Node;
  try {
    tree = reader()(text) as unknown as Node;
  } catch (err) {
    const why = err instanceof Error ? err.message : String(err);
    throw new RhoError('parse-error', `Cannot read the expression "${clip(text)}": ${clip(why)}.`, path);
  }
  const at = (x: number): C => {
    const vars: Record<string, C> = { [variable]: new Complex(x, 0) };
    return evaluateNode(tree, vars);
  };
  try {
    at(0.5);
  } catch (err) {
    if (err instanceof ExpressionError && !/division by zero|not finite|zero raised/.test(err.message)) {
      const why = err.message.replace(`(allowed: ${EXPRESSION_SYMBOLS.join(', ')})`, `(allowed: ${[...EXPRESSION_SYMBOLS, variable].join(', ')})`);
      throw new RhoError('parse-error', `Cannot use the expression "${clip(text)}": ${why}.`, path);
    }
    if (!(err instanceof ExpressionError)) throw new RhoError('parse-error', `Cannot evaluate the expression "${clip(text)}".`, path);
  }
  return (x: number): number => {
    try {
      const z = at(x);
      return Math.abs(z.im) <= 1e-12 * Math.max(Math.abs(z.re), 1e-300) ? z.re : NaN;
    } catch {
      return NaN;
    }
  };
}
