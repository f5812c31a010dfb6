import "server-only";
import { asc, desc, eq } from "drizzle-orm";
import type { Executor } from "../client";
import { analytes, intervalVersions, type VersionState } from "../schema";

export interface AnalyteVersionStates {
  code: string;
  /** Every version's state, newest number first (empty when the analyte has none). */
  states: VersionState[];
  /** When the newest withdrawn version was withdrawn, if one was. */
  withdrawnAt: Date | null;
}

/**
 * Every analyte of the catalogue with the states of its interval versions: what the score page
 * and the register say about an analyte that has no interval in force (never signed, awaiting
 * sign-off, withdrawn). States only; no limits, no donor data.
 */
export async function listAnalyteVersionStates(executor: Executor): Promise<AnalyteVersionStates[]> {
  const rows = await executor
    .select({ code: analytes.code, state: intervalVersions.state, withdrawnAt: intervalVersions.withdrawnAt })
    .from(analytes)
    .leftJoin(intervalVersions, eq(intervalVersions.analyteId, analytes.id))
    .orderBy(asc(analytes.code), desc(intervalVersions.number));
  const byCode = new Map<string, AnalyteVersionStates>();
  for (const r of rows) {
    const entry = byCode.get(r.code) ?? { code: r.code, states: [], withdrawnAt: null };
    if (r.state) entry.states.push(r.state);
    if (r.state === "withdrawn" && r.withdrawnAt && !entry.withdrawnAt) entry.withdrawnAt = r.withdrawnAt;
    byCode.set(r.code, entry);
  }
  return [...byCode.values()];
}
