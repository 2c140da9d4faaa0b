/**
 * Names of the basis vectors for grid headers: |0⟩, |1⟩ for one system; |01⟩ ... for several (a digit per
 * subsystem, first subsystem most significant as in the protocol's Kronecker order; commas when a
 * dimension exceeds 10). Index bookkeeping only, not numerics. Cost: O(n · subsystems).
 */
export function basisNames(dims: readonly number[], n: number): string[] | undefined {
  const product = dims.reduce((a, b) => a * b, 1);
  if (product !== n) return undefined;
  const wide = dims.some((d) => d > 10);
  return Array.from({ length: n }, (_, k) => {
    const digits: number[] = [];
    let rest = k;
    for (let s = dims.length - 1; s >= 0; s--) {
      digits.unshift(rest % dims[s]);
      rest = Math.floor(rest / dims[s]);
    }
    return `|${digits.join(wide ? ',' : '')}⟩`;
  });
}
