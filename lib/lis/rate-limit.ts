/**
 * The per-connection rate limit, shared between app instances without a database round trip on
 * a request.
 *
 * Each instance counts admitted requests per connection in fixed one-minute windows, in memory.
 * A background sync (every few hundred milliseconds) reads from rate_limit_counts what the other
 * instances have claimed in the window and how many instances are alive (each writes a heartbeat
 * row), takes as its budget until the next sync its share of what nobody has claimed,
 * (limit − others' claims − own count) ÷ live instances, and writes its own claim: its count plus
 * that budget, an upper bound of what it will have admitted by its next sync. The claims of all
 * instances together never exceed the limit, even when several sync at the same moment (each
 * takes only its share of what it saw unclaimed), so the combined rate stays within the limit;
 * what an idle instance claimed but did not use is released at its next sync and shared out
 * again. A connection not yet planned at a sync in the window (its first request here, or the
 * first seconds of a window) gets only a small budget (5% of the limit ÷ live instances, at least
 * one request), so all instances together overshoot by at most about 5% (for limits under about
 * 20 requests a minute per instance, the "at least one" may weigh more).
 *
 * Beside its claim each instance writes what it has truly admitted. A claim holds back for the
 * others only while its instance is alive: an instance that stopped (killed, restarted, scaled
 * down) no longer plans, so its claim would hold its unused budget, up to the whole limit, until
 * the window ends, and every instance would refuse the connection for the rest of the minute
 * (`npm run bench:resilience` found this after a restart). For an instance without a heartbeat
 * only its admitted count is taken. A refusal says to retry at the window's end only when what
 * was truly admitted fills the limit; when claims fill it, at the next sync, where the others
 * give back what they do not use. And while admissions leave room, every instance may admit at
 * least the small part above per sync even when claims fill the limit (see `floorOf`): claims
 * held by an instance that wrongly thinks it is alone then refuse nobody.
 */

export const WINDOW_MS = 60_000;

export interface RateLimitView {
  /**
   * The other instances' claims in the window, summed per connection: a live instance's claim, a
   * stopped instance's admitted count.
   */
  others: Map<string, number>;
  /** What the other instances have truly admitted in the window (as of their last sync). */
  othersAdmitted: Map<string, number>;
  /** Instances alive now, this one included. */
  liveInstances: number;
}

export interface RateLimitStore {
  /** What the other instances claimed in the window, and how many instances are alive. */
  read(input: { instanceId: string; windowStart: Date }): Promise<RateLimitView>;
  /**
   * Writes this instance's claims in the window (absolute, not increments), what it has admitted
   * of each, and its heartbeat.
   */
  write(input: { instanceId: string; windowStart: Date; claims: { connectionId: string; count: number; admitted: number }[] }): Promise<void>;
  /** Removes the rows of windows that started before `before`. */
  deleteBefore(before: Date): Promise<void>;
}

export type RateDecision =
  | { admitted: true }
  | {
      admitted: false;
      limit: number;
      /** Seconds until a request may be admitted again: the window's end, or the next sync. */
      retryAfterSeconds: number;
    };

export interface RateLimiterOptions {
  instanceId: string;
  store: RateLimitStore;
  now?: () => number;
  syncIntervalMs?: number;
  /** Windows older than this many minutes are deleted in the background. */
  keepMinutes?: number;
  /**
   * What an instance may admit for a connection before a sync has planned it in the window (its
   * first requests, or a window's start), as a fraction of the limit shared by live instances.
   */
  lazyFraction?: number;
  /** Called when a background sync fails (the database is away): counting goes on in memory. */
  onSyncError?: (err: unknown) => void;
}

interface Budget {
  /** What this instance may still admit until the next sync. */
  left: number;
}

export class RateLimiter {
  readonly instanceId: string;
  private readonly store: RateLimitStore;
  private readonly now: () => number;
  private readonly syncIntervalMs: number;
  private readonly keepMinutes: number;
  private readonly lazyFraction: number;
  private readonly onSyncError: (err: unknown) => void;

  private windowStart = 0;
  private local = new Map<string, number>();
  /** The other instances' claims at the last sync. */
  private others = new Map<string, number>();
  /** What the other instances had admitted at the last sync. */
  private othersAdmitted = new Map<string, number>();
  private limits = new Map<string, number>();
  private budgets = new Map<string, Budget>();
  private liveInstances = 1;
  private timer: NodeJS.Timeout | null = null;
  private syncing: Promise<void> | null = null;
  private lastCleanup = 0;

  constructor(options: RateLimiterOptions) {
    this.instanceId = options.instanceId;
    this.store = options.store;
    this.now = options.now ?? Date.now;
    this.syncIntervalMs = options.syncIntervalMs ?? 300;
    this.keepMinutes = options.keepMinutes ?? 5;
    this.lazyFraction = options.lazyFraction ?? 0.05;
    this.onSyncError = options.onSyncError ?? (() => undefined);
  }

  /** Counts one request of `connectionId` if its limit allows it now; never waits. */
  take(connectionId: string, limit: number): RateDecision {
    const now = this.now();
    this.rollTo(windowOf(now));
    this.limits.set(connectionId, limit);
    const local = this.local.get(connectionId) ?? 0;
    const admittedElsewhere = this.othersAdmitted.get(connectionId) ?? 0;
    if (local + admittedElsewhere >= limit) return this.refusal(connectionId, limit, local, now);
    let budget = this.budgets.get(connectionId);
    if (!budget) {
      budget = { left: this.floorOf(limit, this.liveInstances, local, admittedElsewhere) };
      this.budgets.set(connectionId, budget);
    }
    if (budget.left <= 0) return this.refusal(connectionId, limit, local, now);
    budget.left--;
    this.local.set(connectionId, local + 1);
    return { admitted: true };
  }

  /**
   * A refusal with its Retry-After: the window's end when what was truly admitted fills the limit;
   * otherwise the next sync, where this instance's share is planned again from what the others
   * claimed but leave unused.
   */
  private refusal(connectionId: string, limit: number, local: number, now: number): RateDecision {
    const untilWindowEnd = Math.max(1, Math.ceil((this.windowStart + WINDOW_MS - now) / 1000));
    if (local + (this.othersAdmitted.get(connectionId) ?? 0) >= limit) return { admitted: false, limit, retryAfterSeconds: untilWindowEnd };
    const untilSync = Math.ceil(this.syncIntervalMs / 1000);
    return { admitted: false, limit, retryAfterSeconds: Math.max(1, Math.min(untilSync, untilWindowEnd)) };
  }

  /**
   * What an instance may always admit until its next sync while what was truly admitted leaves
   * room: a small part of the limit (`lazyFraction` ÷ live instances, at least one request), even
   * when the others' claims fill it. It is the whole budget of a connection not yet planned at a
   * sync in this window (its first request here, or the window just turned), and the least of a
   * planned one: so a claim that holds unused budget (an instance that thinks it is alone because
   * the other's heartbeat came late, as on a starved machine; one just started) delays nobody,
   * at the cost of an overshoot bounded by that fraction of the limit.
   */
  private floorOf(limit: number, liveInstances: number, local: number, admittedElsewhere: number): number {
    return Math.min(Math.max(1, Math.floor((limit * this.lazyFraction) / liveInstances)), Math.max(0, limit - local - admittedElsewhere));
  }

  private rollTo(windowStart: number): void {
    if (windowStart === this.windowStart) return;
    this.windowStart = windowStart;
    this.local = new Map();
    this.others = new Map();
    this.othersAdmitted = new Map();
    this.budgets = new Map();
  }

  /**
   * Reads the others' claims, takes this instance's share of what is unclaimed and writes its own
   * claim. One at a time: a call while one runs waits for it.
   */
  sync(): Promise<void> {
    this.syncing ??= this.syncOnce().finally(() => {
      this.syncing = null;
    });
    return this.syncing;
  }

  private async syncOnce(): Promise<void> {
    const now = this.now();
    this.rollTo(windowOf(now));
    const windowStart = this.windowStart;
    const view = await this.store.read({ instanceId: this.instanceId, windowStart: new Date(windowStart) });
    // A window that turned during the round trip: what was read belongs to the old one.
    if (this.windowStart !== windowStart) return;
    const liveInstances = Math.max(1, view.liveInstances);
    const planned = new Map<string, { budget: number; localAtPlan: number }>();
    const claims: { connectionId: string; count: number; admitted: number }[] = [];
    for (const [connectionId, limit] of this.limits) {
      const local = this.local.get(connectionId) ?? 0;
      const unclaimed = limit - local - (view.others.get(connectionId) ?? 0);
      const budget = Math.max(
        Math.floor(Math.max(0, unclaimed) / liveInstances),
        this.floorOf(limit, liveInstances, local, view.othersAdmitted.get(connectionId) ?? 0),
      );
      planned.set(connectionId, { budget, localAtPlan: local });
      claims.push({ connectionId, count: local + budget, admitted: local });
    }
    await this.store.write({ instanceId: this.instanceId, windowStart: new Date(windowStart), claims });
    if (this.windowStart !== windowStart) return;
    this.others = view.others;
    this.othersAdmitted = view.othersAdmitted;
    this.liveInstances = liveInstances;
    this.budgets = new Map();
    for (const [connectionId, { budget, localAtPlan }] of planned) {
      // Requests admitted on the old budget while the claim was being written count against the new one.
      const since = (this.local.get(connectionId) ?? 0) - localAtPlan;
      this.budgets.set(connectionId, { left: Math.max(0, budget - since) });
    }
    if (now - this.lastCleanup > WINDOW_MS) {
      this.lastCleanup = now;
      await this.store.deleteBefore(new Date(windowStart - this.keepMinutes * WINDOW_MS));
    }
  }

  /** Starts the background sync; idempotent. The timer does not keep the process alive. */
  start(): void {
    if (this.timer) return;
    const tick = () => {
      this.sync()
        .catch((err: unknown) => this.onSyncError(err))
        .finally(() => {
          if (this.timer) {
            this.timer = setTimeout(tick, this.syncIntervalMs);
            this.timer.unref();
          }
        });
    };
    this.timer = setTimeout(tick, 0);
    this.timer.unref();
  }

  /** Stops the background sync, waiting for one under way. */
  async stop(): Promise<void> {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    await this.syncing?.catch(() => undefined);
  }

  /** What this instance counted for a connection in the current window (tests, status). */
  localCount(connectionId: string): number {
    return this.windowStart === windowOf(this.now()) ? (this.local.get(connectionId) ?? 0) : 0;
  }
}

export function windowOf(ms: number): number {
  return Math.floor(ms / WINDOW_MS) * WINDOW_MS;
}
