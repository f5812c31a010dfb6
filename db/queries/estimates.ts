import "server-only";
import { and, asc, desc, eq, inArray, isNull, notExists, sql, type SQL } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import { engineIdentity, stampEngine } from "@/lib/engine";
import { estimateReferenceInterval, type DonorValue, type ReferenceIntervalEstimate } from "@/lib/stats/estimate";
import { partitionLabel, partitionOf, partitionOut, type CreateEstimateInput, type PartitionOut } from "@/lib/studies/estimate-input";
import type { Database, Executor } from "../client";
import { donorResults, estimates, exclusions, studies, uploads, type Estimate } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { listIncludedDonorValues, partitionConditions } from "./donor-results";

/** What the engine needs for one partition, and what it takes to compute the same values again. */
export interface EstimationInput {
  /** The partition's donor results without an exclusion in effect, in donor_results.id order. */
  values: DonorValue[];
  donorResultIds: number[];
  /** Ids of the exclusions in effect on the partition's donor results. */
  exclusionIds: string[];
  /** SHA-256 of every committed upload of the study, oldest first. */
  uploadHashes: string[];
}

function toDonorValue(row: { value: number; censoringSide: "below" | "above" | null }): DonorValue {
  return row.censoringSide === null ? row.value : { value: row.value, side: row.censoringSide };
}

/** SHA-256 of every committed upload of the study, in the order they were committed: what an estimate records to be reproduced. */
export async function committedUploadHashes(executor: Executor, studyId: string): Promise<string[]> {
  const rows = await executor
    .select({ sha256: uploads.sha256 })
    .from(uploads)
    .where(and(eq(uploads.studyId, studyId), eq(uploads.status, "committed")))
    .orderBy(asc(uploads.decidedAt), asc(uploads.id));
  return rows.map((r) => r.sha256);
}

/**
 * The values of one partition of a study for estimation: its donor results (sex matches,
 * ageFrom ≤ age < ageTo) without an exclusion in effect, in donor_results.id order, censored
 * ones as `{value, side}`; with the exclusions in effect on the partition and the committed
 * uploads' SHA-256, which together with the options and seed reproduce the estimate.
 */
export async function estimationInput(
  executor: Executor,
  { studyId, partition }: { studyId: string; partition: PartitionOut },
): Promise<EstimationInput> {
  const inPartition = and(eq(donorResults.studyId, studyId), ...partitionConditions(partitionOf(partition)));
  const rows = await listIncludedDonorValues(executor, { studyId, partition: partitionOf(partition) });
  const excluded = await executor
    .select({ id: exclusions.id })
    .from(exclusions)
    .innerJoin(donorResults, eq(donorResults.id, exclusions.donorResultId))
    .where(and(inPartition, eq(exclusions.studyId, studyId), isNull(exclusions.undoneAt)))
    .orderBy(asc(exclusions.createdAt), asc(exclusions.id));
  return {
    values: rows.map(toDonorValue),
    donorResultIds: rows.map((r) => r.id),
    exclusionIds: excluded.map((e) => e.id),
    uploadHashes: await committedUploadHashes(executor, studyId),
  };
}

/**
 * The conditions on donor_results that an estimate's stored provenance sets: the results come
 * from the committed uploads it names (by SHA-256), less the exclusions it names. Exclusions made
 * or undone since, and uploads committed since, do not change them.
 */
export function storedInputConditions(executor: Executor, { estimate }: { estimate: Estimate }): SQL[] {
  const parts: SQL[] = [
    inArray(
      donorResults.uploadId,
      executor
        .select({ id: uploads.id })
        .from(uploads)
        .where(and(eq(uploads.studyId, estimate.studyId), eq(uploads.status, "committed"), inArray(uploads.sha256, estimate.uploadHashes))),
    ),
  ];
  if (estimate.exclusionIds.length > 0) {
    parts.push(
      notExists(
        executor
          .select({ one: sql`1` })
          .from(exclusions)
          .where(and(eq(exclusions.donorResultId, donorResults.id), inArray(exclusions.id, estimate.exclusionIds))),
      ),
    );
  }
  return parts;
}

/**
 * The values an estimate was computed from, read again from what it stored: the partition's
 * donor results from the uploads it names, less those its exclusions set aside, in
 * donor_results.id order. Exclusions made or undone since do not change the answer.
 */
export async function valuesOfEstimate(executor: Executor, { estimate }: { estimate: Estimate }): Promise<DonorValue[]> {
  const parts: SQL[] = [eq(donorResults.studyId, estimate.studyId), ...partitionConditions(partitionOf(partitionOut(estimate)))];
  if (estimate.uploadHashes.length === 0) return [];
  parts.push(...storedInputConditions(executor, { estimate }));
  const rows = await executor
    .select({ value: donorResults.value, censoringSide: donorResults.censoringSide })
    .from(donorResults)
    .where(and(...parts))
    .orderBy(asc(donorResults.id));
  return rows.map(toDonorValue);
}

/** The estimate document as the API answers it: the engine's document plus who and what it is. */
export type EstimateDocument = ReferenceIntervalEstimate & {
  id: string;
  studyId: string;
  partition: PartitionOut;
  createdAt: Date;
};

function documentOf(row: Estimate): EstimateDocument {
  return {
    id: row.id,
    studyId: row.studyId,
    partition: partitionOut(row),
    createdAt: row.createdAt,
    ...(row.document as unknown as ReferenceIntervalEstimate),
  };
}

/**
 * Estimates one partition of a study and stores the document: the engine with screening
 * "propose" when a screen is named (the screen lists proposals under `proposed` and excludes
 * nothing; the scientist's confirmed exclusions are already left out), stamped with the engine's identity as the command
 * line stamps it. 409 when the study is closed, 422 when the partition holds no values.
 */
export async function createEstimate(
  database: Database,
  { studyId, input, actor }: { studyId: string; input: CreateEstimateInput; actor: Actor },
): Promise<EstimateDocument> {
  const partition = partitionOut(input.partition ?? {});
  // Repeatable read: the donor results, the exclusions and the upload hashes come from one
  // snapshot, so that what is stored to reproduce the estimate is what it was computed from.
  return database.transaction(async (tx) => {
    const [study] = await tx.select().from(studies).where(eq(studies.id, studyId));
    if (!study) throw new AppError("not_found", `There is no study with the id ${studyId}.`);
    if (study.status !== "open") throw new AppError("conflict", "The study is closed: it takes no more estimates.");
    const data = await estimationInput(tx, { studyId, partition });
    if (data.values.length === 0) {
      throw new AppError(
        "invalid",
        `The partition (${partitionLabel(partition)}) holds no donor results without an exclusion in effect: there is nothing to estimate.`,
      );
    }
    const options = { outliers: input.outliers, transform: input.transform, seed: input.seed };
    // A named screen only proposes. With no screen there is nothing to propose or apply, and the
    // command line's own default mode ("apply") is recorded, so that the document equals what
    // `bellwether estimate FILE --outliers none` prints on the same values, field for field.
    const screening = input.outliers === "none" ? "apply" : "propose";
    const document = stampEngine(
      estimateReferenceInterval(data.values, { ...options, screening }),
      engineIdentity(),
    );
    const [row] = await tx
      .insert(estimates)
      .values({
        studyId,
        sex: partition.sex,
        ageFrom: partition.ageFrom,
        ageTo: partition.ageTo,
        options,
        seed: input.seed,
        n: document.n,
        // Through JSON, as the command line prints it: what is stored is what it would print.
        document: JSON.parse(JSON.stringify(document)) as Record<string, unknown>,
        exclusionIds: data.exclusionIds,
        uploadHashes: data.uploadHashes,
        createdBy: actor.id,
      })
      .returning();
    await recordAuditEvent(tx, {
      actor,
      action: "estimate.created",
      entityType: "estimate",
      entityId: row.id,
      summary: `Estimated the reference interval (${partitionLabel(partition)}) in the study "${study.title}" (n = ${document.n})`,
      details: {
        studyId,
        partition,
        options,
        n: document.n,
        recommended: document.recommended,
        exclusionIds: data.exclusionIds,
        uploadHashes: data.uploadHashes,
        engine: document.provenance.engine,
      },
    });
    return documentOf(row);
  }, { isolationLevel: "repeatable read" });
}

/** A study's estimates in brief, newest first. */
export async function listEstimates(executor: Executor, { studyId }: { studyId: string }) {
  const rows = await executor
    .select({
      id: estimates.id,
      sex: estimates.sex,
      ageFrom: estimates.ageFrom,
      ageTo: estimates.ageTo,
      options: estimates.options,
      n: estimates.n,
      createdAt: estimates.createdAt,
      recommended: sql<ReferenceIntervalEstimate["recommended"]>`${estimates.document}->'recommended'`,
      nonparametric: sql<ReferenceIntervalEstimate["nonparametric"]>`${estimates.document}->'nonparametric'`,
      parametric: sql<ReferenceIntervalEstimate["parametric"]>`${estimates.document}->'parametric'`,
      robust: sql<ReferenceIntervalEstimate["robust"]>`${estimates.document}->'robust'`,
      warnings: sql<string[]>`${estimates.document}->'warnings'`,
      indirect: sql<{ lower: number | null; upper: number | null; fraction: number } | null>`CASE WHEN ${estimates.options}->>'method' = 'indirect' THEN jsonb_build_object('lower', ${estimates.document}->'lower', 'upper', ${estimates.document}->'upper', 'fraction', ${estimates.document}->'fraction') END`,
    })
    .from(estimates)
    .where(eq(estimates.studyId, studyId))
    .orderBy(desc(estimates.createdAt), desc(estimates.id));
  return rows.map(({ sex, ageFrom, ageTo, ...rest }) => ({
    id: rest.id,
    partition: partitionOut({ sex, ageFrom, ageTo }),
    options: rest.options,
    n: rest.n,
    createdAt: rest.createdAt,
    recommended: rest.recommended,
    nonparametric: rest.nonparametric,
    parametric: rest.parametric,
    robust: rest.robust,
    warnings: rest.warnings,
    /** For an indirect estimate: its limits and non-diseased fraction (the rest is in the document). */
    ...(rest.indirect ? { indirect: rest.indirect } : {}),
  }));
}

/** Every stored estimate row of a study, oldest first (the export). */
export async function estimatesOfStudy(executor: Executor, { studyId }: { studyId: string }): Promise<Estimate[]> {
  return executor.select().from(estimates).where(eq(estimates.studyId, studyId)).orderBy(asc(estimates.createdAt), asc(estimates.id));
}

/** One estimate row, or undefined. */
export async function findEstimateRow(executor: Executor, { id }: { id: string }): Promise<Estimate | undefined> {
  const [row] = await executor.select().from(estimates).where(eq(estimates.id, id)).limit(1);
  return row;
}

/** One estimate of the study, as stored; 404 for an unknown id or one of another study. */
export async function findEstimate(executor: Executor, { studyId, estimateId }: { studyId: string; estimateId: string }) {
  const [row] = await executor
    .select()
    .from(estimates)
    .where(and(eq(estimates.id, estimateId), eq(estimates.studyId, studyId)))
    .limit(1);
  if (!row) throw new AppError("not_found", `There is no estimate with the id ${estimateId} in this study.`);
  return documentOf(row);
}
