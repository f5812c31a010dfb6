import "server-only";
import { eq, sql } from "drizzle-orm";
import type { Executor } from "../client";
import { signInFailures } from "../schema";

export interface ThrottlePolicy {
  maxFailures: number;
  lockMinutes: number;
}

/** Minutes left on a lock for this e-mail, or 0 when sign-in may be tried. */
export async function minutesLocked(executor: Executor, { email }: { email: string }): Promise<number> {
  const [row] = await executor.select().from(signInFailures).where(eq(signInFailures.email, email)).limit(1);
  if (!row?.lockedUntil) return 0;
  const ms = row.lockedUntil.getTime() - Date.now();
  return ms > 0 ? Math.ceil(ms / 60_000) : 0;
}

/**
 * Counts a failed sign-in. Failures older than the lock window are forgotten; reaching the
 * maximum within the window locks the address for the lock period. Returns the minutes locked.
 */
export async function recordFailure(
  executor: Executor,
  { email, policy }: { email: string; policy: ThrottlePolicy },
): Promise<number> {
  const window = sql.raw(`interval '${policy.lockMinutes} minutes'`);
  const [row] = await executor
    .insert(signInFailures)
    .values({ email, failures: 1, firstFailureAt: new Date() })
    .onConflictDoUpdate({
      target: signInFailures.email,
      set: {
        failures: sql`case when ${signInFailures.firstFailureAt} < now() - ${window} or ${signInFailures.lockedUntil} < now() then 1 else ${signInFailures.failures} + 1 end`,
        firstFailureAt: sql`case when ${signInFailures.firstFailureAt} < now() - ${window} or ${signInFailures.lockedUntil} < now() then now() else ${signInFailures.firstFailureAt} end`,
        lockedUntil: sql`case when ${signInFailures.lockedUntil} < now() then null else ${signInFailures.lockedUntil} end`,
      },
    })
    .returning();
  if (row.failures >= policy.maxFailures) {
    await executor
      .update(signInFailures)
      .set({ lockedUntil: sql`now() + ${window}` })
      .where(eq(signInFailures.email, email));
    return policy.lockMinutes;
  }
  return 0;
}

export async function clearFailures(executor: Executor, { email }: { email: string }): Promise<void> {
  await executor.delete(signInFailures).where(eq(signInFailures.email, email));
}
