import "server-only";
import { db } from "@/db/client";
import { listenerStatus, subscribe } from "@/db/listen";
import { loadInForceSnapshot, type InForceAnalyteRow, type InForcePartitionRow, type InForceSnapshot, type InForceVersionRow } from "@/db/queries/in-force-intervals";
import { obx7 } from "@/lib/scoring/hl7";
import { scoringPartitionSchema, type LmsModel, type ScoringPartition } from "@/lib/scoring/model";
import { createScorer, type ModelScore } from "@/lib/scoring/score";
import { DAYS_PER_YEAR } from "@/lib/versions/age-days";
import type { ScoreResult } from "./schemas";

/**
 * Every analyte's interval version in force, held in memory with its partitions and prepared
 * scorers, so that scoring a value reads no database. Keyed by analyte id, code and LOINC code.
 *
 * Loaded whole on first use. The `bellwether_intervals` notification (drizzle/0011: a version
 * moved, its review date changed, or the analyte changed) reloads that analyte; every
 * (re)connection of the listening connection (db/listen.ts) reloads everything, because
 * notifications sent while it was away are lost. Loads run one after another, so a later load
 * always reads a state at least as new as an earlier one; an analyte's entry is built aside and
 * put in place in one assignment, never changed in place. While the database is down the cache
 * keeps serving what it holds.
 *
 * State lives on globalThis: Next bundles instrumentation and each route separately in one process.
 */

type Interval = ScoreResult["interval"];
type ModelDescription = ScoreResult["model"];

/** One partition of a version in force, prepared for scoring. Shared between answers: never mutate. */
export interface CachedPartition {
  readonly id: string;
  readonly position: number;
  readonly sex: "F" | "M" | null;
  readonly ageFromDays: number | null;
  readonly ageToDays: number | null;
  /** Years, from the stored days (days / 365.25, rounded to 2 decimals). */
  readonly ageFrom: number | null;
  readonly ageTo: number | null;
  readonly low: number | null;
  readonly high: number | null;
  readonly lowCi: readonly [number, number] | null;
  readonly highCi: readonly [number, number] | null;
  readonly method: string;
  readonly n: number;
  readonly scoring: ScoringPartition;
  /** The prepared model; null for a limits-only (flag-only) model and for LMS curves (scored at an age). */
  readonly scorer: ((x: number) => ModelScore) | null;
  /**
   * The `interval` of every result scored against this partition (frozen, shared). For LMS
   * curves its low and high are null: each result carries a copy with the limits at its age.
   */
  readonly interval: Interval;
  /**
   * The `model` of every result (frozen, shared): kind and parameters, never reference values.
   * Null for LMS curves, whose description (L, M, S at the age) is made per result.
   */
  readonly model: ModelDescription | null;
  /** LMS curves: the stored model, for scoring at an age and for limits at requested ages; else null. */
  readonly lms: LmsModel | null;
  readonly obx7: string;
  /** "analyteId\tversionId\tpartitionId": the score log's columns for this partition. */
  readonly logKey: string;
}

export interface CachedVersion {
  readonly id: string;
  readonly number: number;
  readonly unit: string;
  readonly decimals: number;
  readonly criticalLow: number | null;
  readonly criticalHigh: number | null;
  readonly effectiveFrom: string | null;
  readonly reviewBy: string | null;
  /** reviewBy in epoch milliseconds, for the overdue check per item. */
  readonly reviewByMs: number | null;
  readonly partitions: readonly CachedPartition[];
  /** Set when a stored partition could not be prepared for scoring: items get this as their error. */
  readonly problem: string | null;
}

export interface CachedAnalyte {
  readonly id: string;
  readonly code: string;
  readonly name: string;
  readonly loinc: string | null;
  readonly unit: string;
  readonly decimals: number;
  readonly molarMass: number | null;
  /** The `analyte` of every result (frozen, shared). */
  readonly ref: ScoreResult["analyte"];
  /** Null: no version in force (never signed, or withdrawn). */
  readonly version: CachedVersion | null;
}

interface Index {
  byId: Map<string, CachedAnalyte>;
  byCode: Map<string, CachedAnalyte>;
  /** A LOINC code may, in principle, name more than one analyte of the catalogue. */
  byLoinc: Map<string, CachedAnalyte[]>;
}

interface CacheState {
  index: Index | null;
  subscribed: boolean;
  pendingFull: boolean;
  pendingIds: Set<string>;
  draining: Promise<void> | null;
  lastError: unknown;
  retryTimer: NodeJS.Timeout | null;
  /** Completed loads, for tests and the health view. */
  loads: number;
}

const KEY = Symbol.for("bellwether.scores.modelCache");
const CHANNEL = "bellwether_intervals";
const RETRY_MS = 1000;

function state(): CacheState {
  const g = globalThis as unknown as Record<symbol, CacheState | undefined>;
  g[KEY] ??= {
    index: null,
    subscribed: false,
    pendingFull: false,
    pendingIds: new Set(),
    draining: null,
    lastError: null,
    retryTimer: null,
    loads: 0,
  };
  return g[KEY];
}

const years = (days: number | null) => (days === null ? null : Math.round((days / DAYS_PER_YEAR) * 100) / 100);
const pair = (a: number | null, b: number | null): readonly [number, number] | null => (a === null || b === null ? null : Object.freeze([a, b] as const));

function describeModel(scoring: ScoringPartition): ModelDescription | null {
  const m = scoring.model;
  if (m.kind === "lms") return null;
  if (m.kind === "gaussian") return { kind: "gaussian", transform: m.transform, lambda: m.lambda ?? null, mean: m.mean, sd: m.sd };
  if (m.kind === "empirical") return { kind: "empirical", n: m.values.length };
  if (m.kind === "zlog") return { kind: "zlog", scale: m.scale };
  return { kind: "limits" };
}

const freezeOrNull = <T extends object>(o: T | null): T | null => (o === null ? null : Object.freeze(o));

function prepareVersion(v: InForceVersionRow, rows: InForcePartitionRow[]): CachedVersion {
  const effectiveFrom = v.effectiveFrom ? v.effectiveFrom.toISOString() : null;
  const reviewBy = v.reviewBy ? v.reviewBy.toISOString() : null;
  const partitions: CachedPartition[] = [];
  let problem: string | null = null;
  for (const p of rows) {
    const parsed = scoringPartitionSchema.safeParse({
      low: p.low,
      high: p.high,
      unit: v.unit,
      decimals: v.decimals,
      criticalLow: v.criticalLow ?? undefined,
      criticalHigh: v.criticalHigh ?? undefined,
      model: p.model,
      n: p.n,
    });
    if (!parsed.success) {
      // The version guards and assertScorable make this unreachable for a signed version; should it
      // happen, its items say so rather than being scored against half a version.
      console.error(`bellwether: partition ${p.id} of version ${v.id} cannot be scored`, parsed.error.issues);
      problem = `The interval in force (version ${v.number}) has a partition that cannot be scored; tell the laboratory.`;
      continue;
    }
    const scoring = parsed.data;
    const sex = p.sex === "F" || p.sex === "M" ? p.sex : null;
    const ageFrom = years(p.ageFromDays);
    const ageTo = years(p.ageToDays);
    const applies: Interval["partition"] = {};
    if (sex) applies.sex = sex;
    if (ageFrom !== null) applies.ageFrom = ageFrom;
    if (ageTo !== null) applies.ageTo = ageTo;
    if (p.ageFromDays !== null) applies.ageFromDays = p.ageFromDays;
    if (p.ageToDays !== null) applies.ageToDays = p.ageToDays;
    const interval: Interval = {
      low: p.low,
      high: p.high,
      unit: v.unit,
      decimals: v.decimals,
      version: v.number,
      versionId: v.id,
      partitionId: p.id,
      effectiveFrom,
      reviewBy,
      method: p.method,
      n: p.n,
      criticalLow: v.criticalLow,
      criticalHigh: v.criticalHigh,
      partition: Object.freeze(applies),
    };
    partitions.push(
      Object.freeze({
        id: p.id,
        position: p.position,
        sex,
        ageFromDays: p.ageFromDays,
        ageToDays: p.ageToDays,
        ageFrom,
        ageTo,
        low: p.low,
        high: p.high,
        lowCi: pair(p.lowCiLower, p.lowCiUpper),
        highCi: pair(p.highCiLower, p.highCiUpper),
        method: p.method,
        n: p.n,
        scoring,
        scorer: scoring.model.kind === "limits" || scoring.model.kind === "lms" ? null : createScorer(scoring),
        interval: Object.freeze(interval),
        model: freezeOrNull(describeModel(scoring)),
        lms: scoring.model.kind === "lms" ? Object.freeze(scoring.model) : null,
        obx7: obx7(p.low, p.high, v.decimals),
        logKey: `${v.analyteId}\t${v.id}\t${p.id}`,
      }),
    );
  }
  return Object.freeze({
    id: v.id,
    number: v.number,
    unit: v.unit,
    decimals: v.decimals,
    criticalLow: v.criticalLow,
    criticalHigh: v.criticalHigh,
    effectiveFrom,
    reviewBy,
    reviewByMs: v.reviewBy ? v.reviewBy.getTime() : null,
    partitions: Object.freeze(partitions),
    problem,
  });
}

function prepareAnalyte(a: InForceAnalyteRow, version: CachedVersion | null): CachedAnalyte {
  return Object.freeze({
    id: a.id,
    code: a.code,
    name: a.name,
    loinc: a.loinc,
    unit: a.unit,
    decimals: a.decimals,
    molarMass: a.molarMass,
    ref: Object.freeze({ code: a.code, name: a.name, loinc: a.loinc }),
    version,
  });
}

function prepareSnapshot(snapshot: InForceSnapshot): CachedAnalyte[] {
  const partitionsOf = new Map<string, InForcePartitionRow[]>();
  for (const p of snapshot.partitions) {
    const list = partitionsOf.get(p.versionId) ?? [];
    list.push(p);
    partitionsOf.set(p.versionId, list);
  }
  const versionOf = new Map(snapshot.versions.map((v) => [v.analyteId, v]));
  return snapshot.analytes.map((a) => {
    const v = versionOf.get(a.id);
    return prepareAnalyte(a, v ? prepareVersion(v, partitionsOf.get(v.id) ?? []) : null);
  });
}

function addToLoinc(byLoinc: Index["byLoinc"], entry: CachedAnalyte): void {
  if (!entry.loinc) return;
  byLoinc.set(entry.loinc, [...(byLoinc.get(entry.loinc) ?? []).filter((e) => e.id !== entry.id), entry]);
}

function removeFromLoinc(byLoinc: Index["byLoinc"], entry: CachedAnalyte): void {
  if (!entry.loinc) return;
  const rest = (byLoinc.get(entry.loinc) ?? []).filter((e) => e.id !== entry.id);
  if (rest.length) byLoinc.set(entry.loinc, rest);
  else byLoinc.delete(entry.loinc);
}

async function loadAll(s: CacheState): Promise<void> {
  const entries = prepareSnapshot(await loadInForceSnapshot(db()));
  const index: Index = { byId: new Map(), byCode: new Map(), byLoinc: new Map() };
  for (const e of entries) {
    index.byId.set(e.id, e);
    index.byCode.set(e.code, e);
    addToLoinc(index.byLoinc, e);
  }
  s.index = index;
  s.loads++;
}

async function loadOne(s: CacheState, analyteId: string): Promise<void> {
  const [entry] = prepareSnapshot(await loadInForceSnapshot(db(), { analyteId }));
  const index = s.index;
  if (!index) return;
  const old = index.byId.get(analyteId);
  if (old) {
    index.byId.delete(old.id);
    if (index.byCode.get(old.code) === old) index.byCode.delete(old.code);
    removeFromLoinc(index.byLoinc, old);
  }
  if (entry) {
    index.byId.set(entry.id, entry);
    index.byCode.set(entry.code, entry);
    addToLoinc(index.byLoinc, entry);
  }
  s.loads++;
}

function schedule(s: CacheState, what: "all" | string): Promise<void> {
  if (what === "all") {
    s.pendingFull = true;
    s.pendingIds.clear();
  } else if (!s.pendingFull) {
    s.pendingIds.add(what);
  }
  s.draining ??= drain(s).finally(() => {
    s.draining = null;
  });
  return s.draining;
}

/** Runs the pending loads one after another until none is left. */
async function drain(s: CacheState): Promise<void> {
  while (s.pendingFull || s.pendingIds.size > 0) {
    const full = s.pendingFull || s.index === null;
    const ids = [...s.pendingIds];
    s.pendingFull = false;
    s.pendingIds.clear();
    try {
      if (full) await loadAll(s);
      else for (const id of ids) await loadOne(s, id);
      s.lastError = null;
    } catch (err) {
      if (s.lastError === null) console.error("bellwether: the in-force interval cache could not be reloaded", err);
      s.lastError = err;
      retryLater(s, full ? "all" : ids);
      return;
    }
  }
}

/**
 * A failed reload is tried again while the listening connection is up (the database answered
 * LISTEN but not the query); while it is down, its reconnection reloads everything anyway.
 */
function retryLater(s: CacheState, what: "all" | string[]): void {
  if (s.retryTimer || s.index === null) return;
  s.retryTimer = setTimeout(() => {
    s.retryTimer = null;
    if (!listenerStatus().connected) return;
    if (what === "all") void schedule(s, "all");
    else for (const id of what) void schedule(s, id);
  }, RETRY_MS);
  s.retryTimer.unref();
}

function listen(s: CacheState): void {
  if (s.subscribed) return;
  s.subscribed = true;
  subscribe(
    CHANNEL,
    (analyteId) => void schedule(s, analyteId),
    () => void schedule(s, "all"),
  );
}

async function index(): Promise<Index> {
  const s = state();
  if (s.index) return s.index;
  listen(s);
  await schedule(s, "all");
  if (!s.index) throw s.lastError ?? new Error("the in-force interval cache could not be loaded");
  return s.index;
}

/**
 * Loads the cache (first use) and starts listening for changes; instrumentation-node.ts calls it
 * at start-up so that the first request does not wait. Throws when the database cannot be read
 * and nothing is cached yet.
 */
export async function warmModelCache(): Promise<void> {
  await index();
}

/** The cached analyte for our code, or undefined when the catalogue has no such code. */
export async function analyteByCode(code: string): Promise<CachedAnalyte | undefined> {
  return (await index()).byCode.get(code);
}

/**
 * Lookups for a batch: one await for the whole batch, then synchronous reads. The functions read
 * the index current at the call, so a batch is scored against one state of the cache.
 */
export async function modelLookup(): Promise<{
  byCode: (code: string) => CachedAnalyte | undefined;
  byLoinc: (loinc: string) => readonly CachedAnalyte[];
}> {
  const i = await index();
  return { byCode: (code) => i.byCode.get(code), byLoinc: (loinc) => i.byLoinc.get(loinc) ?? [] };
}

/** How the cache stands: for tests and diagnostics. */
export function modelCacheStatus(): { loaded: boolean; analytes: number; loads: number; listening: boolean } {
  const s = state();
  return { loaded: s.index !== null, analytes: s.index?.byId.size ?? 0, loads: s.loads, listening: listenerStatus().connected };
}
