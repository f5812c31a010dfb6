import "server-only";
import { desc, eq } from "drizzle-orm";
import { assessPartitions, type PartitionAssessmentResult } from "@/lib/studies/partition-assessment";
import type { PartitionAssessmentInput } from "@/lib/studies/partition-input";
import type { Database, Executor } from "../client";
import { partitionAssessments, users } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { listIncludedDonorValues } from "./donor-results";
import { lockOpenStudy } from "./studies";

export interface PartitionAssessmentItem extends PartitionAssessmentResult {
  id: string;
  createdAt: Date;
  createdBy: { id: string; name: string } | null;
}

/**
 * Runs Harris-Boyd and Lahti over the donor results of an open study that have no exclusion in
 * effect, and keeps the result, audited, in one transaction; 409 when the study is closed.
 */
export async function createPartitionAssessment(
  database: Database,
  { studyId, input, actor }: { studyId: string; input: PartitionAssessmentInput; actor: Actor },
): Promise<PartitionAssessmentItem> {
  return database.transaction(async (tx) => {
    const study = await lockOpenStudy(tx, { id: studyId, refusal: "its partitions can no longer be assessed." });
    const rows = await listIncludedDonorValues(tx, { studyId });
    const result = assessPartitions(rows, input);
    const [created] = await tx
      .insert(partitionAssessments)
      .values({ studyId, request: { ...input }, result: { ...result }, createdBy: actor.id })
      .returning();
    await recordAuditEvent(tx, {
      actor,
      action: "partition-assessment.created",
      entityType: "partition-assessment",
      entityId: created.id,
      summary: `Assessed partitions by ${input.by} in the study "${study.title}": ${result.verdict}`,
      details: { studyId, request: input, verdict: result.verdict, groups: result.groups.map((g) => ({ label: g.label, n: g.n })) },
    });
    return itemOf(created, actor.id === null ? null : { id: actor.id, name: await nameOf(tx, actor.id) });
  });
}

async function nameOf(executor: Executor, id: string): Promise<string> {
  const [user] = await executor.select({ name: users.name }).from(users).where(eq(users.id, id));
  return user?.name ?? "";
}

function itemOf(
  row: typeof partitionAssessments.$inferSelect,
  createdBy: { id: string; name: string } | null,
): PartitionAssessmentItem {
  return { id: row.id, ...(row.result as unknown as PartitionAssessmentResult), createdAt: row.createdAt, createdBy };
}

/** A study's partition assessments, newest first. */
export async function listPartitionAssessments(executor: Executor, { studyId }: { studyId: string }): Promise<PartitionAssessmentItem[]> {
  const rows = await executor
    .select({ assessment: partitionAssessments, creatorId: users.id, creatorName: users.name })
    .from(partitionAssessments)
    .leftJoin(users, eq(users.id, partitionAssessments.createdBy))
    .where(eq(partitionAssessments.studyId, studyId))
    .orderBy(desc(partitionAssessments.createdAt), desc(partitionAssessments.id));
  return rows.map((r) => itemOf(r.assessment, r.creatorId === null ? null : { id: r.creatorId, name: r.creatorName! }));
}
