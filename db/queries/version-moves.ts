import "server-only";
import { and, asc, desc, eq, inArray, isNotNull, sql } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import { verifyPassword } from "@/lib/auth/password";
import { canonicalContentOf } from "@/lib/versions/canonical-content";
import { refusalOfMove, SIGNATURE_MEANING_LABELS, type SignatureMeaning, type VersionMove } from "@/lib/versions/state-machine";
import type { Database, Executor } from "../client";
import { uniqueViolationOf } from "../errors";
import { analytes, auditEvents, intervalPartitions, intervalVersions, signatures, signingFailures, users, type Analyte, type IntervalVersion } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { findIntervalVersion, type VersionOut } from "./interval-versions";
import { inForceMessage, withdrawnMessage } from "@/lib/versions/lis-messages";
import { activeAddressesOf, activeLisContactAddresses, queueMessage, queueMessageToEach } from "./outbox";
import { normaliseEmail } from "./users";
import { canonicalVersionOf } from "../version-content";

/** Consecutive failed signings after which signing locks for the account until an admin unlocks it. */
export const SIGNING_FAILURE_LIMIT = 5;

export const SIGNING_LOCKED_MESSAGE = `Signing is locked for your account after ${SIGNING_FAILURE_LIMIT} failed attempts: an administrator must unlock it.`;

/** Who asks for a move: the session's user and the session's own id (next-auth token `sid`). */
export interface MoveCaller {
  id: string;
  email: string;
  sessionId: string | null;
}

/** What a signature asks for: the password always, the e-mail too at the first signature of a session. */
export interface SigningCredentials {
  password: string;
  email?: string | null;
}

type Person = { id: string; name: string; email: string; role: string; active: boolean };

const actorOf = (user: { id: string; email: string }): Actor => ({ id: user.id, label: user.email });

function notFound(id: string): AppError {
  return new AppError("not_found", `There is no interval version with the id ${id}.`);
}

/** The version and its analyte, locked as the move needs (the version FOR UPDATE, the analyte FOR SHARE). */
async function lockVersion(tx: Executor, id: string): Promise<{ version: IntervalVersion; analyte: Analyte }> {
  const [version] = await tx.select().from(intervalVersions).where(eq(intervalVersions.id, id)).for("update");
  if (!version) throw notFound(id);
  // FOR SHARE: an analyte edit (updateAnalyte locks FOR UPDATE) waits until this move is done, so
  // the unit and decimals checked here are those the version leaves draft or goes in force with.
  const [analyte] = await tx.select().from(analytes).where(eq(analytes.id, version.analyteId)).for("share");
  return { version, analyte };
}

async function readVersion(executor: Executor, id: string): Promise<{ version: IntervalVersion; analyte: Analyte }> {
  const [row] = await executor
    .select({ version: intervalVersions, analyte: analytes })
    .from(intervalVersions)
    .innerJoin(analytes, eq(analytes.id, intervalVersions.analyteId))
    .where(eq(intervalVersions.id, id));
  if (!row) throw notFound(id);
  return row;
}

function assertState(move: VersionMove, version: IntervalVersion, analyte: Analyte): void {
  const refusal = refusalOfMove(move, { state: version.state, number: version.number, analyte: analyte.code });
  if (refusal) throw new AppError("conflict", refusal);
}

/** 409 when the analyte's unit or decimals changed since the version was drafted. */
function assertUnitMatches(version: IntervalVersion, analyte: Analyte): void {
  if (version.unit === analyte.unit && version.decimals === analyte.decimals) return;
  throw new AppError(
    "conflict",
    `Version ${version.number} of ${analyte.code} states its limits in ${version.unit} with ${version.decimals} decimals, but ${analyte.code} is now in ${analyte.unit} with ${analyte.decimals} decimals: draft a new version.`,
  );
}

/**
 * The signer's authority as the database holds it at this moment (not as the session remembers
 * it): an active director. Read FOR SHARE inside the move's transaction, so a role change or a
 * deactivation cannot slip in between the check and the commit.
 */
async function directorNow(executor: Executor, userId: string, { lock }: { lock: boolean }): Promise<Person> {
  const query = executor
    .select({ id: users.id, name: users.name, email: users.email, role: users.role, active: users.active })
    .from(users)
    .where(eq(users.id, userId));
  const [user] = lock ? await query.for("share") : await query;
  if (!user || !user.active) throw new AppError("forbidden", "Your account is not active: it may not sign, return or withdraw a version.");
  if (user.role !== "director") {
    throw new AppError("forbidden", `Only a laboratory director may do this; your role is now ${user.role}.`);
  }
  return user;
}

/** The audit actions that make a person a version's author: drafting, revising, submitting it. */
const AUTHORING_ACTIONS = ["interval_version.created", "interval_version.updated", "interval_version.submitted"] as const;

/**
 * What the person did to the version, from its columns and its whole audit history: a return
 * clears `submitted_by` and a later revision replaces `updated_by`, but whoever submitted or
 * revised it once stays its author.
 */
async function authorshipOf(executor: Executor, version: IntervalVersion, userId: string): Promise<string[]> {
  const rows = await executor
    .selectDistinct({ action: auditEvents.action })
    .from(auditEvents)
    .where(
      and(
        eq(auditEvents.entityType, "interval_version"),
        eq(auditEvents.entityId, version.id),
        eq(auditEvents.actorId, userId),
        inArray(auditEvents.action, [...AUTHORING_ACTIONS]),
      ),
    );
  const did = new Set(rows.map((r) => r.action));
  const words: string[] = [];
  if (version.createdBy === userId || did.has("interval_version.created")) words.push("drafted");
  if (version.updatedBy === userId) words.push("last revised");
  else if (did.has("interval_version.updated")) words.push("revised");
  if (version.submittedBy === userId || did.has("interval_version.submitted")) words.push("submitted");
  return words;
}

/**
 * What a person did to a version as its author ("drafted", "last revised" or "revised",
 * "submitted"): the words the duty rule refuses with, for pages that offer only the moves the
 * server will allow. Empty for an unknown version or a person who never authored it.
 */
export async function versionAuthorship(executor: Executor, { versionId, userId }: { versionId: string; userId: string }): Promise<string[]> {
  const [version] = await executor.select().from(intervalVersions).where(eq(intervalVersions.id, versionId));
  return version ? authorshipOf(executor, version, userId) : [];
}

/** Segregation of duties: a director never acts on a version they drafted, revised or submitted (ever, not only last). */
async function assertDuties(executor: Executor, move: VersionMove, version: IntervalVersion, analyte: Analyte, userId: string): Promise<void> {
  const roles = await authorshipOf(executor, version, userId);
  if (roles.length === 0) return;
  const what = { return: "return it", sign: "sign it off", review: "review it", withdraw: "withdraw it", reinstate: "reinstate it", submit: "submit it" }[move];
  throw new AppError(
    "forbidden",
    `You ${roles.join(" and ")} version ${version.number} of ${analyte.code}: another director must ${what} (a director never signs off, returns or withdraws a version they drafted, revised or submitted).`,
  );
}

async function lockStateOf(executor: Executor, userId: string, { lock }: { lock: boolean }) {
  const query = executor.select().from(signingFailures).where(eq(signingFailures.userId, userId));
  const [row] = lock ? await query.for("update") : await query;
  return row;
}

/** Whether this session already holds a signature of the user (then the password alone suffices). */
async function signedInSession(executor: Executor, { userId, sessionId }: { userId: string; sessionId: string | null }): Promise<boolean> {
  if (!sessionId) return false;
  const [row] = await executor
    .select({ id: signatures.id })
    .from(signatures)
    .where(and(eq(signatures.signerId, userId), eq(signatures.sessionId, sessionId)))
    .limit(1);
  return Boolean(row);
}

/**
 * Counts a failed signing in its own transaction (it must stay counted although the request
 * fails), audits it, and at the limit locks signing for the account and alerts every active
 * admin. Returns the message the refusal gives.
 */
async function recordSigningFailure(
  database: Database,
  { user, reason, versionId, at }: { user: Person; reason: string; versionId: string; at: Date },
): Promise<string> {
  return database.transaction(async (tx) => {
    const [row] = await tx
      .insert(signingFailures)
      .values({ userId: user.id, failures: 1, lastFailureAt: at })
      .onConflictDoUpdate({ target: signingFailures.userId, set: { failures: sql`${signingFailures.failures} + 1`, lastFailureAt: at } })
      .returning();
    await recordAuditEvent(tx, {
      actor: actorOf(user),
      action: "signature.failed",
      entityType: "interval_version",
      entityId: versionId,
      summary: `A signature by ${user.email} was refused: ${reason} (${row.failures} in a row)`,
      details: { reason, failures: row.failures },
    });
    // Another failure at the same moment locked it already.
    if (row.lockedAt) return `Signing refused: ${reason} ${SIGNING_LOCKED_MESSAGE}`;
    if (row.failures < SIGNING_FAILURE_LIMIT) {
      const left = SIGNING_FAILURE_LIMIT - row.failures;
      return `Signing refused: ${reason} ${left} attempt${left === 1 ? "" : "s"} left before signing locks for your account.`;
    }
    await tx.update(signingFailures).set({ lockedAt: at }).where(eq(signingFailures.userId, user.id));
    await recordAuditEvent(tx, {
      actor: actorOf(user),
      action: "signing.locked",
      entityType: "user",
      entityId: user.id,
      summary: `Signing locked for ${user.email} after ${row.failures} failed attempts`,
      details: { failures: row.failures },
    });
    await queueMessage(tx, {
      kind: "signing.locked",
      recipients: await activeAddressesOf(tx, { roles: ["admin"] }),
      subject: `Bellwether: signing locked for ${user.name}`,
      text:
        `Signing is locked for ${user.name} (${user.email}) after ${row.failures} failed attempts in a row, the last at ${at.toISOString()}.\n\n` +
        `If the attempts were theirs, unlock signing for the account in Bellwether's user management. If not, treat it as an attempt to sign in their name.`,
      entityType: "user",
      entityId: user.id,
    });
    return `Signing refused: ${reason} ${SIGNING_LOCKED_MESSAGE}`;
  });
}

/**
 * Checks a signer's credentials before the move's transaction: the password (and, at the first
 * signature of the session, the e-mail) against the account; a refusal is counted.
 */
async function checkCredentials(
  database: Database,
  { caller, credentials, versionId, at }: { caller: MoveCaller; credentials: SigningCredentials; versionId: string; at: Date },
): Promise<void> {
  const user = await directorNow(database, caller.id, { lock: false });
  const lock = await lockStateOf(database, user.id, { lock: false });
  if (lock?.lockedAt) throw new AppError("forbidden", SIGNING_LOCKED_MESSAGE);
  const first = !(await signedInSession(database, { userId: user.id, sessionId: caller.sessionId }));
  if (first && !credentials.email) {
    throw new AppError("forbidden", "Your first signature in this session needs your e-mail as well as your password.", { errors: [{ path: "email", message: "Give your e-mail." }] });
  }
  const [{ passwordHash }] = await database.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, user.id));
  const passwordOk = await verifyPassword(credentials.password, passwordHash);
  const emailOk = !first || normaliseEmail(credentials.email ?? "") === user.email;
  if (passwordOk && emailOk) return;
  const reason = first ? "the e-mail or password is not right." : "the password is not right.";
  throw new AppError("forbidden", await recordSigningFailure(database, { user, reason, versionId, at }));
}

/** The content a signature covers, read in the signing transaction. */
/** The canonical content of a version and its SHA-256, recomputed now (GET …/canonical-content). */
export async function canonicalContentOfVersion(executor: Executor, { id }: { id: string }): Promise<{ canonicalContent: string; contentSha256: string }> {
  const found = await readVersion(executor, id);
  const { text, sha256 } = canonicalContentOf(await canonicalVersionOf(executor, found));
  return { canonicalContent: text, contentSha256: sha256 };
}

async function insertSignature(
  tx: Executor,
  { version, analyte, signer, meaning, comment, sessionId, at }: { version: IntervalVersion; analyte: Analyte; signer: Person; meaning: SignatureMeaning; comment: string | null; sessionId: string | null; at: Date },
) {
  const { text, sha256 } = canonicalContentOf(await canonicalVersionOf(tx, { version, analyte }));
  const [signature] = await tx
    .insert(signatures)
    .values({
      versionId: version.id,
      signerId: signer.id,
      signerName: signer.name,
      signerRole: "director",
      meaning,
      comment,
      canonicalContent: text,
      contentSha256: sha256,
      signedAt: at,
      sessionId,
    })
    .returning();
  await recordAuditEvent(tx, {
    actor: actorOf(signer),
    action: "signature.created",
    entityType: "interval_version",
    entityId: version.id,
    summary: `${signer.name} signed version ${version.number} of ${analyte.code}: ${SIGNATURE_MEANING_LABELS[meaning]}`,
    details: { signatureId: signature.id, meaning, contentSha256: sha256, at: at.toISOString(), comment },
  });
  return signature;
}

/** The signing transaction's checks again, under its locks: authority, lock, duties, state, unit. */
async function signingChecks(
  tx: Executor,
  { move, version, analyte, caller }: { move: VersionMove; version: IntervalVersion; analyte: Analyte; caller: MoveCaller },
): Promise<Person> {
  const signer = await directorNow(tx, caller.id, { lock: true });
  const lock = await lockStateOf(tx, signer.id, { lock: true });
  if (lock?.lockedAt) throw new AppError("forbidden", SIGNING_LOCKED_MESSAGE);
  assertState(move, version, analyte);
  await assertDuties(tx, move, version, analyte, signer.id);
  assertUnitMatches(version, analyte);
  return signer;
}

async function resetFailures(tx: Executor, userId: string): Promise<void> {
  await tx.update(signingFailures).set({ failures: 0 }).where(eq(signingFailures.userId, userId));
}

function addMonths(at: Date, months: number): Date {
  const d = new Date(at);
  d.setUTCMonth(d.getUTCMonth() + months);
  return d;
}

/** Addresses of the version's author and submitter (active accounts only). */
async function authorAddresses(executor: Executor, version: IntervalVersion): Promise<string[]> {
  const ids = [version.createdBy, version.submittedBy].filter((x): x is string => x !== null);
  if (ids.length === 0) return [];
  const rows = await executor.select({ email: users.email }).from(users).where(and(inArray(users.id, ids), eq(users.active, true)));
  return rows.map((r) => r.email);
}

/** Read-only checks before credentials are asked for, so a move refused anyway costs no attempt. */
async function precheck(database: Database, { move, id, caller }: { move: VersionMove; id: string; caller: MoveCaller }) {
  const found = await readVersion(database, id);
  const user = await directorNow(database, caller.id, { lock: false });
  assertState(move, found.version, found.analyte);
  await assertDuties(database, move, found.version, found.analyte, user.id);
  return found;
}

const versionLabel = (version: IntervalVersion, analyte: Analyte) => `version ${version.number} of ${analyte.code} (${analyte.name})`;

/**
 * Tells every active LIS connection's contact (one message per address) that a version went in
 * force, with its limits by partition, so that the LIS range tables are refreshed.
 */
async function tellLisInForce(
  tx: Executor,
  { version, analyte, at, reinstatedAfter }: { version: IntervalVersion; analyte: Analyte; at: Date; reinstatedAfter?: { number: number; reason: string } },
): Promise<void> {
  const recipients = await activeLisContactAddresses(tx);
  if (recipients.length === 0) return;
  const partitions = await tx
    .select({ sex: intervalPartitions.sex, ageFromDays: intervalPartitions.ageFromDays, ageToDays: intervalPartitions.ageToDays, low: intervalPartitions.low, high: intervalPartitions.high })
    .from(intervalPartitions)
    .where(eq(intervalPartitions.versionId, version.id))
    .orderBy(asc(intervalPartitions.position));
  const { subject, text } = inForceMessage({
    analyte,
    version,
    partitions: partitions.map((p) => ({ ...p, sex: p.sex as "F" | "M" | null })),
    effectiveFrom: at,
    reinstatedAfter,
  });
  await queueMessageToEach(tx, { kind: "version.in_force", recipients, subject, text, entityType: "interval_version", entityId: version.id });
}

/**
 * Submits a draft for sign-off (a director or a scientist): it is no longer editable. Queues
 * "version.submitted" to every active director but the submitter.
 */
export async function submitIntervalVersion(database: Database, { id, caller, at = new Date() }: { id: string; caller: MoveCaller; at?: Date }): Promise<VersionOut> {
  await database.transaction(async (tx) => {
    const { version, analyte } = await lockVersion(tx, id);
    assertState("submit", version, analyte);
    assertUnitMatches(version, analyte);
    const [{ partitions }] = await tx.select({ partitions: sql<number>`count(*)::int` }).from(intervalPartitions).where(eq(intervalPartitions.versionId, id));
    if (partitions === 0) throw new AppError("conflict", `Version ${version.number} of ${analyte.code} has no partitions: add one before submitting.`);
    const [submitter] = await tx.select({ name: users.name }).from(users).where(eq(users.id, caller.id));
    await tx.update(intervalVersions).set({ state: "awaiting_signoff", submittedBy: caller.id, submittedAt: at }).where(eq(intervalVersions.id, id));
    await recordAuditEvent(tx, {
      actor: actorOf(caller),
      action: "interval_version.submitted",
      entityType: "interval_version",
      entityId: id,
      summary: `Submitted version ${version.number} of ${analyte.code} for sign-off`,
      details: { analyte: analyte.code, number: version.number, from: "draft", to: "awaiting_signoff" },
    });
    const directors = (await activeAddressesOf(tx, { roles: ["director"] })).filter((e) => e !== caller.email);
    await queueMessage(tx, {
      kind: "version.submitted",
      recipients: directors,
      subject: `Bellwether: ${analyte.code} version ${version.number} awaits sign-off`,
      text: `${submitter?.name ?? caller.email} submitted ${versionLabel(version, analyte)} for sign-off on ${at.toISOString()}.\n\nA director who did not draft, revise or submit it may sign it off or return it with a comment.`,
      entityType: "interval_version",
      entityId: id,
    });
  });
  return findIntervalVersion(database, { id });
}

/** Returns a version awaiting sign-off to draft with the director's comment. */
export async function returnIntervalVersion(
  database: Database,
  { id, comment, caller, at = new Date() }: { id: string; comment: string; caller: MoveCaller; at?: Date },
): Promise<VersionOut> {
  await database.transaction(async (tx) => {
    const { version, analyte } = await lockVersion(tx, id);
    const director = await directorNow(tx, caller.id, { lock: true });
    assertState("return", version, analyte);
    await assertDuties(tx, "return", version, analyte, director.id);
    const recipients = await authorAddresses(tx, version);
    await tx
      .update(intervalVersions)
      .set({ state: "draft", returnComment: comment, returnedBy: director.id, returnedAt: at, submittedBy: null, submittedAt: null })
      .where(eq(intervalVersions.id, id));
    await recordAuditEvent(tx, {
      actor: actorOf(director),
      action: "interval_version.returned",
      entityType: "interval_version",
      entityId: id,
      summary: `Returned version ${version.number} of ${analyte.code} to draft`,
      details: { analyte: analyte.code, number: version.number, from: "awaiting_signoff", to: "draft", comment, submittedBy: version.submittedBy },
    });
    await queueMessage(tx, {
      kind: "version.returned",
      recipients,
      subject: `Bellwether: ${analyte.code} version ${version.number} returned to draft`,
      text: `${director.name} returned ${versionLabel(version, analyte)} to draft on ${at.toISOString()} with this comment:\n\n${comment}`,
      entityType: "interval_version",
      entityId: id,
    });
  });
  return findIntervalVersion(database, { id });
}

function conflictOfSimultaneousSigning(err: unknown, analyte: string): never {
  if (uniqueViolationOf(err) === "interval_versions_one_in_force") {
    throw new AppError("conflict", `Another version of ${analyte} was put in force at the same moment: only one version of an analyte can be in force. Reload and review what is in force now.`);
  }
  throw err;
}

/**
 * Signs a version awaiting sign-off: it goes in force from the moment of signing, its review is
 * due after the analyte's review period, and the version in force before it is superseded in
 * the same transaction. Two signings of one analyte at the same moment meet the partial unique
 * index interval_versions_one_in_force: the second answers 409.
 */
export async function signIntervalVersion(
  database: Database,
  { id, credentials, caller, at = new Date() }: { id: string; credentials: SigningCredentials; caller: MoveCaller; at?: Date },
): Promise<VersionOut> {
  const { analyte: seen } = await precheck(database, { move: "sign", id, caller });
  await checkCredentials(database, { caller, credentials, versionId: id, at });
  try {
    await database.transaction(async (tx) => {
      const { version, analyte } = await lockVersion(tx, id);
      const signer = await signingChecks(tx, { move: "sign", version, analyte, caller });
      const signature = await insertSignature(tx, { version, analyte, signer, meaning: "approved_for_clinical_use", comment: null, sessionId: caller.sessionId, at });
      const superseded = await tx
        .update(intervalVersions)
        .set({ state: "superseded", effectiveTo: at })
        .where(and(eq(intervalVersions.analyteId, analyte.id), eq(intervalVersions.state, "in_force")))
        .returning({ id: intervalVersions.id, number: intervalVersions.number });
      const reviewBy = addMonths(at, analyte.reviewMonths);
      await tx.update(intervalVersions).set({ state: "in_force", effectiveFrom: at, reviewBy }).where(eq(intervalVersions.id, id));
      for (const old of superseded) {
        await recordAuditEvent(tx, {
          actor: actorOf(signer),
          action: "interval_version.superseded",
          entityType: "interval_version",
          entityId: old.id,
          summary: `Version ${old.number} of ${analyte.code} superseded by version ${version.number}`,
          details: { analyte: analyte.code, number: old.number, from: "in_force", to: "superseded", supersededBy: id, effectiveTo: at.toISOString() },
        });
      }
      await recordAuditEvent(tx, {
        actor: actorOf(signer),
        action: "interval_version.signed",
        entityType: "interval_version",
        entityId: id,
        summary: `Signed off version ${version.number} of ${analyte.code}: in force from ${at.toISOString()}`,
        details: { analyte: analyte.code, number: version.number, from: "awaiting_signoff", to: "in_force", signatureId: signature.id, contentSha256: signature.contentSha256, effectiveFrom: at.toISOString(), reviewBy: reviewBy.toISOString(), superseded: superseded.map((s) => s.id) },
      });
      await resetFailures(tx, signer.id);
      await queueMessage(tx, {
        kind: "version.signed",
        recipients: await authorAddresses(tx, version),
        subject: `Bellwether: ${analyte.code} version ${version.number} signed off and in force`,
        text:
          `${signer.name} signed off ${versionLabel(version, analyte)} on ${at.toISOString()} (${SIGNATURE_MEANING_LABELS.approved_for_clinical_use}). It is in force from that moment; its review is due by ${reviewBy.toISOString().slice(0, 10)}.` +
          (superseded.length ? `\n\nIt supersedes version ${superseded.map((s) => s.number).join(", ")}.` : "") +
          `\n\nSHA-256 of the signed content: ${signature.contentSha256}`,
        entityType: "interval_version",
        entityId: id,
      });
      await tellLisInForce(tx, { version, analyte, at });
    });
  } catch (err) {
    conflictOfSimultaneousSigning(err, seen.code);
  }
  return findIntervalVersion(database, { id });
}

/** Signs a review of a version in force that still fits: the next review falls one review period on. */
export async function reviewIntervalVersion(
  database: Database,
  { id, comment, credentials, caller, at = new Date() }: { id: string; comment: string; credentials: SigningCredentials; caller: MoveCaller; at?: Date },
): Promise<VersionOut> {
  await precheck(database, { move: "review", id, caller });
  await checkCredentials(database, { caller, credentials, versionId: id, at });
  await database.transaction(async (tx) => {
    const { version, analyte } = await lockVersion(tx, id);
    const signer = await signingChecks(tx, { move: "review", version, analyte, caller });
    const signature = await insertSignature(tx, { version, analyte, signer, meaning: "reviewed_still_valid", comment, sessionId: caller.sessionId, at });
    const reviewBy = addMonths(at, analyte.reviewMonths);
    await tx.update(intervalVersions).set({ reviewBy }).where(eq(intervalVersions.id, id));
    await recordAuditEvent(tx, {
      actor: actorOf(signer),
      action: "interval_version.reviewed",
      entityType: "interval_version",
      entityId: id,
      summary: `Reviewed version ${version.number} of ${analyte.code}: still valid; next review by ${reviewBy.toISOString().slice(0, 10)}`,
      details: { analyte: analyte.code, number: version.number, signatureId: signature.id, comment, reviewBy: { from: version.reviewBy?.toISOString() ?? null, to: reviewBy.toISOString() } },
    });
    await resetFailures(tx, signer.id);
  });
  return findIntervalVersion(database, { id });
}

/**
 * Withdraws a version in force (signed, with a reason). With `reinstatePrevious`, the most
 * recently superseded version of the analyte goes back in force in the same transaction with a
 * new "approved_for_clinical_use" signature; otherwise no version of the analyte is in force.
 */
export async function withdrawIntervalVersion(
  database: Database,
  {
    id,
    reason,
    reinstatePrevious = false,
    credentials,
    caller,
    at = new Date(),
  }: { id: string; reason: string; reinstatePrevious?: boolean; credentials: SigningCredentials; caller: MoveCaller; at?: Date },
): Promise<VersionOut> {
  const { version: seen, analyte: seenAnalyte } = await precheck(database, { move: "withdraw", id, caller });
  if (reinstatePrevious) {
    const previous = await previousVersion(database, seen.analyteId);
    if (!previous) throw new AppError("conflict", `There is no superseded version of ${seenAnalyte.code} to reinstate.`);
    await assertDuties(database, "reinstate", previous, seenAnalyte, caller.id);
  }
  await checkCredentials(database, { caller, credentials, versionId: id, at });
  try {
    await database.transaction(async (tx) => {
      const { version, analyte } = await lockVersion(tx, id);
      const signer = await directorNow(tx, caller.id, { lock: true });
      const lock = await lockStateOf(tx, signer.id, { lock: true });
      if (lock?.lockedAt) throw new AppError("forbidden", SIGNING_LOCKED_MESSAGE);
      assertState("withdraw", version, analyte);
      await assertDuties(tx, "withdraw", version, analyte, signer.id);
      const signature = await insertSignature(tx, { version, analyte, signer, meaning: "withdrawn_from_use", comment: reason, sessionId: caller.sessionId, at });
      await tx
        .update(intervalVersions)
        .set({ state: "withdrawn", effectiveTo: at, withdrawnBy: signer.id, withdrawnAt: at, withdrawnReason: reason })
        .where(eq(intervalVersions.id, id));
      await recordAuditEvent(tx, {
        actor: actorOf(signer),
        action: "interval_version.withdrawn",
        entityType: "interval_version",
        entityId: id,
        summary: `Withdrew version ${version.number} of ${analyte.code}`,
        details: { analyte: analyte.code, number: version.number, from: "in_force", to: "withdrawn", reason, signatureId: signature.id, reinstatePrevious },
      });
      let reinstated: IntervalVersion | null = null;
      if (reinstatePrevious) {
        const previous = await previousVersion(tx, analyte.id, { lock: true });
        if (!previous) throw new AppError("conflict", `There is no superseded version of ${analyte.code} to reinstate.`);
        await assertDuties(tx, "reinstate", previous, analyte, signer.id);
        assertUnitMatches(previous, analyte);
        const again = await insertSignature(tx, { version: previous, analyte, signer, meaning: "approved_for_clinical_use", comment: `Reinstated on the withdrawal of version ${version.number}: ${reason}`, sessionId: caller.sessionId, at });
        const reviewBy = addMonths(at, analyte.reviewMonths);
        await tx.update(intervalVersions).set({ state: "in_force", effectiveFrom: at, effectiveTo: null, reviewBy }).where(eq(intervalVersions.id, previous.id));
        await recordAuditEvent(tx, {
          actor: actorOf(signer),
          action: "interval_version.reinstated",
          entityType: "interval_version",
          entityId: previous.id,
          summary: `Reinstated version ${previous.number} of ${analyte.code} on the withdrawal of version ${version.number}`,
          details: { analyte: analyte.code, number: previous.number, from: "superseded", to: "in_force", signatureId: again.id, contentSha256: again.contentSha256, reviewBy: reviewBy.toISOString() },
        });
        reinstated = previous;
      }
      await resetFailures(tx, signer.id);
      const recipients = await activeAddressesOf(tx, { roles: ["director", "scientist"] });
      await queueMessage(tx, {
        kind: "version.withdrawn",
        recipients,
        subject: `Bellwether: ${analyte.code} version ${version.number} withdrawn`,
        text:
          `${signer.name} withdrew ${versionLabel(version, analyte)} on ${at.toISOString()}. Reason: ${reason}\n\n` +
          (reinstated
            ? `Version ${reinstated.number} of ${analyte.code} is back in force from that moment, signed again by ${signer.name}.`
            : `No interval of ${analyte.code} is in force now: scoring answers every ${analyte.code} value with an error until a version is signed off.`),
        entityType: "interval_version",
        entityId: id,
      });
      if (reinstated) {
        await tellLisInForce(tx, { version: reinstated, analyte, at, reinstatedAfter: { number: version.number, reason } });
      } else {
        const lis = withdrawnMessage({ analyte, version, at, reason });
        await queueMessageToEach(tx, { kind: "version.withdrawn", recipients: await activeLisContactAddresses(tx), ...lis, entityType: "interval_version", entityId: id });
      }
    });
  } catch (err) {
    conflictOfSimultaneousSigning(err, seenAnalyte.code);
  }
  return findIntervalVersion(database, { id });
}

/** The analyte's most recently superseded version (the one a withdrawal may reinstate). */
async function previousVersion(executor: Executor, analyteId: string, { lock = false }: { lock?: boolean } = {}): Promise<IntervalVersion | undefined> {
  const query = executor
    .select()
    .from(intervalVersions)
    .where(and(eq(intervalVersions.analyteId, analyteId), eq(intervalVersions.state, "superseded"), isNotNull(intervalVersions.effectiveTo)))
    .orderBy(desc(intervalVersions.effectiveTo), desc(intervalVersions.number))
    .limit(1);
  const [row] = lock ? await query.for("update") : await query;
  return row;
}

/** Lifts a signing lock (an admin): the count starts again from zero. 404 for an unknown user. */
export async function unlockSigning(
  database: Database,
  { userId, actor }: { userId: string; actor: Actor },
): Promise<{ user: { id: string; name: string; email: string }; signingLocked: false; wasLocked: boolean }> {
  return database.transaction(async (tx) => {
    const [user] = await tx.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.id, userId));
    if (!user) throw new AppError("not_found", `There is no user with the id ${userId}.`);
    const [before] = await tx.select().from(signingFailures).where(eq(signingFailures.userId, userId)).for("update");
    const wasLocked = Boolean(before?.lockedAt);
    if (before) await tx.update(signingFailures).set({ failures: 0, lockedAt: null }).where(eq(signingFailures.userId, userId));
    await recordAuditEvent(tx, {
      actor,
      action: "signing.unlocked",
      entityType: "user",
      entityId: userId,
      summary: wasLocked ? `Unlocked signing for ${user.email}` : `Cleared the failed signings of ${user.email} (signing was not locked)`,
      details: { failures: before?.failures ?? 0, lockedAt: before?.lockedAt?.toISOString() ?? null },
    });
    return { user, signingLocked: false as const, wasLocked };
  });
}
