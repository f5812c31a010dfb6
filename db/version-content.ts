/**
 * What a signature on an interval version covers, read from the tables: the one reading that
 * signing (db/queries/version-moves.ts) and the audit verification (db/audit-chain.ts) share, so
 * that the check recomputes exactly what was signed. Not "server-only": the command line uses it.
 */
import { asc, eq, inArray } from "drizzle-orm";
import type { CanonicalVersion } from "@/lib/versions/canonical-content";
import type { Executor } from "./client";
import { estimates, intervalPartitions, type Analyte, type IntervalVersion } from "./schema";

export async function canonicalVersionOf(executor: Executor, { version, analyte }: { version: IntervalVersion; analyte: Analyte }): Promise<CanonicalVersion> {
  const parts = await executor.select().from(intervalPartitions).where(eq(intervalPartitions.versionId, version.id)).orderBy(asc(intervalPartitions.position));
  const estimateIds = parts.map((p) => p.estimateId).filter((x): x is string => x !== null);
  const hashes = estimateIds.length
    ? (await executor.select({ hashes: estimates.uploadHashes }).from(estimates).where(inArray(estimates.id, estimateIds))).flatMap((e) => e.hashes)
    : [];
  const pair = (a: number | null, b: number | null): [number, number] | null => (a === null || b === null ? null : [a, b]);
  return {
    analyte: { code: analyte.code, unit: version.unit },
    number: version.number,
    criticalLow: version.criticalLow,
    criticalHigh: version.criticalHigh,
    partitions: parts.map((p) => ({
      position: p.position,
      sex: p.sex as "F" | "M" | null,
      ageFromDays: p.ageFromDays,
      ageToDays: p.ageToDays,
      low: p.low,
      high: p.high,
      lowCi: pair(p.lowCiLower, p.lowCiUpper),
      highCi: pair(p.highCiLower, p.highCiUpper),
      method: p.method,
      n: p.n,
      model: p.model,
    })),
    uploadSha256: hashes,
  };
}
