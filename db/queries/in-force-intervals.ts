import "server-only";
import { and, asc, eq, inArray } from "drizzle-orm";
import type { Database } from "../client";
import { analytes, intervalPartitions, intervalVersions } from "../schema";

export interface InForceAnalyteRow {
  id: string;
  code: string;
  name: string;
  loinc: string | null;
  unit: string;
  decimals: number;
  molarMass: number | null;
}

export interface InForceVersionRow {
  id: string;
  analyteId: string;
  number: number;
  unit: string;
  decimals: number;
  criticalLow: number | null;
  criticalHigh: number | null;
  effectiveFrom: Date | null;
  reviewBy: Date | null;
}

export interface InForcePartitionRow {
  id: string;
  versionId: string;
  position: number;
  sex: string | null;
  ageFromDays: number | null;
  ageToDays: number | null;
  low: number | null;
  high: number | null;
  lowCiLower: number | null;
  lowCiUpper: number | null;
  highCiLower: number | null;
  highCiUpper: number | null;
  method: string;
  n: number;
  model: unknown;
}

export interface InForceSnapshot {
  analytes: InForceAnalyteRow[];
  versions: InForceVersionRow[];
  partitions: InForcePartitionRow[];
}

/**
 * What scoring needs of the catalogue, read in one snapshot: every analyte (or the one named by
 * `analyteId`), its version in force if any, and that version's partitions with their stored
 * scoring models. Read-only and repeatable-read, so an analyte and its version are seen as one
 * committed state. The model cache (lib/scores/model-cache.ts) calls it on first use, on every
 * (re)connection of the listener and for an analyte whose change was notified.
 */
export async function loadInForceSnapshot(database: Database, { analyteId }: { analyteId?: string } = {}): Promise<InForceSnapshot> {
  return database.transaction(
    async (tx) => {
      const analyteRows = await tx
        .select({
          id: analytes.id,
          code: analytes.code,
          name: analytes.name,
          loinc: analytes.loinc,
          unit: analytes.unit,
          decimals: analytes.decimals,
          molarMass: analytes.molarMass,
        })
        .from(analytes)
        .where(analyteId ? eq(analytes.id, analyteId) : undefined);
      if (analyteRows.length === 0) return { analytes: [], versions: [], partitions: [] };
      const versionRows = await tx
        .select({
          id: intervalVersions.id,
          analyteId: intervalVersions.analyteId,
          number: intervalVersions.number,
          unit: intervalVersions.unit,
          decimals: intervalVersions.decimals,
          criticalLow: intervalVersions.criticalLow,
          criticalHigh: intervalVersions.criticalHigh,
          effectiveFrom: intervalVersions.effectiveFrom,
          reviewBy: intervalVersions.reviewBy,
        })
        .from(intervalVersions)
        .where(and(eq(intervalVersions.state, "in_force"), analyteId ? eq(intervalVersions.analyteId, analyteId) : undefined));
      if (versionRows.length === 0) return { analytes: analyteRows, versions: [], partitions: [] };
      const partitionRows = await tx
        .select({
          id: intervalPartitions.id,
          versionId: intervalPartitions.versionId,
          position: intervalPartitions.position,
          sex: intervalPartitions.sex,
          ageFromDays: intervalPartitions.ageFromDays,
          ageToDays: intervalPartitions.ageToDays,
          low: intervalPartitions.low,
          high: intervalPartitions.high,
          lowCiLower: intervalPartitions.lowCiLower,
          lowCiUpper: intervalPartitions.lowCiUpper,
          highCiLower: intervalPartitions.highCiLower,
          highCiUpper: intervalPartitions.highCiUpper,
          method: intervalPartitions.method,
          n: intervalPartitions.n,
          model: intervalPartitions.model,
        })
        .from(intervalPartitions)
        .where(inArray(intervalPartitions.versionId, versionRows.map((v) => v.id)))
        .orderBy(asc(intervalPartitions.versionId), asc(intervalPartitions.position));
      return { analytes: analyteRows, versions: versionRows, partitions: partitionRows };
    },
    { isolationLevel: "repeatable read", accessMode: "read only" },
  );
}
