import "server-only";
import { and, asc, eq, inArray, or, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { SIGNATURE_MEANING_WORDS } from "@/lib/versions/labels";
import type { Executor } from "../client";
import { auditEvents, intervalVersions, signatures, users, type Role, type SignatureMeaning } from "../schema";

export interface SignatureOut {
  id: string;
  signer: { id: string; name: string };
  signerRole: Role;
  at: Date;
  meaning: SignatureMeaning;
  meaningLabel: string;
  contentSha256: string;
  comment: string | null;
}

/** A version's electronic signatures, oldest first: signer's printed name, time, meaning, content hash. */
export async function versionSignatures(executor: Executor, { versionId }: { versionId: string }): Promise<SignatureOut[]> {
  const rows = await executor.select().from(signatures).where(eq(signatures.versionId, versionId)).orderBy(asc(signatures.signedAt), asc(signatures.id));
  return rows.map((s) => ({
    id: s.id,
    signer: { id: s.signerId, name: s.signerName },
    signerRole: s.signerRole,
    at: s.signedAt,
    meaning: s.meaning,
    meaningLabel: SIGNATURE_MEANING_WORDS[s.meaning],
    contentSha256: s.contentSha256,
    comment: s.comment,
  }));
}

export interface VersionPeople {
  submittedBy: { id: string; name: string } | null;
  returnedBy: { id: string; name: string } | null;
  returnedAt: Date | null;
  withdrawnBy: { id: string; name: string } | null;
  withdrawnAt: Date | null;
  withdrawnReason: string | null;
  reviewBy: Date | null;
}

/** Who moved the version through its states, and its review date. */
export async function versionPeople(executor: Executor, { versionId }: { versionId: string }): Promise<VersionPeople> {
  const submitter = alias(users, "submitter");
  const returner = alias(users, "returner");
  const withdrawer = alias(users, "withdrawer");
  const [row] = await executor
    .select({
      v: intervalVersions,
      submitter: { id: submitter.id, name: submitter.name },
      returner: { id: returner.id, name: returner.name },
      withdrawer: { id: withdrawer.id, name: withdrawer.name },
    })
    .from(intervalVersions)
    .leftJoin(submitter, eq(submitter.id, intervalVersions.submittedBy))
    .leftJoin(returner, eq(returner.id, intervalVersions.returnedBy))
    .leftJoin(withdrawer, eq(withdrawer.id, intervalVersions.withdrawnBy))
    .where(eq(intervalVersions.id, versionId))
    .limit(1);
  const person = (p: { id: string | null; name: string | null } | null) => (p && p.id !== null ? { id: p.id, name: p.name! } : null);
  return {
    submittedBy: person(row?.submitter ?? null),
    returnedBy: person(row?.returner ?? null),
    returnedAt: row?.v.returnedAt ?? null,
    withdrawnBy: person(row?.withdrawer ?? null),
    withdrawnAt: row?.v.withdrawnAt ?? null,
    withdrawnReason: row?.v.withdrawnReason ?? null,
    reviewBy: row?.v.reviewBy ?? null,
  };
}

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
