/**
 * "All results in": an app asks for study parts under numbered generations (one per change of
 * their inputs) and holds the newest answer of each; the set is complete when every part holds
 * the generation it was last asked for. Pinning a design or writing a report waits for this.
 */
export interface PartProgress {
  /** Generation each part was last asked for (0: never). */
  wanted: Record<string, number>;
  /** Generation of the result each part holds (0: none yet). */
  held: Record<string, number>;
}

/** True when every part named (default: every part asked for) holds the result of its newest request. */
export function resultsComplete(p: PartProgress, parts: readonly string[] = Object.keys(p.wanted)): boolean {
  return parts.every((k) => (p.held[k] ?? 0) === (p.wanted[k] ?? 0));
}
