import "server-only";
import { and, asc, eq, isNotNull, isNull, sql } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import { engineIdentity } from "@/lib/engine";
import { partitionOut, type PartitionOut } from "@/lib/studies/estimate-input";
import {
  indirectEstimateDocument,
  type IndirectEstimateDocument,
  type IndirectEstimateInput,
  type StoredRoutineResult,
} from "@/lib/studies/indirect-estimates";
import { StatsInputError } from "@/lib/stats/validate";
import type { Database, Executor } from "../client";
import { donorResults, estimates, exclusions, studies, type Estimate, type Study } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { committedUploadHashes } from "./estimates";

/** Whose routine results a partition holds, in words ("women aged 18 to under 65", "every patient"). */
function patientsOf(p: { sex?: "F" | "M"; ageFrom?: number; ageTo?: number }): string {
  const who = p.sex === "F" ? "women" : p.sex === "M" ? "men" : "patients";
  const ages =
    p.ageFrom !== undefined && p.ageTo !== undefined
      ? ` aged ${p.ageFrom} to under ${p.ageTo}`
      : p.ageFrom !== undefined
        ? ` aged ${p.ageFrom} and over`
        : p.ageTo !== undefined
          ? ` under ${p.ageTo}`
          : "";
  return p.sex === undefined && ages === "" ? "every patient" : `${who}${ages}`;
}

/** Whether an estimate row holds an indirect estimate (its options say so). */
export function isIndirectEstimate(row: Pick<Estimate, "options">): boolean {
  return (row.options as { method?: unknown }).method === "indirect";
}

/** 409 unless the study is an indirect study; `what` names the step. */
export function assertIndirectStudy(study: Pick<Study, "kind" | "title">, what: string): void {
  if (study.kind !== "indirect") {
    throw new AppError(
      "conflict",
      `The study "${study.title}" holds healthy-donor results, not routine results: ${what} is for indirect studies.`,
    );
  }
}

/** The API's answer: the document plus who and what it is, as other estimates are answered. */
export type IndirectEstimateOut = IndirectEstimateDocument & { id: string; studyId: string; partition: PartitionOut; createdAt: Date };

export function indirectEstimateOut(row: Estimate): IndirectEstimateOut {
  return { id: row.id, studyId: row.studyId, partition: partitionOut(row), createdAt: row.createdAt, ...(row.document as unknown as IndirectEstimateDocument) };
}

const hasActiveExclusion = sql`EXISTS (SELECT 1 FROM ${exclusions} WHERE ${exclusions.donorResultId} = ${donorResults.id} AND ${exclusions.undoneAt} IS NULL)`;

/**
 * Estimates an indirect reference interval from the study's routine results without an exclusion
 * in effect, in one repeatable-read snapshot: the cleaning plan's steps in order (each recorded
 * with its counts), truncated maximum likelihood on what remains, Bhattacharya beside it. The
 * document is stored as an `estimates` row with the exclusions in effect and the committed
 * uploads' SHA-256, audited. 404 for an unknown study, 409 for a closed or non-indirect study, 422
 * when the cleaned results cannot be estimated (the engine's reason).
 */
export async function createIndirectEstimate(
  database: Database,
  { studyId, input, actor }: { studyId: string; input: IndirectEstimateInput; actor: Actor },
): Promise<IndirectEstimateOut> {
  return database.transaction(async (tx) => {
    const [study] = await tx.select().from(studies).where(eq(studies.id, studyId));
    if (!study) throw new AppError("not_found", `There is no study with the id ${studyId}.`);
    assertIndirectStudy(study, "an indirect estimate");
    if (study.status !== "open") throw new AppError("conflict", "The study is closed: it takes no more estimates.");
    const rows = await tx
      .select({
        patient: donorResults.donorCode,
        sex: donorResults.sex,
        ageYears: donorResults.ageYears,
        collectedAt: sql<string>`coalesce(${donorResults.collectedAt}, ${donorResults.collectedOn}, '')`,
        value: donorResults.value,
        censoringSide: donorResults.censoringSide,
        setting: donorResults.setting,
        flags: donorResults.flags,
      })
      .from(donorResults)
      .where(and(eq(donorResults.studyId, studyId), sql`NOT ${hasActiveExclusion}`))
      .orderBy(asc(donorResults.rowNumber), asc(donorResults.id));
    const excludedRows = await tx
      .select({ id: exclusions.id })
      .from(exclusions)
      .where(and(eq(exclusions.studyId, studyId), isNull(exclusions.undoneAt)))
      .orderBy(asc(exclusions.createdAt), asc(exclusions.id));
    const partition = input.partition ?? {};
    let document: IndirectEstimateDocument;
    try {
      document = indirectEstimateDocument({ rows: rows as StoredRoutineResult[], excluded: excludedRows.length, input });
    } catch (err) {
      if (err instanceof StatsInputError) {
        throw new AppError("invalid", `The routine results (${patientsOf(partition)}) cannot be estimated: ${err.message}.`);
      }
      throw err;
    }
    document.provenance.engine = engineIdentity();
    const uploadHashes = await committedUploadHashes(tx, studyId);
    const [row] = await tx
      .insert(estimates)
      .values({
        studyId,
        sex: partition.sex ?? null,
        ageFrom: partition.ageFrom ?? null,
        ageTo: partition.ageTo ?? null,
        options: { method: "indirect", cleaning: input.cleaning, partition, seed: input.seed },
        seed: input.seed,
        n: document.n,
        document: JSON.parse(JSON.stringify(document)) as Record<string, unknown>,
        exclusionIds: excludedRows.map((e) => e.id),
        uploadHashes,
        createdBy: actor.id,
      })
      .returning();
    await recordAuditEvent(tx, {
      actor,
      action: "estimate.created",
      entityType: "estimate",
      entityId: row.id,
      summary: `Estimated an indirect interval (${patientsOf(partition)}) in the study "${study.title}" (n = ${document.n})`,
      details: {
        studyId,
        method: "indirect",
        partition,
        cleaning: input.cleaning,
        steps: document.cleaning.steps.map((s) => ({ step: s.step, removed: s.removed, remaining: s.remaining })),
        seed: input.seed,
        n: document.n,
        lower: document.lower,
        upper: document.upper,
        fraction: document.fraction,
        exclusionIds: row.exclusionIds,
        uploadHashes,
        engine: document.provenance.engine,
      },
    });
    return indirectEstimateOut(row);
  }, { isolationLevel: "repeatable read" });
}

/**
 * The settings and flags of a study's routine results with how many results carry each (most
 * first), and the first and last collection day: what the cleaning form offers.
 */
export async function routineVocabulary(
  executor: Executor,
  { studyId }: { studyId: string },
): Promise<{ settings: { name: string; count: number }[]; flags: { name: string; count: number }[]; period: { from: string; to: string } | null }> {
  const settings = await executor
    .select({ name: donorResults.setting, count: sql<number>`count(*)::int` })
    .from(donorResults)
    .where(and(eq(donorResults.studyId, studyId), isNotNull(donorResults.setting)))
    .groupBy(donorResults.setting)
    .orderBy(sql`count(*) DESC`, asc(donorResults.setting));
  const flags = await executor.execute<{ name: string; count: number }>(sql`
    SELECT f.name, count(*)::int AS count
    FROM ${donorResults}, jsonb_array_elements_text(coalesce(${donorResults.flags}, '[]'::jsonb)) AS f(name)
    WHERE ${donorResults.studyId} = ${studyId}
    GROUP BY f.name ORDER BY count(*) DESC, f.name`);
  const [span] = await executor
    .select({
      from: sql<string | null>`min(left(coalesce(${donorResults.collectedAt}, ${donorResults.collectedOn}), 10))`,
      to: sql<string | null>`max(left(coalesce(${donorResults.collectedAt}, ${donorResults.collectedOn}), 10))`,
    })
    .from(donorResults)
    .where(eq(donorResults.studyId, studyId));
  return {
    settings: settings.map((s) => ({ name: s.name as string, count: s.count })),
    flags: flags.rows.map((f) => ({ name: f.name, count: Number(f.count) })),
    period: span?.from && span.to ? { from: span.from, to: span.to } : null,
  };
}
