/**
 * Readers for one cell each. They return an error message (a string) or write the result into
 * a reused output object, so checking 200,000 rows builds no object per cell.
 */
import type { Cell } from "./columns";

const DOT_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const COMMA_NUMBER = /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$/;

export interface NumberOut {
  value: number;
}

/** Text of a cell, trimmed; "" for an empty cell. */
export function cellText(cell: Cell): string {
  if (cell === null || cell === undefined) return "";
  if (typeof cell === "string") return cell.trim();
  if (cell instanceof Date) return isoOfDay(dayOfDate(cell));
  return String(cell);
}

/**
 * Reads a plain number (no censoring sign). `label` names the cell in the message, e.g.
 * `value "abc"`. A decimal comma is read only with `decimalComma`; with it, a decimal point is
 * refused, since in such files "1.234" usually means a thousands separator. −0 reads as 0.
 */
export function readNumberText(text: string, decimalComma: boolean, label: string, out: NumberOut): string | null {
  let source = text;
  if (decimalComma) {
    if (!COMMA_NUMBER.test(text)) {
      if (DOT_NUMBER.test(text) && text.includes(".")) {
        return `${label} "${text}" has a decimal point, but the file was declared to use decimal commas`;
      }
      return `${label} "${text}" is not a number`;
    }
    source = text.replace(",", ".");
  } else if (!DOT_NUMBER.test(text)) {
    if (COMMA_NUMBER.test(text)) {
      return `${label} "${text}" has a decimal comma; if the file uses decimal commas, upload it with the decimal-comma option (decimalComma: true)`;
    }
    return `${label} "${text}" is not a number`;
  }
  const v = Number(source);
  if (!Number.isFinite(v)) return `${label} "${text}" is too large to be a number`;
  out.value = v + 0; // −0 + 0 is +0
  return null;
}

export interface ValueOut extends NumberOut {
  /** 0 uncensored; 1 "<", 2 "<=", 3 ">", 4 ">=". */
  censor: 0 | 1 | 2 | 3 | 4;
}

/**
 * Reads a result: a number, or a censored value `<0.5`, `<=0.5`, `>1000`, `>=1000` (kept with
 * its limit and side; a space after the sign is allowed). Returns an error message or null.
 */
export function readValueCell(cell: Cell, decimalComma: boolean, out: ValueOut): string | null {
  if (typeof cell === "number") {
    out.value = cell + 0;
    out.censor = 0;
    return null;
  }
  const text = cellText(cell);
  if (text === "") return "value is missing";
  if (typeof cell === "boolean" || cell instanceof Date) return `value "${text}" is not a number`;
  const c0 = text.charCodeAt(0);
  if (c0 === 60 || c0 === 62) {
    const inclusive = text.charCodeAt(1) === 61;
    const rest = text.slice(inclusive ? 2 : 1).trimStart();
    if (rest === "") return `value "${text}" has a censoring sign but no limit`;
    const message = readNumberText(rest, decimalComma, "value", out);
    if (message !== null) return message.replace(`"${rest}"`, `"${text}"`);
    out.censor = c0 === 60 ? (inclusive ? 2 : 1) : inclusive ? 4 : 3;
    return null;
  }
  out.censor = 0;
  return readNumberText(text, decimalComma, "value", out);
}

/** Days since 1970-01-01 of a calendar date (proleptic Gregorian, UTC). */
function dayOfYmd(y: number, m: number, d: number): number {
  return Date.UTC(y, m - 1, d) / 86_400_000;
}

/** The calendar day of a date cell. exceljs gives XLSX dates as UTC instants at midnight. */
export function dayOfDate(date: Date): number {
  return Math.round(date.getTime() / 86_400_000);
}

/** ISO 8601 date of a day number. */
export function isoOfDay(day: number): string {
  return new Date(day * 86_400_000).toISOString().slice(0, 10);
}

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;

export interface DayOut {
  day: number;
}

/**
 * Reads a date: an XLSX date cell or ISO 8601 text `YYYY-MM-DD` (no time, no other order:
 * 03/02/2026 means different days in different countries). Returns an error message or null.
 */
export function readDateCell(cell: Cell, column: string, out: DayOut): string | null {
  if (cell instanceof Date) {
    out.day = dayOfDate(cell);
    return Number.isFinite(out.day) ? null : `${column} is not a valid date`;
  }
  const text = cellText(cell);
  if (typeof cell === "number") return `${column} ${text} is a number, not a date; write it as YYYY-MM-DD or format the cell as a date`;
  const m = ISO_DATE.exec(text);
  if (m === null) return `${column} "${text}" is not an ISO 8601 date (YYYY-MM-DD)`;
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const day = dayOfYmd(y, mo, d);
  // Date.UTC rolls 2024-02-31 over to 2024-03-02: a date is in the calendar when it survives the round trip.
  if (mo < 1 || mo > 12 || d < 1 || isoOfDay(day) !== text) return `${column} "${text}" is not a date in the calendar`;
  out.day = day;
  return null;
}

/**
 * Exact age from birth and collection day. Days: the difference of the calendar days. Years:
 * whole years completed (birthdays passed; a 29 February birthday falls on 1 March in common
 * years) plus the fraction of the current year of age, i.e. days since the last birthday over
 * the days from that birthday to the next.
 */
export function exactAgeYears(birthDay: number, collectedDay: number): number {
  const birth = new Date(birthDay * 86_400_000);
  const collected = new Date(collectedDay * 86_400_000);
  const by = birth.getUTCFullYear();
  const bm = birth.getUTCMonth();
  const bd = birth.getUTCDate();
  let years = collected.getUTCFullYear() - by;
  let last = Date.UTC(by + years, bm, bd) / 86_400_000;
  if (last > collectedDay) {
    years--;
    last = Date.UTC(by + years, bm, bd) / 86_400_000;
  }
  const next = Date.UTC(by + years + 1, bm, bd) / 86_400_000;
  return years + (collectedDay - last) / (next - last);
}

/** Sex: F, M, female, male in any case. Returns "F", "M", or an error message. */
export function readSexCell(cell: Cell): "F" | "M" | string {
  const text = cellText(cell);
  if (text === "") return "sex is missing";
  const lower = text.toLowerCase();
  if (lower === "f" || lower === "female") return "F";
  if (lower === "m" || lower === "male") return "M";
  return `sex "${text}" is not F, M, female or male`;
}
