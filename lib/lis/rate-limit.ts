/**
 * The per-connection rate limit, shared between app instances without a database round trip on
 * a request.
 *
 * Each instance counts admitted requests per connection in fixed one-minute windows, in memory.
 * A background sync (every few hundred milliseconds) writes this instance's counts to
 * rate_limit_counts with a heartbeat row, and reads the other instances' counts for the window
 * and how many instances are alive. After each sync an instance may admit, until the next one,
 * only its share of what remains of the limit: (limit − all counts known) ÷ live instances. The
 * shares of all instances together never exceed what remained, so instances cannot overshoot
 * by more than what their stale views allow; an idle instance's share is simply not spent, and
 * what it leaves is shared out again at the next sync. Before its first sync an instance admits
 * at most a small fraction of the limit, and at a window's start, until it syncs, only
 * limit ÷ live instances.
 */

export const WINDOW_MS = 60_000;

export interface RateLimitSyncInput {
  instanceId: string;
  windowStart: Date;
  /** This instance's own counts in the window (absolute, not increments). */
  counts: { connectionId: string; count: number }[];
}

export interface RateLimitSyncResult {
  /** The other instances' counts in the window, summed per connection. */
  others: Map<string, number>;
  /** Instances alive now, this one included. */
  liveInstances: number;
}

export interface RateLimitStore {
  sync(input: RateLimitSyncInput): Promise<RateLimitSyncResult>;
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
  /** Before the first sync: the fraction of a limit an instance may admit. */
  startupFraction?: number;
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
  private readonly startupFraction: number;
  private readonly onSyncError: (err: unknown) => void;

  private windowStart = 0;
  private local = new Map<string, number>();
  private others = new Map<string, number>();
  private limits = new Map<string, number>();
  private budgets = new Map<string, Budget>();
  private liveInstances = 1;
  private synced = false;
  private timer: NodeJS.Timeout | null = null;
  private syncing: Promise<void> | null = null;
  private lastCleanup = 0;

  constructor(options: RateLimiterOptions) {
    this.instanceId = options.instanceId;
    this.store = options.store;
    this.now = options.now ?? Date.now;
    this.syncIntervalMs = options.syncIntervalMs ?? 300;
    this.keepMinutes = options.keepMinutes ?? 5;
    this.startupFraction = options.startupFraction ?? 0.05;
    this.onSyncError = options.onSyncError ?? (() => undefined);
  }

  /** Counts one request of `connectionId` if its limit allows it now; never waits. */
  take(connectionId: string, limit: number): RateDecision {
    const now = this.now();
    this.rollTo(windowOf(now));
    this.limits.set(connectionId, limit);
    const local = this.local.get(connectionId) ?? 0;
    const used = local + (this.others.get(connectionId) ?? 0);
    if (used >= limit) return { admitted: false, limit, retryAfterSeconds: Math.max(1, Math.ceil((this.windowStart + WINDOW_MS - now) / 1000)) };
    let budget = this.budgets.get(connectionId);
    if (!budget) {
      budget = { left: this.shareOf(limit, used) };
      this.budgets.set(connectionId, budget);
    }
    if (budget.left <= 0) {
      const untilSync = Math.ceil(this.syncIntervalMs / 1000);
      const untilWindowEnd = Math.ceil((this.windowStart + WINDOW_MS - now) / 1000);
      return { admitted: false, limit, retryAfterSeconds: Math.max(1, Math.min(untilSync, untilWindowEnd)) };
    }
    budget.left--;
    this.local.set(connectionId, local + 1);
    return { admitted: true };
  }

  private shareOf(limit: number, used: number): number {
    const share = Math.floor(Math.max(0, limit - used) / this.liveInstances);
    return this.synced ? share : Math.min(share, Math.max(1, Math.ceil(limit * this.startupFraction)));
  }

  private rollTo(windowStart: number): void {
    if (windowStart === this.windowStart) return;
    this.windowStart = windowStart;
    this.local = new Map();
    this.others = new Map();
    this.budgets = new Map();
  }

  /**
   * Writes this instance's counts and reads the others', then shares out what remains. One at a
   * time: a call while one runs waits for it.
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
    const counts = [...this.local].map(([connectionId, count]) => ({ connectionId, count }));
    const result = await this.store.sync({ instanceId: this.instanceId, windowStart: new Date(windowStart), counts });
    // A window that turned during the round trip: what was read belongs to the old one.
    if (this.windowStart !== windowStart) return;
    this.others = result.others;
    this.liveInstances = Math.max(1, result.liveInstances);
    this.synced = true;
    this.budgets = new Map();
    for (const [connectionId, limit] of this.limits) {
      const used = (this.local.get(connectionId) ?? 0) + (this.others.get(connectionId) ?? 0);
      this.budgets.set(connectionId, { left: this.shareOf(limit, used) });
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
