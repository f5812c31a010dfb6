/**
 * The `value` column of a donor CSV, read for `bellwether estimate`.
 *
 * The contract (tests/cli): a header row; the column named `value` (any case, surrounding spaces
 * ignored, the first such column); the delimiter and line ending detected as Papa Parse detects
 * them (comma, tab, pipe, semicolon; LF, CRLF or CR); quoted fields; a byte-order mark; blank
 * lines skipped; other columns ignored, ragged rows tolerated; a value that `Number` does not
 * read as a finite number refused with its file line.
 *
 * Two readers keep that contract. `scanValues` walks the text once, character by character, and
 * parses each value where it lies, without building a row, an object or a substring per line
 * (10⁶ rows in tens of milliseconds). Whenever it meets something it does not settle itself (an
 * error, a quote it cannot close cleanly, a duplicated header, an unusual number) it gives up,
 * and the reference reader `readValuesWithPapa` (Papa Parse, an object per row) reads the file
 * instead and has the last word: every error message comes from it, and so does every
 * unusual-but-valid file. tests/cli/read-values.test.ts holds the two to the same answers.
 */
import Papa from "papaparse";
import { CliError } from "./cli-error";

/** Values of the `value` column, with 1-based file line numbers in the error messages. */
export function readValues(text: string, file: string): number[] {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  return scanValues(body) ?? readValuesWithPapa(body, file);
}

const PAPA_OPTIONS = {
  header: true,
  skipEmptyLines: "greedy",
  transformHeader: (h: string) => h.trim(),
} as const;

/** The reference reader: Papa Parse with a header row; `body` has no byte-order mark. */
export function readValuesWithPapa(body: string, file: string): number[] {
  if (body.trim() === "") throw new CliError(`${file} is empty`);
  const parsed = Papa.parse<Record<string, string>>(body, PAPA_OPTIONS);
  const fields = parsed.meta.fields ?? [];
  const column = fields.find((f) => f.toLowerCase() === "value");
  if (column === undefined) {
    throw new CliError(`${file} has no "value" column (columns: ${fields.join(", ") || "none"})`);
  }
  // Ragged rows are tolerated (a short row shows up below as a missing value), and so is a
  // one-column file (no delimiter to detect); quoting errors are not.
  const broken = parsed.errors.find(
    (e) => e.type !== "FieldMismatch" && e.code !== "UndetectableDelimiter",
  );
  if (broken) {
    throw new CliError(`${file}: CSV error near data row ${(broken.row ?? 0) + 1}: ${broken.message}`);
  }
  const values: number[] = [];
  // File line numbers: the header is line 1; blank lines the parser skipped are counted back.
  const lines = body.split(/\r\n|\n|\r/);
  let line = 1;
  for (const row of parsed.data) {
    line++;
    while (line <= lines.length && lines[line - 1].trim() === "") line++;
    const raw = (row[column] ?? "").trim();
    const v = raw === "" ? Number.NaN : Number(raw);
    if (!Number.isFinite(v)) {
      throw new CliError(`${file} line ${line}: value "${raw}" is not a number`);
    }
    values.push(v);
  }
  if (values.length === 0) throw new CliError(`${file} has a header but no values`);
  return values;
}

const QUOTE = 0x22;
/** Papa Parse guesses the line ending from the first megabyte. */
const GUESS_SPAN = 1024 * 1024;
/** Papa Parse guesses the delimiter from the first 10 rows; a margin of two. */
const GUESS_ROWS = 12;

/** The characters String.prototype.trim removes (ECMA-262 WhiteSpace and LineTerminator). */
function isSpace(c: number): boolean {
  return (
    c === 32 || (c >= 9 && c <= 13) || c === 0xa0 || c === 0x1680 || (c >= 0x2000 && c <= 0x200a) ||
    c === 0x2028 || c === 0x2029 || c === 0x202f || c === 0x205f || c === 0x3000 || c === 0xfeff
  );
}

/** 10⁰ … 10²², every one exactly representable as a double. */
const POW10 = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/**
 * A plain decimal number ([+-]digits[.digits][e[+-]digits]) in s[start, end), correctly
 * rounded, or NaN when the text is anything else or beyond the exact fast case: at most 15
 * significant digits and a power of ten within ±22, so that the digits and the power are both
 * exact doubles and one multiplication or division rounds once (Clinger's fast path; Clinger
 * WD, How to read floating point numbers accurately, PLDI 1990). The caller then asks Number.
 */
function parsePlainDecimal(s: string, start: number, end: number): number {
  let i = start;
  let negative = false;
  let c = s.charCodeAt(i);
  if (c === 0x2b || c === 0x2d) {
    negative = c === 0x2d;
    c = s.charCodeAt(++i);
  }
  let mantissa = 0;
  let significant = 0;
  let digits = 0;
  let scale = 0;
  while (i < end && c >= 0x30 && c <= 0x39) {
    mantissa = mantissa * 10 + (c - 0x30);
    if (mantissa !== 0) significant++;
    digits++;
    c = s.charCodeAt(++i);
  }
  if (i < end && c === 0x2e) {
    c = s.charCodeAt(++i);
    while (i < end && c >= 0x30 && c <= 0x39) {
      mantissa = mantissa * 10 + (c - 0x30);
      if (mantissa !== 0) significant++;
      digits++;
      scale--;
      c = s.charCodeAt(++i);
    }
  }
  if (digits === 0 || significant > 15) return Number.NaN;
  if (i < end && (c === 0x65 || c === 0x45)) {
    c = s.charCodeAt(++i);
    let expNegative = false;
    if (c === 0x2b || c === 0x2d) {
      expNegative = c === 0x2d;
      c = s.charCodeAt(++i);
    }
    let exponent = 0;
    let expDigits = 0;
    while (i < end && c >= 0x30 && c <= 0x39 && expDigits < 6) {
      exponent = exponent * 10 + (c - 0x30);
      expDigits++;
      c = s.charCodeAt(++i);
    }
    if (expDigits === 0) return Number.NaN;
    scale += expNegative ? -exponent : exponent;
  }
  if (i !== end || scale < -22 || scale > 22) return Number.NaN;
  const v = scale < 0 ? mantissa / POW10[-scale] : mantissa * POW10[scale];
  return negative ? -v : v;
}

/** The finite number in s[start, end) as `Number(text.trim())` reads it, or NaN. */
function numberAt(s: string, start: number, end: number): number {
  while (start < end && isSpace(s.charCodeAt(start))) start++;
  while (end > start && isSpace(s.charCodeAt(end - 1))) end--;
  if (start === end) return Number.NaN;
  const v = parsePlainDecimal(s, start, end);
  if (v === v) return v;
  const w = Number(s.slice(start, end));
  return Number.isFinite(w) ? w : Number.NaN;
}

/** Where the first `rows` line endings end in `s` when none of those lines holds a quote; else -1. */
function endOfFirstLines(s: string, rows: number): number {
  let seen = 0;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c === QUOTE) return -1;
    if (c === 10 || (c === 13 && s.charCodeAt(i + 1) !== 10)) {
      if (++seen === rows) return i + 1;
    }
  }
  return -1;
}

/**
 * Papa Parse's guess of the line ending for a text without quotes (the first megabyte of the
 * file): "\n" when there is no CR or an LF comes first; else "\r\n" when at least half the
 * CRs (counting one more) are followed by an LF; else "\r".
 */
type LineEnding = "\n" | "\r\n" | "\r";

function papaLineEnding(head: string): LineEnding {
  const firstLf = head.indexOf("\n");
  const firstCr = head.indexOf("\r");
  if (firstCr < 0 || (firstLf >= 0 && firstLf < firstCr)) return "\n";
  let cr = 0;
  let crlf = 0;
  for (let i = firstCr; i < head.length; i++) {
    if (head.charCodeAt(i) === 13) {
      cr++;
      if (head.charCodeAt(i + 1) === 10) crlf++;
    }
  }
  return crlf >= (cr + 1) / 2 ? "\r\n" : "\r";
}

/** Where the `rows`-th `newline` ends in `s`; -1 when there are fewer. */
function endOfLines(s: string, newline: string, rows: number): number {
  let at = 0;
  for (let k = 0; k < rows; k++) {
    const j = s.indexOf(newline, at);
    if (j < 0) return -1;
    at = j + newline.length;
  }
  return at;
}

/**
 * The fast reader: the values, or null when the reference reader must decide (any error, and
 * anything out of the ordinary). `body` has no byte-order mark.
 */
export function scanValues(body: string): number[] | null {
  // The delimiter, line ending and header names exactly as Papa Parse settles them: the line
  // ending from the first megabyte, the delimiter from the first 10 rows. Without quotes up
  // there, the line ending is worked out here and Papa reads only the first lines; otherwise
  // Papa reads the first megabyte, and a longer file whose first lines hold a quote goes to it.
  let head = body.length > GUESS_SPAN ? body.slice(0, GUESS_SPAN) : body;
  let newline: LineEnding | null = head.includes('"') ? null : papaLineEnding(head);
  if (newline !== null) {
    const end = endOfLines(head, newline, GUESS_ROWS);
    if (end > 0) head = head.slice(0, end);
    else if (head.length < body.length) return null;
  } else if (head.length < body.length && endOfFirstLines(head, GUESS_ROWS) < 0) {
    return null;
  }
  // Without `header`: Papa would warn on stderr about a duplicated name, and the reference
  // reader, which such a file goes to, warns once already.
  const guess = Papa.parse<string[]>(head, { skipEmptyLines: "greedy", preview: 1, newline: newline ?? undefined });
  const fields = (guess.data[0] ?? []).map((f) => f.trim());
  const delimiter = guess.meta.delimiter;
  const found = newline ?? guess.meta.linebreak;
  if (delimiter.length !== 1 || !(found === "\n" || found === "\r\n" || found === "\r")) return null;
  newline = found;
  const column = fields.findIndex((f) => f.toLowerCase() === "value");
  if (column < 0) return null;

  const s = body;
  const n = s.length;
  const D = delimiter.charCodeAt(0);
  const NL = newline.charCodeAt(0);
  const crlf = newline === "\r\n";
  const nlLength = newline.length;
  if (D === QUOTE || D === NL) return null;

  // The header row, read here too and checked against Papa's: any difference (quotes), or a
  // duplicated name (which Papa renames), sends the file to Papa.
  const names: string[] = [];
  let i = 0;
  for (;;) {
    if (s.charCodeAt(i) === QUOTE) return null;
    let k = i;
    while (k < n) {
      const c = s.charCodeAt(k);
      if (c === D || (c === NL && (!crlf || s.charCodeAt(k + 1) === 10))) break;
      k++;
    }
    names.push(s.slice(i, k).trim());
    i = k;
    if (i < n && s.charCodeAt(i) === D) {
      i++;
      continue;
    }
    i = Math.min(n, i + nlLength);
    break;
  }
  if (names.length !== fields.length || names.some((name, j) => name !== fields[j])) return null;
  if (new Set(names).size !== names.length) return null;

  let values = new Float64Array(Math.max(16, Math.ceil(n / 8)));
  let count = 0;
  // The next quote and delimiter at or after i, found by indexOf and kept until passed (-1: none
  // left), so that each part of the text is searched once.
  let quoteAt = s.indexOf('"', i);
  let delimAt = s.indexOf(delimiter, i);
  while (i < n) {
    const rowStart = i;
    let field = 0;
    let value = Number.NaN;
    if (quoteAt !== -1 && quoteAt < i) quoteAt = s.indexOf('"', i);
    let lineEnd = s.indexOf(newline, i);
    if (lineEnd < 0) lineEnd = n;
    if (quoteAt === -1 || quoteAt >= lineEnd) {
      // A row without quotes, the usual case: its value found with indexOf, the rest skipped.
      let start = i;
      for (let f = 0; f < column && start >= 0; f++) {
        if (delimAt !== -1 && delimAt < start) delimAt = s.indexOf(delimiter, start);
        start = delimAt !== -1 && delimAt < lineEnd ? delimAt + 1 : -1;
      }
      if (start >= 0) {
        if (delimAt !== -1 && delimAt < start) delimAt = s.indexOf(delimiter, start);
        value = numberAt(s, start, delimAt !== -1 && delimAt < lineEnd ? delimAt : lineEnd);
      }
      i = Math.min(n, lineEnd + nlLength);
    } else {
      // A row with a quote: field by field, as Papa reads quoted fields.
      for (;;) {
        if (s.charCodeAt(i) === QUOTE) {
          // A quoted field: "" inside is one quote; the closing quote must be followed by the
          // delimiter, the line ending or the end of the file (else Papa reports or repairs it).
          let j = i + 1;
          let q: number;
          let escaped = false;
          for (;;) {
            q = s.indexOf('"', j);
            if (q < 0) return null;
            if (s.charCodeAt(q + 1) === QUOTE) {
              escaped = true;
              j = q + 2;
              continue;
            }
            break;
          }
          const after = q + 1;
          if (after < n) {
            const c = s.charCodeAt(after);
            if (!(c === D || (c === NL && (!crlf || s.charCodeAt(after + 1) === 10)))) return null;
          }
          if (field === column) {
            if (escaped) {
              const text = s.slice(i + 1, q).replaceAll('""', '"');
              value = numberAt(text, 0, text.length);
            } else {
              value = numberAt(s, i + 1, q);
            }
          }
          i = after;
        } else {
          let k = i;
          while (k < n) {
            const c = s.charCodeAt(k);
            if (c === D || (c === NL && (!crlf || s.charCodeAt(k + 1) === 10))) break;
            k++;
          }
          if (field === column) value = numberAt(s, i, k);
          i = k;
        }
        if (i < n && s.charCodeAt(i) === D) {
          i++;
          field++;
          continue;
        }
        i = Math.min(n, i + nlLength);
        break;
      }
    }
    if (!(value === value)) {
      // A missing or unreadable value: fine on a blank line (Papa skips it), else an error.
      if (!isBlankRow(s, rowStart, i, D)) return null;
      continue;
    }
    if (count === values.length) {
      const grown = new Float64Array(values.length * 2);
      grown.set(values);
      values = grown;
    }
    values[count++] = value;
  }
  if (count === 0) return null;
  // A plain loop: Array.from on a typed array goes through its iterator, several times slower.
  const out = new Array<number>(count);
  for (let j = 0; j < count; j++) out[j] = values[j];
  return out;
}

/** True when s[from, to) holds nothing but delimiters and white space (a line Papa skips). */
function isBlankRow(s: string, from: number, to: number, D: number): boolean {
  for (let j = from; j < to; j++) {
    const c = s.charCodeAt(j);
    if (c !== D && !isSpace(c)) return false;
  }
  return true;
}
