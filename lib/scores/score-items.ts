import "server-only";
import { AppError } from "@/lib/api/errors";
import { zodIssues } from "@/lib/api/problem";
import type { Principal } from "@/lib/auth/principal";
import { CAUTION_TEXTS, type CautionCode, type PartitionChoice } from "@/lib/scoring/cautions";
import { obx7 } from "@/lib/scoring/hl7";
import { lmsLimitsAt, scoreValue, type Score } from "@/lib/scoring/score";
import { StatsInputError } from "@/lib/stats/validate";
import { convertUnit } from "@/lib/units/ucum";
import { exactAgeYears, readDateCell, type DayOut } from "@/lib/uploads/values";
import { ageYearsToDays } from "@/lib/versions/age-days";
import { fastScoreItem } from "./fast-item";
import { modelLookup, type CachedAnalyte, type CachedPartition, type CachedVersion } from "./model-cache";
import { scoreItemSchema, type InForceIntervals, type ScoreItem, type ScoreItemError, type ScoreResponse, type ScoreResult } from "./schemas";
import { scoreLogWriter, type ScoreLogWriter } from "./score-log";

/**
 * The score service behind POST /api/v1/scores, the score page and the FHIR route: each item is
 * parsed on its own (a bad item gets an error in its place and the rest are scored), its
 * analyte's version in force comes from the in-memory model cache, the value is converted to the
 * interval's unit (UCUM, with the analyte's molar mass), censored strings are read, the age is
 * resolved (birthDate + collectedAt win over ageYears), the partition is picked, and the value is
 * scored by lib/scoring's scoreValue with the partition's prepared scorer. Every score is
 * appended to the score log. No database work per item.
 */

/** The `type` and `title` of each kind of item error. */
export const SCORE_ITEM_ERRORS = {
  invalid: { type: "urn:bellwether:problem:invalid", title: "Invalid item" },
  unknownAnalyte: { type: "urn:bellwether:problem:not_found", title: "Unknown analyte" },
  noInterval: { type: "urn:bellwether:problem:no_interval_in_force", title: "No interval in force" },
  noPartition: { type: "urn:bellwether:problem:no_partition", title: "No partition applies" },
  unit: { type: "urn:bellwether:problem:unit_not_convertible", title: "Unit not convertible" },
} as const;

export type ScoreItemErrorKind = keyof typeof SCORE_ITEM_ERRORS;

function itemError(kind: ScoreItemErrorKind, detail: string, ref: string | undefined): ScoreItemError {
  return { ref, error: { ...SCORE_ITEM_ERRORS[kind], detail } };
}

/** The caller's reference of an item that failed to parse, when it can be read. */
function refOf(raw: unknown): string | undefined {
  if (raw === null || typeof raw !== "object") return undefined;
  const ref = (raw as { ref?: unknown }).ref;
  return typeof ref === "string" && ref.length <= 64 ? ref : undefined;
}

const CENSORED = /^(<=|>=|<|>|≤|≥)?\s*([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)$/;

/** A value as sent: a number, a number written as text, or a censored result such as "<0.5". */
function readValue(value: number | string): { value: number; censored: "<" | ">" | null } | string {
  if (typeof value === "number") return { value, censored: null };
  const m = CENSORED.exec(value);
  const number = m ? Number(m[2]) : NaN;
  if (!m || !Number.isFinite(number)) {
    return `value "${value}" is neither a number nor a censored result such as "<0.5" or ">1000".`;
  }
  const sign = m[1];
  return { value: number, censored: sign === undefined ? null : sign.startsWith("<") || sign === "≤" ? "<" : ">" };
}

type Converter = ((x: number) => number) | { message: string };
const CONVERTERS_KEY = Symbol.for("bellwether.scores.unitConverters");
const MAX_CONVERTERS = 1000;

/**
 * A conversion from one unit to another, prepared once per pair (and molar mass): UCUM
 * conversions of concentrations are proportional, so the factor is read once from convertUnit
 * and reused; a pair that is not proportional (an offset) calls convertUnit for each value.
 */
function converter(from: string, to: string, molarMass: number | null): Converter {
  const g = globalThis as unknown as Record<symbol, Map<string, Converter> | undefined>;
  const cache = (g[CONVERTERS_KEY] ??= new Map());
  const key = `${from}\u0000${to}\u0000${molarMass ?? ""}`;
  let c = cache.get(key);
  if (c) return c;
  try {
    const at0 = convertUnit({ value: 0, from, to, molarMass });
    const at1 = convertUnit({ value: 1, from, to, molarMass });
    const at1000 = convertUnit({ value: 1000, from, to, molarMass });
    const proportional = at0 === 0 && Math.abs(at1000 - 1000 * at1) <= 1e-12 * Math.abs(at1000);
    c = proportional ? (x: number) => x * at1 : (x: number) => convertUnit({ value: x, from, to, molarMass });
  } catch (err) {
    if (!(err instanceof AppError)) throw err;
    c = { message: err.message };
  }
  if (cache.size >= MAX_CONVERTERS) cache.clear();
  cache.set(key, c);
  return c;
}

interface Age {
  days: number | null;
  years: number | null;
}

/** birthDate + collectedAt (exact, as uploads compute it) win over ageYears (days = round(years × 365.25)). */
function resolveAge(item: ScoreItem): Age | string {
  if (item.birthDate !== undefined && item.collectedAt !== undefined) {
    const birth: DayOut = { day: 0, y: 0, m: 0, d: 0, iso: "" };
    const collected: DayOut = { day: 0, y: 0, m: 0, d: 0, iso: "" };
    // A date-time counts as the calendar day it names, in its own offset.
    const problem = readDateCell(item.birthDate, "birthDate", birth) ?? readDateCell(item.collectedAt.slice(0, 10), "collectedAt", collected);
    if (problem) return `${problem}.`;
    if (birth.day > collected.day) return `birthDate ${birth.iso} is after collectedAt ${collected.iso}.`;
    return { days: collected.day - birth.day, years: exactAgeYears(birth, collected) };
  }
  if (item.ageYears !== undefined) return { days: ageYearsToDays(item.ageYears), years: item.ageYears };
  return { days: null, years: null };
}

const hasAgeBounds = (p: CachedPartition) => p.lms !== null || p.ageFromDays !== null || p.ageToDays !== null;
const sexFits = (p: CachedPartition, sex: "F" | "M" | null) => p.sex === null || p.sex === sex;
/** LMS curves hold the exact ages in [ageMin, ageMax]; an age band the days in [ageFromDays, ageToDays). */
const ageFits = (p: CachedPartition, age: Age) =>
  p.lms !== null
    ? age.years !== null && age.years >= p.lms.ageMin && age.years <= p.lms.ageMax
    : !hasAgeBounds(p) ||
      (age.days !== null && (p.ageFromDays === null || age.days >= p.ageFromDays) && (p.ageToDays === null || age.days < p.ageToDays));

const yearsText = (years: number) => String(Math.round(years * 100) / 100);

/**
 * The partition for a patient: its sex (or, without one, a partition for both sexes) and its age
 * in days within [ageFromDays, ageToDays) (or, without an age, a partition for every age). A
 * version's partitions do not overlap, so at most one fits.
 */
function pickPartition(analyte: CachedAnalyte, version: CachedVersion, sex: "F" | "M" | null, age: Age): CachedPartition | string {
  for (const p of version.partitions) if (sexFits(p, sex) && ageFits(p, age)) return p;
  const what = `The interval in force for ${analyte.code} (version ${version.number})`;
  if (sex === null && version.partitions.some((p) => ageFits(p, age))) {
    return `${what} is partitioned by sex and has no partition for both sexes: give sex (F or M).`;
  }
  const curves = version.partitions.filter((p) => p.lms !== null && sexFits(p, sex));
  if (age.days === null && curves.length > 0) {
    return `${what} follows age curves: give the patient's exact age (birthDate and collectedAt, or ageYears).`;
  }
  if (age.days === null && version.partitions.some((p) => sexFits(p, sex))) {
    return `${what} is partitioned by age: give ageYears, or birthDate and collectedAt.`;
  }
  if (age.years !== null && curves.length > 0) {
    const ranges = curves.map((p) => `${yearsText(p.lms!.ageMin)} to ${yearsText(p.lms!.ageMax)} years${p.sex === null ? "" : ` (${p.sex === "F" ? "female" : "male"})`}`);
    return `${what} follows age curves that cover ${ranges.join(" and ")}; the patient's age, ${yearsText(age.years)} years, is outside them, and the curves are not extrapolated.`;
  }
  const who = `${sex === "F" ? "a female" : sex === "M" ? "a male" : "a"} patient${age.years === null ? "" : ` aged ${Math.round(age.years * 100) / 100} years`}`;
  return `${what} has no partition for ${who}.`;
}

function choiceOf(p: CachedPartition): PartitionChoice | null {
  const bySex = p.sex !== null;
  const byAge = hasAgeBounds(p);
  return bySex && byAge ? "age-and-sex" : bySex ? "sex" : byAge ? "age" : null;
}

interface Context {
  byCode: (code: string) => CachedAnalyte | undefined;
  byLoinc: (loinc: string) => readonly CachedAnalyte[];
  nowMs: number;
  log: ScoreLogWriter;
  codes: Set<CautionCode>;
}

function findAnalyte(item: ScoreItem, ctx: Context): CachedAnalyte | string {
  if (item.analyte !== undefined) {
    const a = ctx.byCode(item.analyte);
    if (!a) return `There is no analyte with the code ${item.analyte}.`;
    if (item.loinc !== undefined && a.loinc !== item.loinc) {
      return `The analyte ${a.code} has ${a.loinc ? `the LOINC code ${a.loinc}` : "no LOINC code"}, not ${item.loinc}: send one of the two, or both matching.`;
    }
    return a;
  }
  const found = ctx.byLoinc(item.loinc as string);
  if (found.length === 0) return `No analyte has the LOINC code ${item.loinc}.`;
  if (found.length > 1) {
    return `The LOINC code ${item.loinc} names ${found.length} analytes (${found.map((a) => a.code).join(", ")}): send analyte instead.`;
  }
  return found[0];
}

function scoreOne(raw: unknown, ctx: Context): ScoreResult | ScoreItemError {
  let item = fastScoreItem(raw);
  if (item === null) {
    const parsed = scoreItemSchema.safeParse(raw);
    if (!parsed.success) {
      return itemError("invalid", zodIssues(parsed.error).map((e) => `${e.path}: ${e.message}`).join("; "), refOf(raw));
    }
    item = parsed.data;
  }
  const ref = item.ref;
  const analyte = findAnalyte(item, ctx);
  if (typeof analyte === "string") return itemError("unknownAnalyte", analyte, ref);
  const version = analyte.version;
  if (!version) {
    return itemError("noInterval", `There is no interval in force for ${analyte.code} (${analyte.name}): none has been signed off, or the one in force was withdrawn.`, ref);
  }
  if (version.problem) return itemError("noInterval", version.problem, ref);

  const read = readValue(item.value);
  if (typeof read === "string") return itemError("invalid", read, ref);
  let { value } = read;
  const { censored } = read;
  let converted = false;
  if (item.unit !== undefined && item.unit !== version.unit) {
    const convert = converter(item.unit, version.unit, analyte.molarMass);
    if (typeof convert !== "function") return itemError("unit", convert.message, ref);
    value = convert(value);
    converted = true;
  }

  const age = resolveAge(item);
  if (typeof age === "string") return itemError("invalid", age, ref);
  const sex = item.sex === undefined ? null : item.sex === "F" || item.sex === "female" ? "F" : "M";
  const partition = pickPartition(analyte, version, sex, age);
  if (typeof partition === "string") return itemError("noPartition", partition, ref);

  let score: Score;
  try {
    score = scoreValue(
      {
        partition: partition.scoring,
        value,
        censored,
        unitConverted: converted ? { from: item.unit } : null,
        reviewOverdue: version.reviewByMs !== null && ctx.nowMs > version.reviewByMs,
        partitionChosenBy: choiceOf(partition),
        ageYears: age.years,
      },
      partition.scorer ?? undefined,
    );
  } catch (err) {
    if (err instanceof StatsInputError) return itemError("invalid", `${err.message}.`, ref);
    throw err;
  }
  const cautions: string[] = new Array(score.cautions.length);
  for (let i = 0; i < score.cautions.length; i++) {
    const code = score.cautions[i].code;
    cautions[i] = code;
    ctx.codes.add(code);
  }
  ctx.log(partition.logKey, value, censored, score.flag, score.z, score.percentile);
  const at = score.lms;
  return {
    ref,
    analyte: analyte.ref,
    value,
    censored,
    z: score.z,
    percentile: score.percentile,
    percentileBound: score.percentileBound ?? undefined,
    flag: score.flag,
    // LMS curves: this age's limits and L, M, S (the shared parts stay untouched).
    interval: at === null ? partition.interval : { ...partition.interval, low: at.low, high: at.high },
    model:
      at === null || partition.lms === null
        ? (partition.model as NonNullable<CachedPartition["model"]>)
        : { kind: "lms", ageYears: at.ageYears, L: at.L, M: at.M, S: at.S, ageMin: partition.lms.ageMin, ageMax: partition.lms.ageMax },
    hl7: score.hl7,
    cautions,
    ageYearsUsed: age.years,
  };
}

/**
 * Scores each item against its analyte's interval in force, in order: a result, or an error in
 * the item's place. `cautionTexts` explains each caution code of the results once, in a sentence
 * that does not depend on the value. Throws only when nothing is cached and the database cannot
 * be read (the route answers 503).
 */
export async function scoreItems({
  items,
  principal,
  channel,
  now,
}: {
  items: unknown[];
  principal: Principal;
  channel: "app" | "api" | "fhir";
  now?: Date;
}): Promise<ScoreResponse> {
  const { byCode, byLoinc } = await modelLookup();
  const at = now ?? new Date();
  const ctx: Context = { byCode, byLoinc, nowMs: at.getTime(), log: scoreLogWriter({ principal, channel, scoredAt: at }), codes: new Set() };
  const results: (ScoreResult | ScoreItemError)[] = new Array(items.length);
  for (let i = 0; i < items.length; i++) results[i] = scoreOne(items[i], ctx);
  const cautionTexts: Record<string, string> = {};
  for (const code of ctx.codes) cautionTexts[code] = CAUTION_TEXTS[code];
  return { results, cautionTexts };
}

/**
 * The in-force partitions of the analyte named by our code or a LOINC code, from the model cache;
 * null when no analyte has that code. `version` is null when none is in force.
 */
export async function inForceIntervals(codeOrLoinc: string, { ages }: { ages?: readonly number[] } = {}): Promise<InForceIntervals | null> {
  const { byCode, byLoinc } = await modelLookup();
  const byLoincFound = byLoinc(codeOrLoinc);
  const analyte = byCode(codeOrLoinc.toUpperCase()) ?? (byLoincFound.length === 1 ? byLoincFound[0] : undefined);
  if (!analyte) return null;
  const v = analyte.version;
  return {
    analyte: { code: analyte.code, name: analyte.name, loinc: analyte.loinc, unit: analyte.unit, decimals: analyte.decimals },
    version: v ? { id: v.id, number: v.number, effectiveFrom: v.effectiveFrom, reviewBy: v.reviewBy } : null,
    partitions: (v?.partitions ?? []).map((p) => ({
      id: p.id,
      sex: p.sex,
      ageFrom: p.ageFrom,
      ageTo: p.ageTo,
      ageFromDays: p.ageFromDays,
      ageToDays: p.ageToDays,
      low: p.low,
      high: p.high,
      lowCi: p.lowCi ? [p.lowCi[0], p.lowCi[1]] : null,
      highCi: p.highCi ? [p.highCi[0], p.highCi[1]] : null,
      method: p.method,
      n: p.n,
      unit: v?.unit ?? analyte.unit,
      hl7: { obx7: p.obx7 },
      curves: p.lms ? { kind: "lms" as const, ageMin: p.lms.ageMin, ageMax: p.lms.ageMax } : null,
      ...(ages === undefined ? {} : { atAges: limitsAtAges(p, ages, v?.decimals ?? analyte.decimals) }),
    })),
    ...(ages === undefined ? {} : { ages: [...ages] }),
  };
}

/**
 * A partition's limits at each requested age it covers: LMS curves read at the exact age (the
 * 2.5th and 97.5th centiles there), an age band's or an all-ages partition's fixed limits.
 */
function limitsAtAges(p: CachedPartition, ages: readonly number[], decimals: number): NonNullable<InForceIntervals["partitions"][number]["atAges"]> {
  const out: NonNullable<InForceIntervals["partitions"][number]["atAges"]> = [];
  for (const ageYears of ages) {
    if (!ageFits(p, { years: ageYears, days: ageYearsToDays(ageYears) })) continue;
    const { low, high } = p.lms ? lmsLimitsAt(p.lms, ageYears) : p;
    out.push({ ageYears, low, high, hl7: { obx7: p.lms ? obx7(low, high, decimals) : p.obx7 } });
  }
  return out;
}
