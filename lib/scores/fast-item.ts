import { z } from "zod";
import type { ScoreItem } from "./schemas";

/**
 * A quick check of a score item that is already in canonical form, so that a batch of
 * well-formed items skips zod's general machinery (about a microsecond an item). It accepts an
 * item only when scoreItemSchema would accept it unchanged (no trimming, no upper-casing, no
 * unknown key to strip) and returns that same object; anything else returns null and goes through
 * scoreItemSchema, which then gives the answer and the messages. The patterns are zod's own
 * (z.regexes), so dates are judged exactly as the schema judges them.
 * tests/lib/scores-fast-item.test.ts holds the two to the same answers.
 */
const ANALYTE = /^[A-Z0-9]{1,16}$/;
const LOINC = /^[0-9]{1,7}-[0-9]$/;
const DATE = z.regexes.date;
const DATE_TIME = z.regexes.datetime({ offset: true, local: false, precision: null });
const SEXES = new Set(["F", "M", "female", "male"]);

export function fastScoreItem(raw: unknown): ScoreItem | null {
  if (raw === null || typeof raw !== "object" || Object.getPrototypeOf(raw) !== Object.prototype) return null;
  const item = raw as Record<string, unknown>;
  let named = false;
  let dates = 0;
  let hasValue = false;
  for (const key in item) {
    const v = item[key];
    switch (key) {
      case "analyte":
        if (typeof v !== "string" || !ANALYTE.test(v)) return null;
        named = true;
        break;
      case "loinc":
        if (typeof v !== "string" || !LOINC.test(v)) return null;
        named = true;
        break;
      case "value":
        if (typeof v === "number") {
          if (!Number.isFinite(v)) return null;
        } else if (typeof v !== "string" || v.length < 1 || v.length > 32 || v.trim() !== v) {
          return null;
        }
        hasValue = true;
        break;
      case "unit":
        if (typeof v !== "string" || v.length < 1 || v.length > 64) return null;
        break;
      case "sex":
        if (typeof v !== "string" || !SEXES.has(v)) return null;
        break;
      case "ageYears":
        if (typeof v !== "number" || !Number.isFinite(v) || v < 0 || v > 150) return null;
        break;
      case "birthDate":
        if (typeof v !== "string" || !DATE.test(v)) return null;
        dates++;
        break;
      case "collectedAt":
        if (typeof v !== "string" || !(DATE_TIME.test(v) || DATE.test(v))) return null;
        dates++;
        break;
      case "ref":
        if (typeof v !== "string" || v.length > 64) return null;
        break;
      default:
        return null;
    }
  }
  if (!named || !hasValue || dates === 1) return null;
  return item as ScoreItem;
}
