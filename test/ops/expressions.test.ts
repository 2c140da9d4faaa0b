// Facts about the restricted expression reader. Sources: complex-number identities from any textbook on
// complex analysis (e.g. Ahlfors, Complex Analysis, ch. 1–2: Euler's identity e^{iπ} = −1, principal square
// root, i² = −1); operator precedence as documented by mathjs 15 ("Syntax" page: ^ binds tighter than unary
// minus and is right-associative); the rest is the reader's own contract (allow-list, error code).
import { describe, it } from '@jest/globals';
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { readExpression, MAX_EXPRESSION_LENGTH } from '../../src/ops/expressions.js';
import { RhoError } from '../../src/errors.js';

function close(a: { re: number; im: number }, b: { re: number; im: number }, tol = 1e-12): boolean {
  return Math.hypot(a.re - b.re, a.im - b.im) <= tol * (1 + Math.hypot(b.re, b.im));
}

function refuses(text: string, path = 'rho.matrix[0][1]'): RhoError {
  try {
    readExpression(text, path);
  } catch (err) {
    assert.ok(err instanceof RhoError, `${text}: threw ${String(err)}`);
    assert.equal(err.code, 'parse-error');
    assert.equal(err.path, path);
    return err;
  }
  assert.fail(`${JSON.stringify(text)} was accepted`);
}

describe('restricted expression reader', () => {
  it('reads a plain decimal literal (the quick path, no parse) as the same double as mathjs\'s parser does for the same literal in parentheses', () => {
    const digits = fc.stringMatching(/^[0-9]{1,17}$/);
    const literal = fc.tuple(fc.constantFrom('', '-', '+'), digits, fc.option(fc.stringMatching(/^[0-9]{0,12}$/)), fc.option(fc.integer({ min: -330, max: 330 })))
      .map(([sign, int, frac, exp]) => `${sign}${int}${frac === null ? '' : `.${frac}`}${exp === null ? '' : `e${exp}`}`);
    const outcome = (t: string) => {
      try {
        return readExpression(t, 'x');
      } catch (err) {
        return (err as RhoError).code; // overflow to ±Infinity: refused both ways
      }
    };
    fc.assert(fc.property(literal, (t) => {
      const quick = outcome(t);
      assert.deepEqual(quick, outcome(`(${t})`), t);
      if (typeof quick === 'object') assert.ok(!Object.is(quick.re, -0), t);
    }), { numRuns: 300 });
    for (const t of ['.5', '-.25e1', '0', '-0', '+0.0', '1e308', '5e-324', '0.1', '123456789012345678901234567890']) {
      assert.deepEqual(readExpression(t, 'x'), readExpression(`(${t})`, 'x'), t);
    }
    // Overflow is still refused with the parser's error, not read as Infinity.
    refuses('1e400');
  });

  it('gives sqrt(-1) = i, the principal square root (textbook)', () => {
    assert.ok(close(readExpression('sqrt(-1)', 'x'), { re: 0, im: 1 }));
  });

  it("satisfies Euler's identity exp(i*pi) = -1 (textbook)", () => {
    assert.ok(close(readExpression('exp(i*pi)', 'x'), { re: -1, im: 0 }, 1e-15));
    assert.ok(close(readExpression('e^(i*pi)', 'x'), { re: -1, im: 0 }, 1e-15));
  });

  it('gives i^2 = -1 exactly and i^-1 = -i (textbook)', () => {
    assert.deepEqual(readExpression('i^2', 'x'), { re: -1, im: 0 });
    assert.ok(close(readExpression('i^-1', 'x'), { re: 0, im: -1 }));
  });

  it('reads the protocol example entries 1/2, i/2, -i/2 (PROTOCOL.md)', () => {
    assert.deepEqual(readExpression('1/2', 'x'), { re: 0.5, im: 0 });
    assert.deepEqual(readExpression('i/2', 'x'), { re: 0, im: 0.5 });
    assert.deepEqual(readExpression('-i/2', 'x'), { re: 0, im: -0.5 });
  });

  it('reads a number written before i as one imaginary literal, as Python reads 2j (Python language reference, "Imaginary literals")', () => {
    assert.deepEqual(readExpression('2i', 'x'), { re: 0, im: 2 });
    assert.deepEqual(readExpression('0.5+0.25i', 'x'), { re: 0.5, im: 0.25 });
    assert.deepEqual(readExpression('0.5-.25i', 'x'), { re: 0.5, im: -0.25 });
    assert.deepEqual(readExpression('1e-3i', 'x'), { re: 0, im: 1e-3 });
    // Python: 1/2j == -0.5j (the literal binds first), and 2i^2 is (2i)^2 = -4 like Python's 2j**2.
    assert.deepEqual(readExpression('1/2i', 'x'), { re: 0, im: -0.5 });
    assert.deepEqual(readExpression('2i^2', 'x'), { re: -4, im: 0 });
    assert.deepEqual(readExpression('exp(3i)', 'x'), readExpression('exp(3*i)', 'x'));
  });

  it('follows mathjs precedence: -2^2 = -4, 2^3^2 = 512 (mathjs 15 syntax documentation)', () => {
    assert.deepEqual(readExpression('-2^2', 'x'), { re: -4, im: 0 });
    assert.deepEqual(readExpression('2^3^2', 'x'), { re: 512, im: 0 });
    assert.deepEqual(readExpression('1 + 2 * 3', 'x'), { re: 7, im: 0 });
  });

  it('evaluates each allowed function at a point with a known value (textbook values)', () => {
    const cases: [string, number, number][] = [
      ['cos(pi)', -1, 0], ['sin(pi/2)', 1, 0], ['tan(pi/4)', 1, 0], ['log(e)', 1, 0], ['log(-1)', 0, Math.PI],
      ['asin(1)', Math.PI / 2, 0], ['acos(-1)', Math.PI, 0], ['atan(1)', Math.PI / 4, 0],
      ['sqrt(-4)', 0, 2], ['sinh(0)', 0, 0], ['cosh(0)', 1, 0], ['tanh(0)', 0, 0], ['conj(1+2*i)', 1, -2], ['abs(3+4*i)', 5, 0],
      ['re(3-4*i)', 3, 0], ['im(3-4*i)', -4, 0], ['exp(0)', 1, 0], ['sqrt(4)', 2, 0],
    ];
    for (const [text, re, im] of cases) assert.ok(close(readExpression(text, 'x'), { re, im }), text);
  });

  it('refuses assignment, function definition, unknown symbols, units, matrices, strings and mathjs internals', () => {
    for (const text of [
      'a = 1', 'f(x) = x^2', 'x + 1', '5 cm', '[1, 2]', '"one"', 'true', 'evaluate("1+1")', 'parse("1")',
      'import({}, {})', 'createUnit("qubit")', 'sqrt', 'sqrt(1, 2)', '3!', '5 mod 2', '1 ? 2 : 3', 'a.b', 'a[1]',
      '{a: 1}', '1 < 2', '1:3', '1; 2', 'constructor', '__proto__', 'toString(1)', '2 i', '2pi', '(1)i', '2ii', '2i(1)', 'Infinity', 'NaN',
      '', '   ', '(', '1 +', 'pi(1)',
    ]) {
      refuses(text);
    }
  });

  it('refuses non-finite results and intermediates (1/0, log(0), exp(1000))', () => {
    refuses('1/0');
    refuses('log(0)');
    refuses('exp(1000)');
    refuses('1/(1/0)');
  });

  it(`refuses strings longer than ${MAX_EXPRESSION_LENGTH} characters`, () => {
    refuses('1+'.repeat(MAX_EXPRESSION_LENGTH) + '1');
    refuses('('.repeat(400) + '1' + ')'.repeat(400));
  });

  it('never throws anything but a parse-error RhoError, whatever the string (property test)', () => {
    const tokens = [
      '1', '0', '2.5', '1e3', 'i', 'pi', 'e', 'x', '+', '-', '*', '/', '^', '(', ')', 'sqrt', 'exp', 'log', 'cos',
      'evaluate', 'import', '=', '"', "'", '[', ']', '{', '}', ',', ';', ':', '.', '!', ' ', 'cm', '?', 'Infinity',
    ];
    const tokenString = fc.array(fc.constantFrom(...tokens), { maxLength: 30 }).map((t) => t.join(''));
    fc.assert(
      fc.property(fc.oneof(fc.string(), fc.string({ unit: 'binary' }), tokenString), (text) => {
        try {
          const z = readExpression(text, 'p');
          return Number.isFinite(z.re) && Number.isFinite(z.im);
        } catch (err) {
          return err instanceof RhoError && err.code === 'parse-error' && err.path === 'p';
        }
      }),
      { numRuns: 2000, seed: 17 },
    );
  });

  it('agrees with direct complex arithmetic on random + - * / trees (property test; common practice)', () => {
    type Z = { re: number; im: number };
    type Tree = { text: string; value: Z | null };
    const leaf: fc.Arbitrary<Tree> = fc.oneof(
      fc.integer({ min: -9, max: 9 }).map((n) => ({ text: n < 0 ? `(${n})` : String(n), value: { re: n, im: 0 } })),
      fc.constant({ text: 'i', value: { re: 0, im: 1 } }),
    );
    const combine = (op: string, a: Tree, b: Tree): Tree => {
      const text = `(${a.text} ${op} ${b.text})`;
      if (!a.value || !b.value) return { text, value: null };
      const x = a.value;
      const y = b.value;
      switch (op) {
        case '+': return { text, value: { re: x.re + y.re, im: x.im + y.im } };
        case '-': return { text, value: { re: x.re - y.re, im: x.im - y.im } };
        case '*': return { text, value: { re: x.re * y.re - x.im * y.im, im: x.re * y.im + x.im * y.re } };
        default: {
          const d = y.re * y.re + y.im * y.im;
          // Near-singular denominators amplify rounding differences; treat them as unusable samples.
          if (d < 1e-6) return { text, value: null };
          return { text, value: { re: (x.re * y.re + x.im * y.im) / d, im: (x.im * y.re - x.re * y.im) / d } };
        }
      }
    };
    const { tree } = fc.letrec<{ tree: Tree }>((tie) => ({
      tree: fc.oneof(
        { depthSize: 'small', withCrossShrink: true },
        leaf,
        fc.tuple(fc.constantFrom('+', '-', '*', '/'), tie('tree'), tie('tree')).map(([op, a, b]) => combine(op, a, b)),
        tie('tree').map((t) => ({ text: `-${t.text}`, value: t.value && { re: -t.value.re, im: -t.value.im } })),
      ),
    }));
    fc.assert(
      fc.property(tree, (t) => {
        fc.pre(t.value !== null && Math.hypot(t.value.re, t.value.im) < 1e12);
        return close(readExpression(t.text, 'p'), t.value!, 1e-9);
      }),
      { numRuns: 500, seed: 5 },
    );
  });
});
