import "server-only";
import { db } from "@/db/client";
import { copyScoreLogLines } from "@/db/queries/score-log";
import { isDatabaseUnreachable } from "@/lib/api/unavailable";
import type { Principal } from "@/lib/auth/principal";
import { onProcessShutdown } from "@/lib/process-shutdown";

/**
 * The de-identified score log: every score is appended to an in-memory buffer (O(1), no database
 * on the request) and written in batches with COPY every second. While the database cannot be
 * reached the entries stay and are written when it returns; the buffer is bounded, and what the
 * bound turns away is counted and reported in a warning. The buffer is flushed at shutdown
 * (scripts/serve.ts runs lib/process-shutdown.ts's tasks).
 *
 * The buffer is columnar (one array per column), so an entry costs a few array slots and no
 * object; the strings it holds (ids, time, caller) are shared between the entries of a request.
 */

/** Most entries held while the database is away (about 50 bytes each). */
export const SCORE_LOG_MAX_BUFFERED = 500_000;
const FLUSH_INTERVAL_MS = 1000;
/** Rows per COPY statement. */
const ROWS_PER_COPY = 50_000;

interface Columns {
  /** ISO time, shared by the entries of one request. */
  at: string[];
  /** "analyteId\tversionId\tpartitionId", shared by the entries of one partition. */
  key: string[];
  value: number[];
  /** "<", ">" or "" (none). */
  censored: string[];
  flag: string[];
  /** NaN for none. */
  z: number[];
  percentile: number[];
  /** "kind\tid\tchannel", shared by the entries of one request. */
  caller: string[];
}

interface LogState {
  buf: Columns;
  timer: NodeJS.Timeout | null;
  flushing: Promise<void> | null;
  /** Entries turned away by the bound since the last warning. */
  dropped: number;
  /** Whether the last write failed because the database was away (to warn once, not every second). */
  away: boolean;
  written: number;
  unregister: (() => void) | null;
}

const KEY = Symbol.for("bellwether.scores.scoreLog");

const emptyColumns = (): Columns => ({ at: [], key: [], value: [], censored: [], flag: [], z: [], percentile: [], caller: [] });

function state(): LogState {
  const g = globalThis as unknown as Record<symbol, LogState | undefined>;
  g[KEY] ??= { buf: emptyColumns(), timer: null, flushing: null, dropped: 0, away: false, written: 0, unregister: null };
  return g[KEY];
}

/** Starts the once-a-second flush and the flush at shutdown (idempotent). */
export function startScoreLog(): void {
  const s = state();
  if (!s.timer) {
    s.timer = setInterval(() => void flushScoreLog(), FLUSH_INTERVAL_MS);
    s.timer.unref();
  }
  s.unregister ??= onProcessShutdown(() => flushScoreLog({ all: true }));
}

/** Stops the timer and writes what is buffered (tests and shutdown). */
export async function stopScoreLog(): Promise<void> {
  const s = state();
  if (s.timer) clearInterval(s.timer);
  s.timer = null;
  s.unregister?.();
  s.unregister = null;
  await flushScoreLog({ all: true });
}

export type ScoreLogWriter = (
  partitionKey: string,
  value: number,
  censored: "<" | ">" | null,
  flag: string,
  z: number | null,
  percentile: number | null,
) => void;

/**
 * A writer for one request's scores: each call appends one entry in O(1). `partitionKey` is the
 * cached partition's `logKey` ("analyteId\tversionId\tpartitionId").
 */
export function scoreLogWriter({ principal, channel, scoredAt }: { principal: Principal; channel: "app" | "api" | "fhir"; scoredAt: Date }): ScoreLogWriter {
  startScoreLog();
  const s = state();
  const at = scoredAt.toISOString();
  const caller = `${principal.kind}\t${principal.id}\t${channel}`;
  return (partitionKey, value, censored, flag, z, percentile) => {
    const b = s.buf;
    if (b.at.length >= SCORE_LOG_MAX_BUFFERED) {
      s.dropped++;
      return;
    }
    b.at.push(at);
    b.key.push(partitionKey);
    b.value.push(value);
    b.censored.push(censored ?? "");
    b.flag.push(flag);
    b.z.push(z ?? NaN);
    b.percentile.push(percentile ?? NaN);
    b.caller.push(caller);
  };
}

/** Entries waiting to be written. */
export function scoreLogStatus(): { buffered: number; written: number; dropped: number } {
  const s = state();
  return { buffered: s.buf.at.length, written: s.written, dropped: s.dropped };
}

const num = (v: number) => (Number.isFinite(v) ? String(v) : "\\N");

/** COPY text lines for entries [from, to) of `c`, in chunks of about a thousand lines. */
function* lines(c: Columns, from: number, to: number): Generator<string> {
  let chunk = "";
  for (let i = from; i < to; i++) {
    chunk += `${c.at[i]}\t${c.key[i]}\t${num(c.value[i])}\t${c.censored[i] || "\\N"}\t${c.flag[i]}\t${num(c.z[i])}\t${num(c.percentile[i])}\t${c.caller[i]}\n`;
    if ((i - from) % 1000 === 999) {
      yield chunk;
      chunk = "";
    }
  }
  if (chunk) yield chunk;
}

function sliceColumns(c: Columns, from: number): Columns {
  return {
    at: c.at.slice(from),
    key: c.key.slice(from),
    value: c.value.slice(from),
    censored: c.censored.slice(from),
    flag: c.flag.slice(from),
    z: c.z.slice(from),
    percentile: c.percentile.slice(from),
    caller: c.caller.slice(from),
  };
}

/**
 * Puts entries that could not be written back before the newer ones, within the bound. A loop, not
 * `push(...newer)`: entries made during a slow failing write can number hundreds of thousands,
 * beyond what a spread call's arguments may hold (a RangeError that would lose both sets).
 */
function putBack(s: LogState, rest: Columns): void {
  const newer = s.buf;
  const room = SCORE_LOG_MAX_BUFFERED - rest.at.length;
  const keep = Math.max(0, Math.min(newer.at.length, room));
  s.dropped += newer.at.length - keep;
  for (const k of Object.keys(rest) as (keyof Columns)[]) {
    const to = rest[k] as unknown[];
    const from = newer[k] as unknown[];
    for (let i = 0; i < keep; i++) to.push(from[i]);
  }
  s.buf = rest;
}

async function writeBuffered(s: LogState, all: boolean): Promise<void> {
  do {
    const batch = s.buf;
    const count = batch.at.length;
    if (count === 0) break;
    s.buf = emptyColumns();
    let done = 0;
    try {
      while (done < count) {
        const to = Math.min(count, done + ROWS_PER_COPY);
        await copyScoreLogLines(db(), { chunks: lines(batch, done, to) });
        s.written += to - done;
        done = to;
      }
      if (s.away) console.error("bellwether: the database is back; the score log entries kept meanwhile are written");
      s.away = false;
    } catch (err) {
      if (isDatabaseUnreachable(err)) {
        if (!s.away) console.error("bellwether: the database cannot be reached; score log entries are kept in memory until it returns");
        s.away = true;
        putBack(s, sliceColumns(batch, done));
      } else {
        console.error(`bellwether: ${count - done} score log entries could not be written and are dropped`, err);
      }
      break;
    }
  } while (all);
  if (s.dropped > 0) {
    console.error(`bellwether: the score log buffer is full (${SCORE_LOG_MAX_BUFFERED} entries); ${s.dropped} entries were not kept`);
    s.dropped = 0;
  }
}

/**
 * Writes the buffered entries now (one batch, or with `all` until the buffer is empty or the
 * database refuses). Concurrent calls share the write in progress.
 */
export async function flushScoreLog({ all = false }: { all?: boolean } = {}): Promise<void> {
  const s = state();
  while (s.flushing) await s.flushing;
  if (s.buf.at.length === 0) return;
  s.flushing = writeBuffered(s, all).finally(() => {
    s.flushing = null;
  });
  await s.flushing;
}
