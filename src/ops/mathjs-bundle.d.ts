// Typings for mathjs's single-file bundle, of which src/ops/expressions.ts uses only `parse` and `Complex`
// (mathjs's own typings describe the package root, not this path).
declare module 'mathjs/lib/browser/math.js' {
  const math: { parse: unknown; Complex: unknown };
  export default math;
}
