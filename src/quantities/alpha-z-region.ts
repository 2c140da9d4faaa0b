/**
 * Where the α-z Rényi divergence D_{α,z} is known to satisfy data processing under every channel:
 * the one region test of the engine (the divergence family, the data-processing op and any op about
 * the region call this function, so there is one statement of it to correct).
 *
 * The statement (H. Zhang, "From WYD to Audenaert–Datta: the monotonicity of α-z Rényi divergences",
 * Adv. Math. 365, 107053 (2020), Theorem 1.2, which settled the Audenaert–Datta conjecture; recalled
 * from memory, not copied): D_{α,z} is monotone under all CPTP maps if and only if
 *   (a) 0 < α < 1 and z ≥ max(α, 1 − α), or
 *   (b) 1 < α ≤ 2 and α/2 ≤ z ≤ α, or
 *   (c) 2 ≤ α < ∞ and α − 1 ≤ z ≤ α.
 * For 1 < α the two clauses are max(α/2, α − 1) ≤ z ≤ α (α/2 ≥ α − 1 exactly when α ≤ 2). The
 * "only if" direction rests on earlier necessary conditions (recalled: Carlen, Frank & Lieb 2018);
 * this module only reports membership. α = 1 is the Umegaki relative entropy for every z (the α → 1
 * limit), which satisfies data processing (Lindblad 1975; Uhlmann 1977); it counts as inside.
 * Boundary points are inside (closed inequalities), decided in exact floating-point comparisons.
 *
 * Deliberately not here: any numerical test of monotonicity (ops such as data-processing do that).
 * Cost: a few comparisons.
 */

export interface AlphaZRegion {
  inside: boolean;
  /** Which clause decided it, in words. */
  clause: string;
}

/** Membership of (α, z) in the data-processing region of the α-z divergences (header). */
export function alphaZRegion(alpha: number, z: number): AlphaZRegion {
  if (!(alpha > 0) || !(z > 0) || !Number.isFinite(alpha) || !Number.isFinite(z)) {
    return { inside: false, clause: 'outside the family’s domain (α > 0, z > 0, both finite)' };
  }
  if (alpha === 1) return { inside: true, clause: 'α = 1: the Umegaki relative entropy for every z' };
  if (alpha < 1) {
    const lo = Math.max(alpha, 1 - alpha);
    return { inside: z >= lo, clause: `0 < α < 1: needs z ≥ max(α, 1 − α) = ${lo}` };
  }
  if (alpha <= 2) return { inside: z >= alpha / 2 && z <= alpha, clause: `1 < α ≤ 2: needs α/2 ≤ z ≤ α, i.e. ${alpha / 2} ≤ z ≤ ${alpha}` };
  return { inside: z >= alpha - 1 && z <= alpha, clause: `α ≥ 2: needs α − 1 ≤ z ≤ α, i.e. ${alpha - 1} ≤ z ≤ ${alpha}` };
}

/** Whether (α, z) lies in the region (alphaZRegion(α, z).inside). */
export function alphaZDataProcessing(alpha: number, z: number): boolean {
  return alphaZRegion(alpha, z).inside;
}
