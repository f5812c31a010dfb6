import type { ScoreResponse, ScoreResult } from "./schemas";

/**
 * The scoring answer as JSON text, exactly as JSON.stringify would write it, but faster for big
 * batches: the parts that results share (the analyte, the interval, the model: frozen objects
 * held by the model cache) are written once and reused, and each result is assembled from them
 * in the key order of lib/scores/score-items.ts. A result of another shape, and every item error,
 * goes through JSON.stringify. tests/api/scores.test.ts checks the text against JSON.stringify.
 */
const fragments = new WeakMap<object, string>();

function shared(obj: object): string {
  let text = fragments.get(obj);
  if (text === undefined) {
    text = JSON.stringify(obj);
    // Only what cannot change may be remembered by identity.
    if (Object.isFrozen(obj)) fragments.set(obj, text);
  }
  return text;
}

const quoted = new Map<string, string>();
const MAX_QUOTED = 10_000;

/** JSON string literal of a short string that recurs (flags, HL7 strings, caution lists). */
function quote(s: string): string {
  let text = quoted.get(s);
  if (text === undefined) {
    text = JSON.stringify(s);
    if (quoted.size >= MAX_QUOTED) quoted.clear();
    quoted.set(s, text);
  }
  return text;
}

const num = (n: number | null) => (n !== null && Number.isFinite(n) ? String(n) : "null");

const cautionLists = new Map<string, string>();

/** JSON of a list of caution codes: a few distinct lists recur across a batch. */
function cautionsJson(codes: readonly string[]): string {
  const key = codes.join(" ");
  let text = cautionLists.get(key);
  if (text === undefined) {
    text = JSON.stringify(codes);
    if (cautionLists.size >= MAX_QUOTED) cautionLists.clear();
    cautionLists.set(key, text);
  }
  return text;
}

function isScoreResult(r: object): r is ScoreResult {
  return "interval" in r;
}

function resultJson(r: ScoreResult): string {
  let out = "{";
  if (r.ref !== undefined) out += `"ref":${JSON.stringify(r.ref)},`;
  out += `"analyte":${shared(r.analyte)},"value":${num(r.value)},"censored":${r.censored === null ? "null" : quote(r.censored)}`;
  out += `,"z":${num(r.z)},"percentile":${num(r.percentile)}`;
  if (r.percentileBound !== undefined) out += `,"percentileBound":${quote(r.percentileBound)}`;
  out += `,"flag":${quote(r.flag)},"interval":${shared(r.interval)},"model":${shared(r.model)}`;
  out += `,"hl7":{"obx7":${quote(r.hl7.obx7)},"obx8":${quote(r.hl7.obx8)}}`;
  out += `,"cautions":${cautionsJson(r.cautions)},"ageYearsUsed":${num(r.ageYearsUsed)}}`;
  return out;
}

export function scoreResponseJson(response: ScoreResponse): string {
  const parts: string[] = new Array(response.results.length);
  for (let i = 0; i < response.results.length; i++) {
    const r = response.results[i];
    parts[i] = isScoreResult(r) ? resultJson(r) : JSON.stringify(r);
  }
  return `{"results":[${parts.join(",")}],"cautionTexts":${JSON.stringify(response.cautionTexts)}}`;
}
