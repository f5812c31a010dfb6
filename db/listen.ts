import "server-only";
import { Client } from "pg";
import { env } from "@/lib/env";

/**
 * One listening connection per process for PostgreSQL's LISTEN/NOTIFY (drizzle/0011 sends the
 * notifications from triggers). What an instance keeps in memory (in-force scoring models, LIS
 * connections) subscribes to a channel and drops what changed. Notifications sent while the
 * connection was away are lost, so every (re)connection also calls `onConnect` handlers, which
 * reload everything they hold: a cache is never trusted across a gap.
 *
 * Process-wide state lives on globalThis: Next bundles instrumentation and each route separately,
 * and they must share one connection and one set of subscribers.
 */

type Handler = (payload: string) => void;

interface ListenerState {
  client: Client | null;
  connected: boolean;
  connecting: Promise<void> | null;
  channels: Map<string, Set<Handler>>;
  onConnect: Set<() => void>;
  retryTimer: NodeJS.Timeout | null;
  delayMs: number;
  stopped: boolean;
  /** Bumped on each successful connection, so callers can tell a reconnection happened. */
  generation: number;
}

const KEY = Symbol.for("bellwether.listener");
const MIN_DELAY_MS = 250;
const MAX_DELAY_MS = 5000;

function state(): ListenerState {
  const g = globalThis as unknown as Record<symbol, ListenerState | undefined>;
  g[KEY] ??= {
    client: null,
    connected: false,
    connecting: null,
    channels: new Map(),
    onConnect: new Set(),
    retryTimer: null,
    delayMs: MIN_DELAY_MS,
    stopped: false,
    generation: 0,
  };
  return g[KEY];
}

const quoteIdent = (name: string) => `"${name.replace(/"/g, '""')}"`;

function scheduleReconnect(s: ListenerState): void {
  if (s.stopped || s.retryTimer) return;
  const delay = s.delayMs;
  s.delayMs = Math.min(MAX_DELAY_MS, s.delayMs * 2);
  s.retryTimer = setTimeout(() => {
    s.retryTimer = null;
    void connect(s);
  }, delay);
  s.retryTimer.unref();
}

function connect(s: ListenerState): Promise<void> {
  if (s.connecting || s.connected || s.stopped) return s.connecting ?? Promise.resolve();
  s.connecting = (async () => {
    // Bounded: a connect that never answers would otherwise hold `connecting`, and every reload, for good.
    const client = new Client({ connectionString: env().DATABASE_URL, keepAlive: true, connectionTimeoutMillis: 10_000 });
    const lost = () => {
      if (s.client !== client) return;
      s.client = null;
      s.connected = false;
      client.removeAllListeners("notification");
      void client.end().catch(() => undefined);
      scheduleReconnect(s);
    };
    client.on("error", lost);
    client.on("end", lost);
    client.on("notification", (msg) => {
      for (const handler of s.channels.get(msg.channel) ?? []) {
        try {
          handler(msg.payload ?? "");
        } catch (err) {
          console.error(`bellwether: a ${msg.channel} notification handler failed`, err);
        }
      }
    });
    try {
      await client.connect();
      for (const channel of s.channels.keys()) await client.query(`LISTEN ${quoteIdent(channel)}`);
    } catch {
      client.removeAllListeners();
      client.on("error", () => undefined);
      await client.end().catch(() => undefined);
      scheduleReconnect(s);
      return;
    }
    s.client = client;
    s.connected = true;
    s.delayMs = MIN_DELAY_MS;
    s.generation++;
    for (const reload of s.onConnect) {
      try {
        reload();
      } catch (err) {
        console.error("bellwether: a reload after (re)connecting failed", err);
      }
    }
  })().finally(() => {
    s.connecting = null;
  });
  return s.connecting;
}

/**
 * Calls `handler` with each notification's payload on `channel`, and `onConnect` whenever the
 * listening connection is (re)established, including the first time. Starts the connection on
 * first use. Returns a function that unsubscribes.
 * @example subscribe("bellwether_intervals", (analyteId) => cache.drop(analyteId), () => cache.clear())
 */
export function subscribe(channel: string, handler: Handler, onConnect?: () => void): () => void {
  const s = state();
  s.stopped = false;
  let handlers = s.channels.get(channel);
  if (!handlers) {
    handlers = new Set();
    s.channels.set(channel, handlers);
    if (s.connected && s.client) {
      s.client.query(`LISTEN ${quoteIdent(channel)}`).catch(() => s.client?.emit("error", new Error("LISTEN failed")));
    }
  }
  handlers.add(handler);
  if (onConnect) s.onConnect.add(onConnect);
  void connect(s);
  return () => {
    handlers.delete(handler);
    if (onConnect) s.onConnect.delete(onConnect);
  };
}

/** Whether the listening connection is up now: while it is not, caches must not be trusted for long. */
export function listenerStatus(): { connected: boolean; generation: number } {
  const s = state();
  return { connected: s.connected, generation: s.generation };
}

/** Closes the listening connection (tests and shutdown). Subscribers stay registered. */
export async function stopListening(): Promise<void> {
  const s = state();
  s.stopped = true;
  if (s.retryTimer) clearTimeout(s.retryTimer);
  s.retryTimer = null;
  const client = s.client;
  s.client = null;
  s.connected = false;
  await client?.end().catch(() => undefined);
}
