/**
 * Subsystem groups typed as text ("0", "0, 1", or labels "A, B") → the protocol's systems list (indices
 * as numbers, labels as strings); the engine checks them against the state. Cost: linear in the text.
 */
export function parseSystems(text: string): (number | string)[] {
  return text.split(/[\s,;]+/).filter((s) => s.length > 0).map((s) => (/^\d+$/.test(s) ? Number(s) : s));
}

export function systemsText(systems: readonly (number | string)[]): string {
  return systems.join(', ');
}
