/** Whether the partitions of one interval version overlap: one patient must find one partition. */

export interface VersionPartitionScope {
  sex: "F" | "M" | null;
  /** Half-open [ageFromDays, ageToDays); null for no bound. */
  ageFromDays: number | null;
  ageToDays: number | null;
}

/**
 * Two partitions overlap when some patient belongs to both: their sexes meet (equal, or either
 * unrestricted) and their half-open age ranges meet.
 * @example partitionsOverlap({ sex: "F", ageFromDays: 0, ageToDays: 6575 }, { sex: null, ageFromDays: 6575, ageToDays: null }) // false
 */
export function partitionsOverlap(a: VersionPartitionScope, b: VersionPartitionScope): boolean {
  if (a.sex !== null && b.sex !== null && a.sex !== b.sex) return false;
  const aFrom = a.ageFromDays ?? -Infinity;
  const bFrom = b.ageFromDays ?? -Infinity;
  const aTo = a.ageToDays ?? Infinity;
  const bTo = b.ageToDays ?? Infinity;
  return aFrom < bTo && bFrom < aTo;
}

/** The first pair of positions (0-based) that overlap, or null. */
export function firstOverlap(scopes: readonly VersionPartitionScope[]): [number, number] | null {
  for (let i = 0; i < scopes.length; i++) {
    for (let j = i + 1; j < scopes.length; j++) if (partitionsOverlap(scopes[i], scopes[j])) return [i, j];
  }
  return null;
}
