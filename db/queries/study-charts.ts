import "server-only";
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import type { Executor } from "../client";
import type { DonorValue } from "@/lib/stats/estimate";
import { donorResults, type Estimate } from "../schema";
import { listIncludedDonorValues } from "./donor-results";
import { findEstimateRow, valuesOfEstimate } from "./estimates";

/**
 * Whether an exclusion of the donor result is in effect. Written with qualified names: Drizzle
 * leaves a single table's columns unqualified in a select list, where "id" would be the
 * exclusion's own.
 */
const excludedNow = sql<boolean>`EXISTS (SELECT 1 FROM exclusions AS e WHERE e.donor_result_id = "donor_results"."id" AND e.undone_at IS NULL)`;

export interface ChartPartition {
  sex?: "F" | "M";
  ageFrom?: number;
  ageTo?: number;
}

export interface PartitionValues {
  /** Measured values in ascending order. */
  measured: number[];
  censored: { below: number; above: number };
}

function split(values: readonly (DonorValue | { value: number; censoringSide: "below" | "above" | null })[]): PartitionValues {
  const measured: number[] = [];
  const censored = { below: 0, above: 0 };
  for (const v of values) {
    const side = typeof v === "number" ? null : "censoringSide" in v ? v.censoringSide : v.side;
    if (side === "below") censored.below++;
    else if (side === "above") censored.above++;
    else measured.push(typeof v === "number" ? v : v.value);
  }
  measured.sort((a, b) => a - b);
  return { measured, censored };
}

/** The partition's donor results that no exclusion in effect sets aside: measured values sorted, censored ones counted. */
export async function partitionValues(
  executor: Executor,
  { studyId, partition }: { studyId: string; partition: ChartPartition },
): Promise<PartitionValues> {
  return split(await listIncludedDonorValues(executor, { studyId, partition }));
}

export interface EstimateValues extends PartitionValues {
  estimate: Estimate;
}

/**
 * The values an estimate was made from (valuesOfEstimate: its partition, uploads and the
 * exclusions in effect then, whatever has been excluded or undone since), measured ones sorted.
 * 404 when the study has no such estimate.
 */
export async function estimateValues(
  executor: Executor,
  { studyId, estimateId }: { studyId: string; estimateId: string },
): Promise<EstimateValues> {
  const estimate = await findEstimateRow(executor, { id: estimateId });
  if (!estimate || estimate.studyId !== studyId) {
    throw new AppError("not_found", `There is no estimate with the id ${estimateId} in this study.`);
  }
  return { ...split(await valuesOfEstimate(executor, { estimate })), estimate };
}

/** The study's donor results with the given donor codes, and whether an exclusion is in effect for each. */
export async function donorResultsByCode(
  executor: Executor,
  { studyId, codes }: { studyId: string; codes: string[] },
): Promise<{ id: number; donorCode: string; sex: string; ageYears: number; value: number; excluded: boolean }[]> {
  return executor
    .select({
      id: donorResults.id,
      donorCode: donorResults.donorCode,
      sex: donorResults.sex,
      ageYears: donorResults.ageYears,
      value: donorResults.value,
      excluded: excludedNow,
    })
    .from(donorResults)
    .where(and(eq(donorResults.studyId, studyId), inArray(donorResults.donorCode, codes)))
    .orderBy(asc(donorResults.donorCode), asc(donorResults.id));
}

