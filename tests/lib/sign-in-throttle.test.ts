import { describe, expect, it } from "vitest";
import {
  chargeAccountAttempt,
  chargeAddressAttempt,
  describeWait,
  refundAddressAttempt,
  THROTTLE_MESSAGES,
  waitAfterFailures,
  type FailureCounter,
  type ThrottlePolicy,
} from "@/lib/auth/sign-in-throttle";

// The policy as the README's environment table states its defaults: 3 free failures, then 30 s
// doubling per failure up to 15 minutes; 30 failures per address; forgotten after 60 quiet minutes.
const policy: ThrottlePolicy = {
  freeFailures: 3,
  firstDelaySeconds: 30,
  maxDelaySeconds: 15 * 60,
  addressMaxFailures: 30,
  windowSeconds: 60 * 60,
};

const t0 = new Date("2026-03-02T09:00:00Z");
const at = (seconds: number) => new Date(t0.getTime() + seconds * 1000);

describe("the wait after the n-th failure of one e-mail from one address", () => {
  it("is nothing for the first three, then 30 s doubling per failure, capped at 15 minutes", () => {
    // Written out from the requirement: 30, 60, 120, 240, 480, then 960 capped to 900.
    const waits = Array.from({ length: 11 }, (_, i) => waitAfterFailures(i + 1, policy));
    expect(waits).toEqual([0, 0, 0, 30, 60, 120, 240, 480, 900, 900, 900]);
  });

  it("stays at the cap however many failures there are", () => {
    expect(waitAfterFailures(10_000, policy)).toBe(900);
  });
});

describe("charging attempts for one e-mail from one address", () => {
  it("admits the free attempts, then admits one that starts a wait and refuses the next during it", () => {
    let counter: FailureCounter | undefined;
    for (let i = 1; i <= 3; i++) {
      const charge = chargeAccountAttempt(counter, at(i), policy);
      expect(charge).toMatchObject({ refused: false, waitSeconds: 0 });
      if (!charge.refused) counter = charge.counter;
    }
    const fourth = chargeAccountAttempt(counter, at(4), policy);
    expect(fourth).toEqual({ refused: false, waitSeconds: 30, counter: { failures: 4, lastFailureAt: at(4), blockedUntil: at(34) } });
    if (fourth.refused) return;
    expect(chargeAccountAttempt(fourth.counter, at(10), policy)).toEqual({ refused: true, waitSeconds: 24 });
    expect(chargeAccountAttempt(fourth.counter, at(33.5), policy)).toEqual({ refused: true, waitSeconds: 1 });
    // Once the wait is over the count goes on, so the next wait is twice as long.
    expect(chargeAccountAttempt(fourth.counter, at(34), policy)).toMatchObject({ refused: false, waitSeconds: 60, counter: { failures: 5 } });
  });

  it("forgets failures after an hour without one", () => {
    const counter = { failures: 8, lastFailureAt: t0, blockedUntil: at(480) };
    expect(chargeAccountAttempt(counter, at(3599), policy)).toMatchObject({ refused: false, counter: { failures: 9 } });
    expect(chargeAccountAttempt(counter, at(3600), policy)).toMatchObject({ refused: false, waitSeconds: 0, counter: { failures: 1 } });
  });
});

describe("charging attempts from one address for any e-mail", () => {
  it("holds the address for the window at the 30th failure and refuses during the hold", () => {
    const before = { failures: 29, lastFailureAt: at(100), blockedUntil: null };
    const thirtieth = chargeAddressAttempt(before, at(200), policy);
    expect(thirtieth).toEqual({ refused: false, waitSeconds: 3600, counter: { failures: 30, lastFailureAt: at(200), blockedUntil: at(3800) } });
    if (thirtieth.refused) return;
    expect(chargeAddressAttempt(thirtieth.counter, at(3799), policy)).toEqual({ refused: true, waitSeconds: 1 });
    expect(chargeAddressAttempt(thirtieth.counter, at(3800), policy)).toMatchObject({ refused: false, counter: { failures: 1, blockedUntil: null } });
  });

  it("counts up below the limit and starts afresh after a quiet window", () => {
    const counter = { failures: 12, lastFailureAt: t0, blockedUntil: null };
    expect(chargeAddressAttempt(counter, at(60), policy)).toMatchObject({ refused: false, waitSeconds: 0, counter: { failures: 13 } });
    expect(chargeAddressAttempt(counter, at(3600), policy)).toMatchObject({ refused: false, waitSeconds: 0, counter: { failures: 1 } });
    expect(chargeAddressAttempt(undefined, t0, policy)).toMatchObject({ refused: false, waitSeconds: 0, counter: { failures: 1 } });
  });

  it("gives a right password's charge back without wiping the count, lifting a hold that charge caused", () => {
    expect(refundAddressAttempt({ failures: 13, lastFailureAt: t0, blockedUntil: null }, policy)).toEqual({
      failures: 12,
      lastFailureAt: t0,
      blockedUntil: null,
    });
    expect(refundAddressAttempt({ failures: 30, lastFailureAt: t0, blockedUntil: at(3600) }, policy)).toEqual({
      failures: 29,
      lastFailureAt: t0,
      blockedUntil: null,
    });
    expect(refundAddressAttempt({ failures: 0, lastFailureAt: t0, blockedUntil: null }, policy).failures).toBe(0);
  });
});

describe("what the person reads", () => {
  it("states the wait in seconds below a minute and in whole minutes, rounded up, above", () => {
    expect([1, 24, 30, 59, 60, 61, 120, 900, 3600].map(describeWait)).toEqual([
      "1 second",
      "24 seconds",
      "30 seconds",
      "59 seconds",
      "1 minute",
      "2 minutes",
      "2 minutes",
      "15 minutes",
      "60 minutes",
    ]);
  });

  it("says which limit was reached and how long to wait", () => {
    expect(THROTTLE_MESSAGES.account(30)).toBe("Too many failed sign-ins for this e-mail from your address. Wait 30 seconds before trying again.");
    expect(THROTTLE_MESSAGES.address(3600)).toBe("Too many failed sign-ins from your address. Wait 60 minutes before trying again.");
  });
});
