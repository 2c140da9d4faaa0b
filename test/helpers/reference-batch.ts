/**
 * Shared by the suites that read a reference batch (a committed JSON file or a live run of a generator in
 * scripts/reference/): cases are named "<group>: <details>", and the suites register one test per group.
 * Deliberately not here: comparison rules (each suite states its own). Cost: O(cases).
 */
export function groupsOf<C extends { name: string }>(cases: readonly C[]): Map<string, C[]> {
  const groups = new Map<string, C[]>();
  for (const c of cases) {
    const g = c.name.split(':')[0];
    if (!groups.has(g)) groups.set(g, []);
    groups.get(g)!.push(c);
  }
  return groups;
}

/** A guesswork case of scripts/reference/cvxopt_guesswork.py (cvxopt's SDP over all guessing orders). */
export interface GuessworkReferenceCase {
  name: string;
  probabilities: number[];
  states: { re: number[][]; im: number[][] }[];
  moment: number;
  value: number;
  /** cvxopt's dual objective (written by the generator; not every suite reads it). */
  dualValue?: number;
  cvxoptStatus: string;
}

/** A batch of those cases with the versions and seed that made it. */
export interface GuessworkReferenceFile {
  cvxopt: string;
  numpy: string;
  seed: number;
  cases: GuessworkReferenceCase[];
}
