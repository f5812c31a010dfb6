/**
 * How failed sign-ins slow guessing down without letting anyone lock a named person out.
 *
 * Two counters, both kept per client address (IPv4 address or IPv6 /64):
 * - one e-mail from one address: the first `freeFailures` failures cost nothing; every further
 *   failure makes that pair wait, starting at `firstDelaySeconds` and doubling per failure up to
 *   `maxDelaySeconds`. The same e-mail from another address is not affected, so the person can
 *   always sign in from where they are.
 * - one address, any e-mail: at `addressMaxFailures` failures the address is held for the window,
 *   which stops one address from trying a password on many accounts.
 * Counters are forgotten after `windowSeconds` without a failure.
 *
 * An attempt is charged before the password is checked (and given back when it was right), so
 * that a burst of parallel attempts cannot slip through before the first failure is counted.
 * Pure: the database layer (db/queries/sign-in-throttle.ts) stores what these functions return.
 */
export interface ThrottlePolicy {
  freeFailures: number;
  firstDelaySeconds: number;
  maxDelaySeconds: number;
  addressMaxFailures: number;
  windowSeconds: number;
}

export interface FailureCounter {
  failures: number;
  lastFailureAt: Date;
  blockedUntil: Date | null;
}

export type Charge =
  | { refused: true; waitSeconds: number }
  | { refused: false; counter: FailureCounter; waitSeconds: number };

/** The wait imposed after the n-th failure of one e-mail from one address, in seconds. */
export function waitAfterFailures(failures: number, policy: ThrottlePolicy): number {
  if (failures <= policy.freeFailures) return 0;
  const doublings = failures - policy.freeFailures - 1;
  // 2^30 seconds is decades: any realistic cap is reached long before, and the power stays finite.
  return Math.min(policy.maxDelaySeconds, policy.firstDelaySeconds * 2 ** Math.min(doublings, 30));
}

function secondsUntil(later: Date, now: Date): number {
  return Math.max(1, Math.ceil((later.getTime() - now.getTime()) / 1000));
}

function isBlocked(counter: FailureCounter | undefined, now: Date): counter is FailureCounter & { blockedUntil: Date } {
  return !!counter?.blockedUntil && counter.blockedUntil.getTime() > now.getTime();
}

function withinWindow(counter: FailureCounter, now: Date, policy: ThrottlePolicy): boolean {
  return now.getTime() - counter.lastFailureAt.getTime() < policy.windowSeconds * 1000;
}

/** Charges one attempt for an e-mail from an address, or refuses it while that pair must wait. */
export function chargeAccountAttempt(counter: FailureCounter | undefined, now: Date, policy: ThrottlePolicy): Charge {
  if (isBlocked(counter, now)) return { refused: true, waitSeconds: secondsUntil(counter.blockedUntil, now) };
  const failures = counter && withinWindow(counter, now, policy) ? counter.failures + 1 : 1;
  const waitSeconds = waitAfterFailures(failures, policy);
  return {
    refused: false,
    waitSeconds,
    counter: { failures, lastFailureAt: now, blockedUntil: waitSeconds > 0 ? new Date(now.getTime() + waitSeconds * 1000) : null },
  };
}

/** Charges one attempt from an address (any e-mail), or refuses it while the address is held. */
export function chargeAddressAttempt(counter: FailureCounter | undefined, now: Date, policy: ThrottlePolicy): Charge {
  if (isBlocked(counter, now)) return { refused: true, waitSeconds: secondsUntil(counter.blockedUntil, now) };
  // A hold that has run out starts the count afresh, like a quiet window.
  const fresh = !counter || !withinWindow(counter, now, policy) || counter.blockedUntil !== null;
  const failures = fresh ? 1 : counter.failures + 1;
  const held = failures >= policy.addressMaxFailures;
  return {
    refused: false,
    waitSeconds: held ? policy.windowSeconds : 0,
    counter: { failures, lastFailureAt: now, blockedUntil: held ? new Date(now.getTime() + policy.windowSeconds * 1000) : null },
  };
}

/**
 * Gives back the charge of an attempt whose password was right: one failure fewer for the
 * address (a success must not wipe the count, or signing into one's own account would reset
 * it between guesses at others), and no hold unless the remaining failures reach the limit.
 */
export function refundAddressAttempt(counter: FailureCounter, policy: ThrottlePolicy): FailureCounter {
  const failures = Math.max(0, counter.failures - 1);
  return { ...counter, failures, blockedUntil: failures >= policy.addressMaxFailures ? counter.blockedUntil : null };
}

/** "30 seconds", "1 minute", "15 minutes": waits of a minute or more in whole minutes, rounded up. */
export function describeWait(seconds: number): string {
  if (seconds < 60) return `${seconds} second${seconds === 1 ? "" : "s"}`;
  const minutes = Math.ceil(seconds / 60);
  return `${minutes} minute${minutes === 1 ? "" : "s"}`;
}

export const THROTTLE_MESSAGES = {
  account: (seconds: number) =>
    `Too many failed sign-ins for this e-mail from your address. Wait ${describeWait(seconds)} before trying again.`,
  address: (seconds: number) =>
    `Too many failed sign-ins from your address. Wait ${describeWait(seconds)} before trying again.`,
};
