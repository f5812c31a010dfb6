import { describe, expect, it } from "vitest";
import { RateLimiter, WINDOW_MS, type RateLimitStore } from "@/lib/lis/rate-limit";

/**
 * rate_limit_counts in memory: each instance's absolute claim and admitted count per connection
 * and window, and when each instance last wrote (its heartbeat), on a shared fake clock. As the
 * database's store does: a live instance's claim counts for the others, a stopped one's admitted.
 */
function sharedTable(clock: { now: number }, liveMs = 3000) {
  const counts = new Map<string, number>(); // `${window}|${connection}|${instance}`
  const admittedCounts = new Map<string, number>();
  const seen = new Map<string, number>();
  const storeFor = (): RateLimitStore => ({
    async write({ instanceId, windowStart, claims }) {
      seen.set(instanceId, clock.now);
      for (const c of claims) {
        counts.set(`${windowStart.getTime()}|${c.connectionId}|${instanceId}`, c.count);
        admittedCounts.set(`${windowStart.getTime()}|${c.connectionId}|${instanceId}`, c.admitted);
      }
    },
    async read({ instanceId, windowStart }) {
      const isLive = (id: string) => clock.now - (seen.get(id) ?? -Infinity) <= liveMs;
      const others = new Map<string, number>();
      const othersAdmitted = new Map<string, number>();
      for (const [k, n] of counts) {
        const [w, connection, instance] = k.split("|");
        if (Number(w) !== windowStart.getTime() || instance === instanceId) continue;
        const admitted = admittedCounts.get(k) ?? 0;
        others.set(connection, (others.get(connection) ?? 0) + (isLive(instance) ? n : admitted));
        othersAdmitted.set(connection, (othersAdmitted.get(connection) ?? 0) + admitted);
      }
      const live = [...seen.keys()].filter((id) => id !== instanceId && isLive(id)).length + 1;
      return { others, othersAdmitted, liveInstances: live };
    },
    async deleteBefore() {},
  });
  const total = (connection: string, windowStart: number) =>
    [...counts].filter(([k]) => k.startsWith(`${windowStart}|${connection}|`)).reduce((s, [, n]) => s + n, 0);
  return { storeFor, total };
}

const T0 = Date.UTC(2026, 2, 2, 10, 0, 0);

describe("the rate limiter", () => {
  it("admits exactly the limit in a window on a single instance, then says to retry when the window ends", async () => {
    const clock = { now: T0 + 15_000 };
    const table = sharedTable(clock);
    const limiter = new RateLimiter({ instanceId: "a", store: table.storeFor(), now: () => clock.now });
    await limiter.sync();
    let admitted = limiter.take("c1", 100).admitted ? 1 : 0;
    // Once a sync has planned the connection, all that is left.
    await limiter.sync();
    for (let i = 0; i < 150; i++) if (limiter.take("c1", 100).admitted) admitted++;
    expect(admitted).toBe(100);
    // 45 s of the minute remain (common practice: Retry-After in whole seconds, RFC 9110 §10.2.3).
    expect(limiter.take("c1", 100)).toEqual({ admitted: false, limit: 100, retryAfterSeconds: 45 });
    // Another connection has its own limit.
    expect(limiter.take("c2", 100).admitted).toBe(true);
    // A new window starts from nothing.
    clock.now = T0 + WINDOW_MS;
    expect(limiter.take("c1", 100).admitted).toBe(true);
  });

  it("admits before a sync has planned a connection only a small part of the limit", async () => {
    const clock = { now: T0 };
    const limiter = new RateLimiter({ instanceId: "a", store: sharedTable(clock).storeFor(), now: () => clock.now, lazyFraction: 0.05 });
    let admitted = 0;
    for (let i = 0; i < 1000; i++) if (limiter.take("c1", 1000).admitted) admitted++;
    // 5% of 1000 (the fraction given above).
    expect(admitted).toBe(50);
    await limiter.sync();
    for (let i = 0; i < 1000; i++) if (limiter.take("c1", 1000).admitted) admitted++;
    expect(admitted).toBe(1000);
  });

  it("keeps two instances together within 10% of the limit, whatever the mix of their traffic", async () => {
    // Within 10% of the limit: the requirement for the combined rate.
    for (const [shareA, limit] of [[0.5, 1000], [0.9, 1000], [0.2, 6000], [1, 6000], [0.5, 60]] as const) {
      const clock = { now: T0 + 1000 };
      const table = sharedTable(clock);
      const a = new RateLimiter({ instanceId: "a", store: table.storeFor(), now: () => clock.now });
      const b = new RateLimiter({ instanceId: "b", store: table.storeFor(), now: () => clock.now });
      await a.sync();
      await b.sync();
      await a.sync();
      let admitted = 0;
      // 200 sync periods of 250 ms (50 s, within one window), each with far more demand than the limit.
      for (let period = 0; period < 200; period++) {
        for (let i = 0; i < limit; i++) {
          const limiter = (i % 100) / 100 < shareA ? a : b;
          if (limiter.take("c1", limit).admitted) admitted++;
        }
        clock.now += 250;
        await (period % 2 ? a.sync().then(() => b.sync()) : b.sync().then(() => a.sync()));
      }
      expect({ shareA, limit, within: admitted <= limit * 1.1 }).toEqual({ shareA, limit, within: true });
      expect({ shareA, limit, enough: admitted >= limit * 0.9 }).toEqual({ shareA, limit, enough: true });
      expect(table.total("c1", T0)).toBe(admitted);
    }
  });

  it("takes only what the other instances have not claimed, and gets back what they leave unused", async () => {
    const clock = { now: T0 + 1000 };
    const table = sharedTable(clock);
    // lazyFraction 0: the least an instance may always admit is one request per sync.
    const a = new RateLimiter({ instanceId: "a", store: table.storeFor(), now: () => clock.now, lazyFraction: 0 });
    const b = new RateLimiter({ instanceId: "b", store: table.storeFor(), now: () => clock.now, lazyFraction: 0 });
    await a.sync();
    expect(a.take("c1", 100).admitted).toBe(true);
    await a.sync();
    for (let i = 1; i < 80; i++) expect(a.take("c1", 100).admitted).toBe(true);
    // a, alone, claims its 80 and the 20 it may still admit.
    await a.sync();
    expect(table.total("c1", T0)).toBe(100);
    await b.sync();
    // All 100 are claimed, 80 admitted: b may admit its one request, then refuses, and says to
    // retry after the next sync (1 s), where a gives back part of what it does not use.
    expect(b.take("c1", 100).admitted).toBe(true);
    expect(b.take("c1", 100)).toEqual({ admitted: false, limit: 100, retryAfterSeconds: 1 });
    // a, idle, now shares with b: it keeps floor(20 / 2) = 10 of the 20 it had claimed …
    await a.sync();
    expect(table.total("c1", T0)).toBe(90);
    // … and b takes its share of the 9 left unclaimed beside its 1: floor(9 / 2) = 4.
    await b.sync();
    let admitted = 0;
    for (let i = 0; i < 100; i++) if (b.take("c1", 100).admitted) admitted++;
    expect(admitted).toBe(4);
    expect(b.take("c1", 100)).toEqual({ admitted: false, limit: 100, retryAfterSeconds: 1 });
  });

  it("admits a small part of the limit on an instance whose peer claims it all while admissions leave room", async () => {
    // Found by npm run bench:resilience on a starved machine: a's view of b's heartbeat went
    // stale, a claimed the whole limit, and b refused every request until a's next sync.
    const clock = { now: T0 + 1000 };
    const table = sharedTable(clock);
    const a = new RateLimiter({ instanceId: "a", store: table.storeFor(), now: () => clock.now });
    await a.sync();
    a.take("c1", 1000);
    await a.sync();
    expect(table.total("c1", T0)).toBe(1000);
    const b = new RateLimiter({ instanceId: "b", store: table.storeFor(), now: () => clock.now });
    await b.sync();
    await b.sync();
    let admitted = 0;
    for (let i = 0; i < 1000; i++) if (b.take("c1", 1000).admitted) admitted++;
    // 5% of the limit shared by the two live instances (lazyFraction's default): 25.
    expect(admitted).toBe(25);
  });

  it("lets an instance started after another stopped use what the stopped one had not admitted", async () => {
    // Found by npm run bench:resilience: after the app was killed and started again within the
    // minute, the new instance refused a connection that had made one request, until the window
    // ended, because the dead instance's claim still held the whole limit.
    const clock = { now: T0 + 10_000 };
    const table = sharedTable(clock);
    const a = new RateLimiter({ instanceId: "a", store: table.storeFor(), now: () => clock.now });
    await a.sync();
    expect(a.take("c1", 1000).admitted).toBe(true);
    await a.sync();
    // a, alone, claims the whole limit: its 1 and the 999 it may still admit.
    expect(table.total("c1", T0)).toBe(1000);
    // a is killed; b starts 5 s later, after a's heartbeat has gone stale (3 s, as in lib/lis/runtime.ts).
    clock.now += 5_000;
    const b = new RateLimiter({ instanceId: "b", store: table.storeFor(), now: () => clock.now });
    await b.sync();
    let admitted = 0;
    for (let i = 0; i < 1000; i++) if (b.take("c1", 1000).admitted) admitted++;
    // Before b has planned c1: 5% of the limit (lazyFraction's default).
    expect(admitted).toBe(50);
    await b.sync();
    for (let i = 0; i < 1000; i++) if (b.take("c1", 1000).admitted) admitted++;
    // Once planned: all that a did not admit.
    expect(admitted).toBe(999);
    // Now the limit is truly used: retry when the window ends, 45 s later.
    expect(b.take("c1", 1000)).toEqual({ admitted: false, limit: 1000, retryAfterSeconds: 45 });
  });
});
