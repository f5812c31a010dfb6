import { AppError } from "@/lib/api/errors";

/** The states of an interval version (DESIGN.md, "Interval version states"). */
export type IntervalVersionState = "draft" | "awaiting_signoff" | "in_force" | "superseded" | "withdrawn";

/**
 * Whether an analyte's unit and display decimals are locked. They are, as soon as any of its
 * interval versions has left draft: a version awaiting sign-off, signed, superseded or withdrawn
 * states its limits in that unit with those decimals, and changing either afterwards would
 * silently change what was signed. Drafts are still editable, so they do not lock anything.
 *
 * updateAnalyte in db/queries/analytes.ts is the one caller: it passes the states of the
 * analyte's versions, read in its transaction.
 */
export function unitAndDecimalsLocked(versionStates: readonly IntervalVersionState[]): boolean {
  return versionStates.some((state) => state !== "draft");
}

/**
 * Refuses a change of unit or decimals while they are locked, with a message that says why and
 * what to do instead. Changes that leave both as they are always pass.
 */
export function assertUnitAndDecimalsChangeable({
  code,
  current,
  next,
  versionStates,
}: {
  code: string;
  current: { unit: string; decimals: number };
  next: { unit?: string; decimals?: number };
  versionStates: readonly IntervalVersionState[];
}): void {
  const unitChanges = next.unit !== undefined && next.unit !== current.unit;
  const decimalsChange = next.decimals !== undefined && next.decimals !== current.decimals;
  if (!(unitChanges || decimalsChange) || !unitAndDecimalsLocked(versionStates)) return;
  const what = unitChanges && decimalsChange ? "unit and display decimals" : unitChanges ? "unit" : "display decimals";
  throw new AppError(
    "conflict",
    `The ${what} of ${code} cannot change: an interval version of ${code} has left draft and states its limits in ${current.unit} with ${current.decimals} decimals. Create a new analyte code for the new unit instead.`,
  );
}
