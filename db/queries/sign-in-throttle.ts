import "server-only";
import { and, eq, isNull, lt, or } from "drizzle-orm";
import {
  chargeAccountAttempt,
  chargeAddressAttempt,
  describeWait,
  refundAddressAttempt,
  type Charge,
  type FailureCounter,
  type ThrottlePolicy,
} from "@/lib/auth/sign-in-throttle";
import type { Database, Executor } from "../client";
import { signInAccountFailures, signInAddressFailures } from "../schema";
import { recordAuditEvent } from "./audit";

/** Who is trying: the normalised e-mail, the client's address, and the bucket it counts under. */
export interface SignInAttempt {
  email: string;
  address: string;
  bucket: string;
}

export type Admission =
  | { admitted: false; scope: "account" | "address"; waitSeconds: number }
  | { admitted: true; account: Extract<Charge, { refused: false }>; address: Extract<Charge, { refused: false }> };

// A placeholder row's last failure lies before any window, so the pure rules treat it as fresh.
const LONG_AGO = new Date(0);

function counterOf(row: { failures: number; lastFailureAt: Date; blockedUntil: Date | null }): FailureCounter {
  return { failures: row.failures, lastFailureAt: row.lastFailureAt, blockedUntil: row.blockedUntil };
}

/** Forgets counters with no failure within the window and no hold still running. */
async function purgeForgotten(tx: Executor, now: Date, policy: ThrottlePolicy): Promise<void> {
  const before = new Date(now.getTime() - policy.windowSeconds * 1000);
  const quiet = (t: typeof signInAddressFailures | typeof signInAccountFailures) =>
    and(lt(t.lastFailureAt, before), or(isNull(t.blockedUntil), lt(t.blockedUntil, now)));
  await tx.delete(signInAddressFailures).where(quiet(signInAddressFailures));
  await tx.delete(signInAccountFailures).where(quiet(signInAccountFailures));
}

/**
 * Charges a sign-in attempt before its password is checked, or refuses it while the address or
 * this e-mail from this address must wait. Both rows are locked (address first, always) so that
 * parallel attempts are counted one after another.
 */
export async function admitSignInAttempt(
  database: Database,
  { attempt, policy, now = new Date() }: { attempt: SignInAttempt; policy: ThrottlePolicy; now?: Date },
): Promise<Admission> {
  return database.transaction(async (tx) => {
    await purgeForgotten(tx, now, policy);
    await tx
      .insert(signInAddressFailures)
      .values({ address: attempt.bucket, failures: 0, lastFailureAt: LONG_AGO })
      .onConflictDoNothing();
    const [addressRow] = await tx
      .select()
      .from(signInAddressFailures)
      .where(eq(signInAddressFailures.address, attempt.bucket))
      .for("update");
    const address = chargeAddressAttempt(counterOf(addressRow), now, policy);
    if (address.refused) return { admitted: false, scope: "address", waitSeconds: address.waitSeconds };

    const accountKey = and(eq(signInAccountFailures.email, attempt.email), eq(signInAccountFailures.address, attempt.bucket));
    await tx
      .insert(signInAccountFailures)
      .values({ email: attempt.email, address: attempt.bucket, failures: 0, lastFailureAt: LONG_AGO })
      .onConflictDoNothing();
    const [accountRow] = await tx.select().from(signInAccountFailures).where(accountKey).for("update");
    const account = chargeAccountAttempt(counterOf(accountRow), now, policy);
    if (account.refused) return { admitted: false, scope: "account", waitSeconds: account.waitSeconds };

    await tx.update(signInAddressFailures).set(address.counter).where(eq(signInAddressFailures.address, attempt.bucket));
    await tx.update(signInAccountFailures).set(account.counter).where(accountKey);
    return { admitted: true, account, address };
  });
}

/**
 * The password was right: this e-mail from this address starts afresh, and the address gets its
 * charge back. Runs in the caller's transaction, beside the sign-in's own audit event.
 */
export async function settleSuccessfulSignIn(
  tx: Executor,
  { attempt, policy }: { attempt: SignInAttempt; policy: ThrottlePolicy },
): Promise<void> {
  // The address row first, as in admitSignInAttempt, so that the two never wait on each other.
  const [row] = await tx
    .select()
    .from(signInAddressFailures)
    .where(eq(signInAddressFailures.address, attempt.bucket))
    .for("update");
  if (row) {
    await tx
      .update(signInAddressFailures)
      .set(refundAddressAttempt(counterOf(row), policy))
      .where(eq(signInAddressFailures.address, attempt.bucket));
  }
  await tx
    .delete(signInAccountFailures)
    .where(and(eq(signInAccountFailures.email, attempt.email), eq(signInAccountFailures.address, attempt.bucket)));
}

function whereFrom(attempt: SignInAttempt): string {
  return attempt.bucket === attempt.address ? attempt.address : `${attempt.address} (counted as ${attempt.bucket})`;
}

/**
 * The password was wrong: the charge stands. When it started a wait for this e-mail from this
 * address, or held the address, the audit trail says so, naming the e-mail and the address.
 */
export async function settleFailedSignIn(
  database: Database,
  { attempt, admission, userId }: { attempt: SignInAttempt; admission: Extract<Admission, { admitted: true }>; userId: string | null },
): Promise<void> {
  const { account, address } = admission;
  if (account.waitSeconds === 0 && address.waitSeconds === 0) return;
  await database.transaction(async (tx) => {
    const actor = { id: null, label: attempt.email };
    const details = { email: attempt.email, address: attempt.address, bucket: attempt.bucket };
    if (account.waitSeconds > 0) {
      await recordAuditEvent(tx, {
        actor,
        action: "auth.locked",
        entityType: "user",
        entityId: userId,
        summary: `Sign-in for ${attempt.email} from ${whereFrom(attempt)} held for ${describeWait(account.waitSeconds)} after ${account.counter.failures} failed attempts`,
        details: { ...details, failures: account.counter.failures, waitSeconds: account.waitSeconds },
      });
    }
    if (address.waitSeconds > 0) {
      await recordAuditEvent(tx, {
        actor,
        action: "auth.address_locked",
        entityType: "client_address",
        entityId: attempt.bucket,
        summary: `Sign-ins from ${whereFrom(attempt)} held for ${describeWait(address.waitSeconds)} after ${address.counter.failures} failed attempts for any e-mail (the last for ${attempt.email})`,
        details: { ...details, failures: address.counter.failures, waitSeconds: address.waitSeconds },
      });
    }
  });
}
