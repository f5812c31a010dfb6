import "server-only";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { AppError } from "@/lib/api/errors";
import type { Database, Executor } from "../client";
import { uniqueViolationOf } from "../errors";
import { donorResults, exclusions, outlierDecisions, users } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { lockOpenStudy } from "./studies";

export interface ExclusionItem {
  id: string;
  donorResultId: number;
  donorCode: string;
  sex: string;
  ageYears: number;
  value: number;
  source: "manual" | "outlier";
  rule: string | null;
  reason: string;
  createdAt: Date;
  createdBy: { id: string; name: string } | null;
  undoneAt: Date | null;
  undoneBy: { id: string; name: string } | null;
}

const creator = alias(users, "exclusion_creator");
const undoer = alias(users, "exclusion_undoer");

/** A list of ids for a message: all of them up to ten, then how many more. */
export function idList(ids: readonly (number | string)[]): string {
  const shown = ids.slice(0, 10).join(", ");
  return ids.length > 10 ? `${shown} and ${ids.length - 10} more` : shown;
}

/**
 * A study's exclusions, newest first, with the donor result each sets aside and who made and
 * undid it: those in effect, or with `all` the undone ones too; `ids` narrows to those exclusions.
 */
export async function listExclusions(
  executor: Executor,
  { studyId, all = false, ids }: { studyId: string; all?: boolean; ids?: string[] },
): Promise<ExclusionItem[]> {
  const rows = await executor
    .select({
      id: exclusions.id,
      donorResultId: exclusions.donorResultId,
      donorCode: donorResults.donorCode,
      sex: donorResults.sex,
      ageYears: donorResults.ageYears,
      value: donorResults.value,
      source: exclusions.source,
      rule: exclusions.rule,
      reason: exclusions.reason,
      createdAt: exclusions.createdAt,
      creatorId: creator.id,
      creatorName: creator.name,
      undoneAt: exclusions.undoneAt,
      undoerId: undoer.id,
      undoerName: undoer.name,
    })
    .from(exclusions)
    .innerJoin(donorResults, eq(donorResults.id, exclusions.donorResultId))
    .leftJoin(creator, eq(creator.id, exclusions.createdBy))
    .leftJoin(undoer, eq(undoer.id, exclusions.undoneBy))
    .where(
      and(
        eq(exclusions.studyId, studyId),
        all ? undefined : isNull(exclusions.undoneAt),
        ids ? sql`${exclusions.id} = ANY(${sql.param(ids)}::uuid[])` : undefined,
      ),
    )
    .orderBy(desc(exclusions.createdAt), desc(exclusions.id));
  return rows.map(({ creatorId, creatorName, undoerId, undoerName, ...r }) => ({
    ...r,
    createdBy: creatorId === null ? null : { id: creatorId, name: creatorName! },
    undoneBy: undoerId === null ? null : { id: undoerId, name: undoerName! },
  }));
}

/**
 * The donor results among `ids` that belong to the study, with their codes; 422 naming those
 * that do not (unknown ids, or results of another study).
 */
export async function assertDonorResultsInStudy(
  executor: Executor,
  { studyId, ids }: { studyId: string; ids: number[] },
): Promise<Map<number, string>> {
  const rows = await executor
    .select({ id: donorResults.id, donorCode: donorResults.donorCode })
    .from(donorResults)
    .where(and(eq(donorResults.studyId, studyId), sql`${donorResults.id} = ANY(${sql.param(ids)}::bigint[])`));
  const found = new Map(rows.map((r) => [r.id, r.donorCode]));
  const missing = ids.filter((id) => !found.has(id));
  if (missing.length > 0) {
    const message =
      missing.length === 1
        ? `Donor result ${missing[0]} is not in this study.`
        : `Donor results ${idList(missing)} are not in this study.`;
    throw new AppError("invalid", message, { errors: [{ path: "donorResultIds", message }] });
  }
  return found;
}

/** 409 when any of the donor results already has an exclusion in effect. */
async function assertNotExcluded(executor: Executor, { ids, codes }: { ids: number[]; codes: Map<number, string> }) {
  const rows = await executor
    .select({ donorResultId: exclusions.donorResultId })
    .from(exclusions)
    .where(and(sql`${exclusions.donorResultId} = ANY(${sql.param(ids)}::bigint[])`, isNull(exclusions.undoneAt)));
  if (rows.length === 0) return;
  const named = rows.map((r) => `${r.donorResultId} (${codes.get(r.donorResultId)})`);
  throw new AppError(
    "conflict",
    rows.length === 1
      ? `Donor result ${named[0]} already has an exclusion in effect; nothing was excluded.`
      : `Donor results ${idList(named)} already have an exclusion in effect; nothing was excluded.`,
  );
}

/**
 * Inserts exclusions in effect for the given donor results in one statement (the ids travel as
 * one array), checked first; under concurrency the partial unique index exclusions_active_unique
 * decides, and the caller turns its violation into a 409 with {@link conflictOfUniqueViolation}.
 */
export async function insertExclusions(
  executor: Executor,
  {
    studyId,
    ids,
    codes,
    source,
    rule,
    reason,
    actor,
  }: {
    studyId: string;
    ids: number[];
    codes: Map<number, string>;
    source: "manual" | "outlier";
    rule: string | null;
    reason: string;
    actor: Actor;
  },
): Promise<{ id: string; donorResultId: number }[]> {
  await assertNotExcluded(executor, { ids, codes });
  const result = await executor.execute<{ id: string; donor_result_id: string }>(sql`
    INSERT INTO ${exclusions} (study_id, donor_result_id, source, rule, reason, created_by)
    SELECT ${studyId}::uuid, d.id, ${source}::exclusion_source, ${rule}, ${reason}, ${actor.id}::uuid
    FROM unnest(${sql.param(ids)}::bigint[]) AS d(id)
    RETURNING id, donor_result_id`);
  return result.rows.map((r) => ({ id: r.id, donorResultId: Number(r.donor_result_id) }));
}

/**
 * The 409 for a unique index that refused a second exclusion or decision in effect, written at
 * the same moment as another; null for any other error.
 */
export function conflictOfUniqueViolation(err: unknown): AppError | null {
  const constraint = uniqueViolationOf(err);
  if (constraint === null) return null;
  if (constraint === "outlier_decisions_active_unique") {
    return new AppError("conflict", "Another decision on this donor result took effect at the same moment; nothing was stored. Reload and look again.");
  }
  return new AppError(
    "conflict",
    "Another exclusion of one of these donor results took effect at the same moment; nothing was stored. Reload and look again.",
  );
}

/**
 * Manual exclusions of donor results of an open study, all or nothing, with one audit event:
 * 422 when any is not in the study, 409 when any already has an exclusion in effect.
 */
export async function createExclusions(
  database: Database,
  { studyId, donorResultIds, reason, actor }: { studyId: string; donorResultIds: number[]; reason: string; actor: Actor },
): Promise<ExclusionItem[]> {
  try {
    return await database.transaction(async (tx) => {
      const study = await lockOpenStudy(tx, { id: studyId, refusal: "its donor results can no longer be excluded." });
      const codes = await assertDonorResultsInStudy(tx, { studyId, ids: donorResultIds });
      const created = await insertExclusions(tx, { studyId, ids: donorResultIds, codes, source: "manual", rule: null, reason, actor });
      await recordAuditEvent(tx, {
        actor,
        action: "exclusion.created",
        entityType: "study",
        entityId: studyId,
        summary:
          created.length === 1
            ? `Excluded donor result ${created[0].donorResultId} (${codes.get(created[0].donorResultId)}) from the study "${study.title}": ${reason}`
            : `Excluded ${created.length} donor results from the study "${study.title}": ${reason}`,
        details: {
          source: "manual",
          reason,
          exclusions: created.map((c) => ({ exclusionId: c.id, donorResultId: c.donorResultId, donorCode: codes.get(c.donorResultId) })),
        },
      });
      return listExclusions(tx, { studyId, ids: created.map((c) => c.id) });
    });
  } catch (err) {
    throw conflictOfUniqueViolation(err) ?? err;
  }
}

/**
 * Undoes an exclusion in effect of an open study, and the outlier decision that created it, in
 * one transaction; 404 when the study has no such exclusion, 409 when it was already undone.
 */
export async function undoExclusion(
  database: Database,
  { studyId, exclusionId, actor }: { studyId: string; exclusionId: string; actor: Actor },
): Promise<{ id: string; undoneAt: Date; outlierDecisionId: string | null }> {
  return database.transaction(async (tx) => {
    const study = await lockOpenStudy(tx, { id: studyId, refusal: "its exclusions can no longer be undone." });
    const [exclusion] = await tx
      .select({ exclusion: exclusions, donorCode: donorResults.donorCode })
      .from(exclusions)
      .innerJoin(donorResults, eq(donorResults.id, exclusions.donorResultId))
      .where(and(eq(exclusions.id, exclusionId), eq(exclusions.studyId, studyId)))
      .for("update", { of: exclusions });
    if (!exclusion) throw new AppError("not_found", `There is no exclusion with the id ${exclusionId} in this study.`);
    const { undoneAt: before } = exclusion.exclusion;
    if (before) throw new AppError("conflict", `The exclusion was already undone at ${before.toISOString()}.`);
    const undoneAt = new Date();
    await tx.update(exclusions).set({ undoneAt, undoneBy: actor.id }).where(eq(exclusions.id, exclusionId));
    const [decision] = await tx
      .update(outlierDecisions)
      .set({ undoneAt, undoneBy: actor.id })
      .where(and(eq(outlierDecisions.exclusionId, exclusionId), isNull(outlierDecisions.undoneAt)))
      .returning({ id: outlierDecisions.id });
    const { donorResultId, reason } = exclusion.exclusion;
    await recordAuditEvent(tx, {
      actor,
      action: "exclusion.undone",
      entityType: "exclusion",
      entityId: exclusionId,
      summary:
        `Undid the exclusion of donor result ${donorResultId} (${exclusion.donorCode}) in the study "${study.title}"` +
        (decision ? ", and the outlier decision that made it" : ""),
      details: { studyId, donorResultId, source: exclusion.exclusion.source, reason, outlierDecisionId: decision?.id ?? null },
    });
    return { id: exclusionId, undoneAt, outlierDecisionId: decision?.id ?? null };
  });
}
