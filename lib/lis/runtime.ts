import "server-only";
import { randomBytes } from "node:crypto";
import { hostname } from "node:os";
import { db, type Executor } from "@/db/client";
import { findKeyedConnectionByHash, listKeyedConnections, recordLisConnectionsUsed } from "@/db/queries/lis-connections";
import { deleteRateLimitCountsBefore, readRateLimitWindow, recordRateLimitCounts } from "@/db/queries/rate-limit-counts";
import { subscribe } from "@/db/listen";
import { LisKeyStore } from "./key-store";
import { RateLimiter, type RateLimitStore } from "./rate-limit";

/** The notification channel drizzle/0011 sends on when a connection is created or changed. */
export const LIS_CONNECTIONS_CHANNEL = "bellwether_lis_connections";
/** An instance that wrote no row for this long is no longer counted when a limit is shared out. */
const LIVE_SECONDS = 3;
const LAST_USED_FLUSH_MS = 5000;
const LAST_USED_EVERY_MS = 60_000;

/** rate_limit_counts through a database handle (this process's pool by default). */
export function databaseRateLimitStore(database: () => Executor = db): RateLimitStore {
  return {
    read: ({ instanceId, windowStart }) => readRateLimitWindow(database(), { instanceId, windowStart, liveSeconds: LIVE_SECONDS }),
    write: ({ instanceId, windowStart, claims }) => recordRateLimitCounts(database(), { instanceId, windowStart, counts: claims }),
    async deleteBefore(before) {
      await deleteRateLimitCountsBefore(database(), { before });
    },
  };
}

/** When each connection was last used here, written in the background at most once a minute. */
class LastUsed {
  private seen = new Map<string, number>();
  private written = new Map<string, number>();
  private timer: NodeJS.Timeout | null = null;

  note(connectionId: string, at: number): void {
    this.seen.set(connectionId, at);
  }

  async flush(): Promise<void> {
    const uses: { id: string; at: Date }[] = [];
    for (const [id, at] of this.seen) {
      const last = this.written.get(id);
      if (last === undefined || at - last >= LAST_USED_EVERY_MS) uses.push({ id, at: new Date(at) });
    }
    if (uses.length === 0) return;
    await recordLisConnectionsUsed(db(), { uses });
    for (const { id, at } of uses) this.written.set(id, at.getTime());
  }

  start(): void {
    if (this.timer) return;
    this.timer = setInterval(() => {
      this.flush().catch(() => undefined);
    }, LAST_USED_FLUSH_MS);
    this.timer.unref();
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.flush().catch(() => undefined);
  }
}

interface LisRuntime {
  keys: LisKeyStore;
  limiter: RateLimiter;
  lastUsed: LastUsed;
  unsubscribe: () => void;
}

const KEY = Symbol.for("bellwether.lis");

/**
 * This process's LIS state, made on first use (Next bundles each route separately; they share it
 * through globalThis): the key store, subscribed to connection changes and reloaded on every
 * (re)connection of the listening connection; the rate limiter with its background sync; the
 * last-used times.
 */
export function lisRuntime(): LisRuntime {
  const g = globalThis as unknown as Record<symbol, LisRuntime | undefined>;
  if (g[KEY]) return g[KEY];
  const keys = new LisKeyStore({
    loadAll: () => listKeyedConnections(db()),
    findByHash: (keySha256) => findKeyedConnectionByHash(db(), { keySha256 }),
  });
  const reload = () => {
    keys.reload().catch((err: unknown) => console.error("bellwether: could not reload the LIS connections", err instanceof Error ? err.message : err));
  };
  const unsubscribe = subscribe(LIS_CONNECTIONS_CHANNEL, reload, reload);
  let warned = false;
  const limiter = new RateLimiter({
    instanceId: `${hostname()}:${process.pid}:${randomBytes(4).toString("hex")}`,
    store: databaseRateLimitStore(),
    onSyncError: (err) => {
      // Counting goes on in memory while the database is away; say so once, not every sync.
      if (!warned) console.error("bellwether: the rate limit counts could not be shared", err instanceof Error ? err.message : err);
      warned = true;
    },
  });
  limiter.start();
  const lastUsed = new LastUsed();
  lastUsed.start();
  g[KEY] = { keys, limiter, lastUsed, unsubscribe };
  return g[KEY];
}

/** Starts the LIS state at server start, so the first keyed request finds it loaded and synced. */
export async function startLisRuntime(): Promise<void> {
  await lisRuntime().keys.ensureLoaded();
}

/** Stops the background work (shutdown): the last-used times are written once more. */
export async function stopLisRuntime(): Promise<void> {
  const g = globalThis as unknown as Record<symbol, LisRuntime | undefined>;
  const runtime = g[KEY];
  if (!runtime) return;
  g[KEY] = undefined;
  runtime.unsubscribe();
  await Promise.all([runtime.limiter.stop(), runtime.lastUsed.stop()]);
}
