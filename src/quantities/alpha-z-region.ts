/**
 * Where the α-z Rényi divergence D_{α,z} is known to satisfy data processing under every channel:
 * the one region test of the engine (the divergence family, the data-processing op and any op about
 * the region call this function, so there is one statement of it to correct).
 *
 * The statement (H. Zhang, "From Wigner-Yanase-Dyson conjecture to Carlen-Frank-Lieb conjecture",
 * Adv. Math. 365, 107053 (2020), Theorem 1.2, which settled the Audenaert–Datta conjecture; recalled
 * from memory and checked against the reading of the ui helper, which agrees): D_{α,z} is monotone
 * under all CPTP maps if and only if
 *   (a) 0 < α < 1 and z ≥ max(α, 1 − α), or
 *   (b) 1 < α ≤ 2 and α/2 ≤ z ≤ α, or
 *   (c) 2 ≤ α < ∞ and α − 1 ≤ z ≤ α.
 * For 1 < α the two clauses are max(α/2, α − 1) ≤ z ≤ α (α/2 ≥ α − 1 exactly when α ≤ 2). The
 * "only if" direction rests on earlier necessary conditions (recalled: Carlen, Frank & Lieb 2018);
 * this module only reports membership. α = 1 is the Umegaki relative entropy for every z (the α → 1
 * limit), which satisfies data processing (Lindblad 1975; Uhlmann 1977); it counts as inside.
 * Boundary points are inside (closed inequalities), decided in exact floating-point comparisons.
 *
 * Used by the ops data-processing (recovery-ops.ts) and data-processing-region (state-ops.ts, which
 * draws the band).
 * Deliberately not here: any numerical test of monotonicity (ops such as data-processing do that).
 * Cost: a few comparisons.
 */

export interface AlphaZRegion {
  inside: boolean;
  /** Which clause decided it, in words. */
  clause: string;
}

/**
 * The z-interval [low, high] of the region at α (high = Infinity when unbounded; at α = 1 every z > 0),
 * or null outside α's range (α ≤ 0, NaN).
 */
export function alphaZBand(alpha: number): { low: number; high: number } | null {
  if (!(alpha > 0)) return null;
  if (alpha < 1) return { low: Math.max(alpha, 1 - alpha), high: Infinity };
  if (alpha === 1) return { low: 0, high: Infinity };
  if (alpha <= 2) return { low: alpha / 2, high: alpha };
  return { low: alpha - 1, high: alpha };
}

/** Membership of (α, z) in the data-processing region of the α-z divergences (header), from the band. */
export function alphaZRegion(alpha: number, z: number): AlphaZRegion {
  const band = Number.isFinite(alpha) ? alphaZBand(alpha) : null;
  if (!band || !(z > 0) || !Number.isFinite(z)) {
    return { inside: false, clause: 'outside the family’s domain (α > 0, z > 0, both finite)' };
  }
  const inside = z >= band.low && z <= band.high;
  if (alpha === 1) return { inside, clause: 'α = 1: the Umegaki relative entropy for every z' };
  if (alpha < 1) return { inside, clause: `0 < α < 1: needs z ≥ max(α, 1 − α) = ${band.low}` };
  if (alpha <= 2) return { inside, clause: `1 < α ≤ 2: needs α/2 ≤ z ≤ α, i.e. ${band.low} ≤ z ≤ ${band.high}` };
  return { inside, clause: `α ≥ 2: needs α − 1 ≤ z ≤ α, i.e. ${band.low} ≤ z ≤ ${band.high}` };
}

/** Whether (α, z) lies in the region (alphaZRegion(α, z).inside). */
export function alphaZDataProcessing(alpha: number, z: number): boolean {
  return alphaZRegion(alpha, z).inside;
}
