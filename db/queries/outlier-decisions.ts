import "server-only";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { AppError } from "@/lib/api/errors";
import type { Database, Executor } from "../client";
import { donorResults, exclusions, outlierDecisions, users } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { assertDonorResultsInStudy, conflictOfUniqueViolation, insertExclusions } from "./exclusions";
import { lockOpenStudy } from "./studies";

export interface OutlierDecisionItem {
  id: string;
  donorResultId: number;
  donorCode: string;
  value: number;
  decision: "exclude" | "keep";
  rule: string;
  reason: string;
  evidence: Record<string, unknown>;
  exclusionId: string | null;
  decidedAt: Date;
  decidedBy: { id: string; name: string } | null;
  undoneAt: Date | null;
}

const decider = alias(users, "decision_maker");

/**
 * A study's outlier decisions, newest first: those in effect, or with `all` the undone ones
 * too; `donorResultIds` narrows to those donor results, `id` to one decision.
 */
export async function listOutlierDecisions(
  executor: Executor,
  { studyId, all = false, donorResultIds, id }: { studyId: string; all?: boolean; donorResultIds?: number[]; id?: string },
): Promise<OutlierDecisionItem[]> {
  const rows = await executor
    .select({
      id: outlierDecisions.id,
      donorResultId: outlierDecisions.donorResultId,
      donorCode: donorResults.donorCode,
      value: donorResults.value,
      decision: outlierDecisions.decision,
      rule: outlierDecisions.rule,
      reason: outlierDecisions.reason,
      evidence: outlierDecisions.evidence,
      exclusionId: outlierDecisions.exclusionId,
      decidedAt: outlierDecisions.decidedAt,
      deciderId: decider.id,
      deciderName: decider.name,
      undoneAt: outlierDecisions.undoneAt,
    })
    .from(outlierDecisions)
    .innerJoin(donorResults, eq(donorResults.id, outlierDecisions.donorResultId))
    .leftJoin(decider, eq(decider.id, outlierDecisions.decidedBy))
    .where(
      and(
        eq(outlierDecisions.studyId, studyId),
        all ? undefined : isNull(outlierDecisions.undoneAt),
        donorResultIds ? sql`${outlierDecisions.donorResultId} = ANY(${sql.param(donorResultIds)}::bigint[])` : undefined,
        id ? eq(outlierDecisions.id, id) : undefined,
      ),
    )
    .orderBy(desc(outlierDecisions.decidedAt), desc(outlierDecisions.id));
  return rows.map(({ deciderId, deciderName, ...r }) => ({
    ...r,
    decidedBy: deciderId === null ? null : { id: deciderId, name: deciderName! },
  }));
}

/**
 * Records the scientist's answer to an outlier proposal in an open study, with the screen's
 * evidence as it stood: "exclude" also creates an exclusion (source "outlier") linked to it.
 * 422 when the donor result is not in the study; 409 when it already has a decision in effect
 * or, for "exclude", an exclusion in effect (also when another request won the race: the
 * partial unique indexes decide).
 */
export async function createOutlierDecision(
  database: Database,
  {
    studyId,
    donorResultId,
    decision,
    rule,
    reason,
    evidence,
    actor,
  }: {
    studyId: string;
    donorResultId: number;
    decision: "exclude" | "keep";
    rule: string;
    reason: string;
    evidence: Record<string, unknown>;
    actor: Actor;
  },
): Promise<OutlierDecisionItem> {
  try {
    return await database.transaction(async (tx) => {
      const study = await lockOpenStudy(tx, { id: studyId, refusal: "its outlier decisions can no longer change." });
      const codes = await assertDonorResultsInStudy(tx, { studyId, ids: [donorResultId] });
      const donorCode = codes.get(donorResultId)!;
      const [inEffect] = await tx
        .select({ id: outlierDecisions.id, decision: outlierDecisions.decision })
        .from(outlierDecisions)
        .where(and(eq(outlierDecisions.donorResultId, donorResultId), isNull(outlierDecisions.undoneAt)));
      if (inEffect) {
        throw new AppError(
          "conflict",
          `Donor result ${donorResultId} (${donorCode}) already has a decision in effect ("${inEffect.decision}", ${inEffect.id}); undo it first.`,
        );
      }
      let exclusionId: string | null = null;
      if (decision === "exclude") {
        [{ id: exclusionId }] = await insertExclusions(tx, {
          studyId,
          ids: [donorResultId],
          codes,
          source: "outlier",
          rule,
          reason,
          actor,
        });
      }
      const [created] = await tx
        .insert(outlierDecisions)
        .values({ studyId, donorResultId, decision, rule, reason, evidence, exclusionId, decidedBy: actor.id })
        .returning({ id: outlierDecisions.id });
      await recordAuditEvent(tx, {
        actor,
        action: "outlier-decision.created",
        entityType: "outlier-decision",
        entityId: created.id,
        summary:
          `${decision === "exclude" ? "Excluded" : "Kept"} donor result ${donorResultId} (${donorCode}) after the ${rule} screen ` +
          `in the study "${study.title}": ${reason}`,
        details: { studyId, donorResultId, decision, rule, reason, evidence, exclusionId },
      });
      const [item] = await listOutlierDecisions(tx, { studyId, id: created.id });
      return item;
    });
  } catch (err) {
    throw conflictOfUniqueViolation(err) ?? err;
  }
}

/**
 * Undoes an outlier decision in effect of an open study and, for "exclude", its exclusion, in
 * one transaction; 404 when the study has no such decision, 409 when it was already undone.
 */
export async function undoOutlierDecision(
  database: Database,
  { studyId, decisionId, actor }: { studyId: string; decisionId: string; actor: Actor },
): Promise<{ id: string; undoneAt: Date; exclusionId: string | null }> {
  return database.transaction(async (tx) => {
    const study = await lockOpenStudy(tx, { id: studyId, refusal: "its outlier decisions can no longer change." });
    // Rows are locked exclusion first, then decision, as undoExclusion does, so that undoing
    // both at once cannot deadlock.
    const [linked] = await tx
      .select({ exclusionId: outlierDecisions.exclusionId })
      .from(outlierDecisions)
      .where(and(eq(outlierDecisions.id, decisionId), eq(outlierDecisions.studyId, studyId)));
    if (linked?.exclusionId) {
      await tx.select({ id: exclusions.id }).from(exclusions).where(eq(exclusions.id, linked.exclusionId)).for("update");
    }
    const [row] = await tx
      .select({ decision: outlierDecisions, donorCode: donorResults.donorCode })
      .from(outlierDecisions)
      .innerJoin(donorResults, eq(donorResults.id, outlierDecisions.donorResultId))
      .where(and(eq(outlierDecisions.id, decisionId), eq(outlierDecisions.studyId, studyId)))
      .for("update", { of: outlierDecisions });
    if (!row) throw new AppError("not_found", `There is no outlier decision with the id ${decisionId} in this study.`);
    const { undoneAt: before, exclusionId, donorResultId, decision } = row.decision;
    if (before) throw new AppError("conflict", `The outlier decision was already undone at ${before.toISOString()}.`);
    const undoneAt = new Date();
    await tx.update(outlierDecisions).set({ undoneAt, undoneBy: actor.id }).where(eq(outlierDecisions.id, decisionId));
    if (exclusionId) {
      await tx
        .update(exclusions)
        .set({ undoneAt, undoneBy: actor.id })
        .where(and(eq(exclusions.id, exclusionId), isNull(exclusions.undoneAt)));
    }
    await recordAuditEvent(tx, {
      actor,
      action: "outlier-decision.undone",
      entityType: "outlier-decision",
      entityId: decisionId,
      summary:
        `Undid the decision to ${decision} donor result ${donorResultId} (${row.donorCode}) in the study "${study.title}"` +
        (exclusionId ? ", and its exclusion" : ""),
      details: { studyId, donorResultId, decision, exclusionId },
    });
    return { id: decisionId, undoneAt, exclusionId };
  });
}
