/**
 * Readers for one cell each. They return an error message (a string) or write the result into
 * a reused output object, so checking 200,000 rows builds no object per cell.
 */
import type { Cell } from "./columns";

const DOT_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const COMMA_NUMBER = /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$/;

/** A cell's text in a message: in quotes, cut after this many characters. */
const SHOWN_CHARACTERS = 40;

/**
 * A cell's text as a message quotes it: `"text"`, or for a long one its start and its length
 * (`"DDDD…" (5000 characters)`), so that one bad cell cannot fill the report with its text.
 */
export function quoted(text: string): string {
  return text.length <= SHOWN_CHARACTERS ? `"${text}"` : `"${text.slice(0, SHOWN_CHARACTERS)}…" (${text.length} characters)`;
}

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
        return `${label} ${quoted(text)} has a decimal point, but the file was declared to use decimal commas`;
      }
      return `${label} ${quoted(text)} is not a number`;
    }
    source = text.replace(",", ".");
  } else if (!DOT_NUMBER.test(text)) {
    if (COMMA_NUMBER.test(text)) {
      return `${label} ${quoted(text)} has a decimal comma; if the file uses decimal commas, upload it with the decimal-comma option (decimalComma: true)`;
    }
    return `${label} ${quoted(text)} is not a number`;
  }
  const v = Number(source);
  if (!Number.isFinite(v)) return `${label} ${quoted(text)} is too large to be a number`;
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
  if (typeof cell === "boolean" || cell instanceof Date) return `value ${quoted(text)} is not a number`;
  const c0 = text.charCodeAt(0);
  if (c0 === 60 || c0 === 62) {
    const inclusive = text.charCodeAt(1) === 61;
    const rest = text.slice(inclusive ? 2 : 1).trimStart();
    if (rest === "") return `value ${quoted(text)} has a censoring sign but no limit`;
    const message = readNumberText(rest, decimalComma, "value", out);
    if (message !== null) return message.replace(quoted(rest), quoted(text));
    out.censor = c0 === 60 ? (inclusive ? 2 : 1) : inclusive ? 4 : 3;
    return null;
  }
  out.censor = 0;
  return readNumberText(text, decimalComma, "value", out);
}

/**
 * Days since 1970-01-01 of a proleptic Gregorian date, and back, in integer arithmetic (no Date
 * object per cell).
 * @see Hinnant H. chrono-Compatible Low-Level Date Algorithms (days_from_civil,
 *   civil_from_days), 2013, howardhinnant.github.io/date_algorithms.html.
 */
export function dayOfYmd(y: number, m: number, d: number): number {
  const yy = m <= 2 ? y - 1 : y;
  const era = Math.floor(yy / 400);
  const yoe = yy - era * 400;
  const doy = Math.floor((153 * (m > 2 ? m - 3 : m + 9) + 2) / 5) + d - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * 146097 + doe - 719468;
}

export interface DayOut {
  day: number;
  y: number;
  m: number;
  d: number;
  /** The date as ISO 8601 text. */
  iso: string;
}

function setCivilOfDay(day: number, out: DayOut): void {
  const z = day + 719468;
  const era = Math.floor(z / 146097);
  const doe = z - era * 146097;
  const yoe = Math.floor((doe - Math.floor(doe / 1460) + Math.floor(doe / 36524) - Math.floor(doe / 146096)) / 365);
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  out.d = doy - Math.floor((153 * mp + 2) / 5) + 1;
  out.m = mp < 10 ? mp + 3 : mp - 9;
  out.y = yoe + era * 400 + (out.m <= 2 ? 1 : 0);
  out.day = day;
  out.iso = `${String(out.y).padStart(4, "0")}-${out.m < 10 ? "0" : ""}${out.m}-${out.d < 10 ? "0" : ""}${out.d}`;
}

/** The calendar day of a date cell. exceljs gives XLSX dates as UTC instants at midnight. */
export function dayOfDate(date: Date): number {
  return Math.round(date.getTime() / 86_400_000);
}

/** ISO 8601 date of a day number. */
export function isoOfDay(day: number): string {
  const out: DayOut = { day: 0, y: 0, m: 0, d: 0, iso: "" };
  setCivilOfDay(day, out);
  return out.iso;
}

function isLeapYear(y: number): boolean {
  return (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
}

const DAYS_IN_MONTH = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

const DATE_DIGITS = [0, 1, 2, 3, 5, 6, 8, 9];

function digitAt(text: string, i: number): number {
  const c = text.charCodeAt(i) - 48;
  return c >= 0 && c <= 9 ? c : -1;
}

/**
 * Reads a date: an XLSX date cell or ISO 8601 text `YYYY-MM-DD` (no time, no other order:
 * 03/02/2026 means different days in different countries). Returns an error message or null.
 */
export function readDateCell(cell: Cell, column: string, out: DayOut): string | null {
  if (cell instanceof Date) {
    const day = dayOfDate(cell);
    if (!Number.isFinite(day)) return `${column} is not a valid date`;
    setCivilOfDay(day, out);
    return null;
  }
  const text = cellText(cell);
  if (typeof cell === "number") return `${column} ${text} is a number, not a date; write it as YYYY-MM-DD or format the cell as a date`;
  let valid = text.length === 10 && text.charCodeAt(4) === 45 && text.charCodeAt(7) === 45;
  for (let k = 0; valid && k < DATE_DIGITS.length; k++) if (digitAt(text, DATE_DIGITS[k]) === -1) valid = false;
  if (!valid) return `${column} ${quoted(text)} is not an ISO 8601 date (YYYY-MM-DD)`;
  const y = digitAt(text, 0) * 1000 + digitAt(text, 1) * 100 + digitAt(text, 2) * 10 + digitAt(text, 3);
  const m = digitAt(text, 5) * 10 + digitAt(text, 6);
  const d = digitAt(text, 8) * 10 + digitAt(text, 9);
  if (m < 1 || m > 12 || d < 1 || d > (m === 2 && isLeapYear(y) ? 29 : DAYS_IN_MONTH[m - 1])) {
    return `${column} "${text}" is not a date in the calendar`;
  }
  out.y = y;
  out.m = m;
  out.d = d;
  out.day = dayOfYmd(y, m, d);
  out.iso = text;
  return null;
}

/**
 * Exact age from birth and collection date. Days: the difference of the calendar days. Years:
 * whole years completed (birthdays passed; a 29 February birthday falls on 1 March in common
 * years) plus the fraction of the current year of age, i.e. days since the last birthday over
 * the days from that birthday to the next.
 */
export function exactAgeYears(birth: DayOut, collected: DayOut): number {
  let years = collected.y - birth.y;
  // dayOfYmd(y, 2, 29) in a common year is 1 March's day number, which is the convention above.
  let last = dayOfYmd(birth.y + years, birth.m, birth.d);
  if (last > collected.day) {
    years--;
    last = dayOfYmd(birth.y + years, birth.m, birth.d);
  }
  const next = dayOfYmd(birth.y + years + 1, birth.m, birth.d);
  return years + (collected.day - last) / (next - last);
}

/** Sex: F, M, female, male in any case. Returns "F", "M", or an error message. */
export function readSexCell(cell: Cell): "F" | "M" | string {
  const text = cellText(cell);
  if (text === "") return "sex is missing";
  const lower = text.toLowerCase();
  if (lower === "f" || lower === "female") return "F";
  if (lower === "m" || lower === "male") return "M";
  return `sex ${quoted(text)} is not F, M, female or male`;
}

export interface DateTimeOut extends DayOut {
  /** Seconds since midnight. */
  seconds: number;
  /** "YYYY-MM-DDTHH:MM:SS", local time as the laboratory system wrote it. */
  isoDateTime: string;
}

const TIME_PATTERN = /^([01]\d|2[0-3]):([0-5]\d)(?::([0-5]\d)(?:\.\d{1,6})?)?$/;

/**
 * Reads a collection date and time: an XLSX date cell (its time of day kept), or ISO 8601 text
 * `YYYY-MM-DD`, `YYYY-MM-DDTHH:MM[:SS]` or the same with a space for the T. A time zone is
 * refused rather than converted: a laboratory system writes local time, and mixing zones in one
 * file would reorder a patient's results silently. A date without a time counts as midnight.
 * Returns an error message or null.
 */
export function readDateTimeCell(cell: Cell, column: string, out: DateTimeOut): string | null {
  let seconds = 0;
  if (cell instanceof Date) {
    const ms = cell.getTime();
    if (!Number.isFinite(ms)) return `${column} is not a valid date and time`;
    const day = Math.floor(ms / 86_400_000);
    setCivilOfDay(day, out);
    seconds = Math.round((ms - day * 86_400_000) / 1000);
    if (seconds >= 86_400) seconds = 86_399;
  } else {
    const text = cellText(cell);
    if (typeof cell === "number") return `${column} ${text} is a number, not a date and time; write it as YYYY-MM-DDTHH:MM or format the cell as a date`;
    const datePart = text.slice(0, 10);
    const rest = text.slice(10);
    const m = readDateCell(datePart, column, out);
    if (m !== null || (rest !== "" && rest[0] !== "T" && rest[0] !== " ")) {
      return `${column} ${quoted(text)} is not an ISO 8601 date and time (YYYY-MM-DD or YYYY-MM-DDTHH:MM[:SS], local time)`;
    }
    if (rest !== "") {
      const t = TIME_PATTERN.exec(rest.slice(1));
      if (t === null) {
        return /[zZ]|[+-]\d\d:?\d\d$/.test(rest)
          ? `${column} ${quoted(text)} has a time zone; write the local time of collection without one (YYYY-MM-DDTHH:MM[:SS])`
          : `${column} ${quoted(text)} is not an ISO 8601 date and time (YYYY-MM-DD or YYYY-MM-DDTHH:MM[:SS], local time)`;
      }
      seconds = Number(t[1]) * 3600 + Number(t[2]) * 60 + Number(t[3] ?? 0);
    }
  }
  out.seconds = seconds;
  const hh = Math.floor(seconds / 3600);
  const mm = Math.floor((seconds % 3600) / 60);
  const ss = seconds % 60;
  const two = (v: number) => (v < 10 ? `0${v}` : String(v));
  out.isoDateTime = `${out.iso}T${two(hh)}:${two(mm)}:${two(ss)}`;
  return null;
}

/** The longest setting kept with a routine result. */
export const MAX_SETTING_LENGTH = 60;
/** The most flags, and the longest flag, kept with a routine result. */
export const MAX_FLAGS = 20;
export const MAX_FLAG_LENGTH = 60;

/**
 * Reads a routine result's flags: none for an empty cell, else the cell split at semicolons or
 * vertical bars (commas are CSV separators), trimmed, empty pieces dropped. Returns the flags or
 * an error message.
 */
export function readFlagsCell(cell: Cell, column: string): string[] | string {
  const text = cellText(cell);
  if (text === "") return [];
  const flags = text.split(/[;|]/).map((f) => f.trim()).filter((f) => f !== "");
  if (flags.length > MAX_FLAGS) return `${column} has ${flags.length} flags; at most ${MAX_FLAGS} are kept`;
  const long = flags.find((f) => f.length > MAX_FLAG_LENGTH);
  if (long !== undefined) return `${column} holds a flag of ${long.length} characters; at most ${MAX_FLAG_LENGTH} are allowed`;
  return flags;
}
