import "server-only";
import { and, asc, eq, inArray, or, sql } from "drizzle-orm";
import type { Executor } from "../client";
import { auditEvents, signatures } from "../schema";

/** Whether the user has already signed in this session (the next signing then asks the password only). */
export async function hasSignedInSession(executor: Executor, { signerId, sessionId }: { signerId: string; sessionId: string }): Promise<boolean> {
  const rows = await executor
    .select({ id: signatures.id })
    .from(signatures)
    .where(and(eq(signatures.signerId, signerId), eq(signatures.sessionId, sessionId)))
    .limit(1);
  return rows.length > 0;
}

/**
 * The audit events of a version and of its study, oldest first: the version's own (either
 * spelling of its entity type), the study's, and those of the study's parts (uploads,
 * exclusions, decisions, assessments, estimates), which name the study in their details.
 */
export async function versionAuditEvents(executor: Executor, { versionId, studyId }: { versionId: string; studyId: string | null }) {
  const ofVersion = and(inArray(auditEvents.entityType, ["interval_version", "interval-version"]), eq(auditEvents.entityId, versionId));
  const where = studyId
    ? or(ofVersion, and(eq(auditEvents.entityType, "study"), eq(auditEvents.entityId, studyId)), sql`${auditEvents.details}->>'studyId' = ${studyId}`)
    : ofVersion;
  return executor.select().from(auditEvents).where(where).orderBy(asc(auditEvents.at), asc(auditEvents.id));
}
