/**
 * A CSV reader (RFC 4180 with the usual liberties of spreadsheets): comma or semicolon
 * separators, detected from the header line; fields in double quotes may hold separators,
 * doubled quotes and line breaks; LF, CRLF or CR line ends. Every field stays a string:
 * `=cmd|…` is text here, and whoever exports donor results must write it as text, never as a
 * formula.
 */
import { UploadError } from "./errors";

const QUOTE = 34;
const COMMA = 44;
const SEMICOLON = 59;
const LF = 10;
const CR = 13;

/**
 * The separator of the header line: a semicolon when it has more semicolons than commas
 * outside quotes (files saved by spreadsheets in decimal-comma locales), otherwise a comma.
 */
export function detectSeparator(text: string): "," | ";" {
  let commas = 0;
  let semicolons = 0;
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === QUOTE) quoted = !quoted;
    else if (quoted) continue;
    else if (c === LF || c === CR) break;
    else if (c === COMMA) commas++;
    else if (c === SEMICOLON) semicolons++;
  }
  return semicolons > commas ? ";" : ",";
}

/**
 * Calls `onRecord` with the fields of each record, in order, and the character offset after
 * it; `onRecord` returns false to stop early (a preview). The array is reused for the next
 * record: copy it to keep it. Blank lines are passed as `[""]`, so
 * the caller can number rows as the scientist sees them.
 * Throws UploadError "malformed" for a quoted field that never closes.
 * Complexity O(length of text).
 */
export function readCsvRecords(
  text: string,
  separator: "," | ";",
  onRecord: (fields: string[], offset: number) => boolean | void,
): void {
  const sep = separator.charCodeAt(0);
  const n = text.length;
  let i = 0;
  let records = 0;
  // One array for every record: callers copy what they keep, so 200,000 rows allocate no arrays.
  const fields: string[] = [];
  while (i < n) {
    fields.length = 0;
    for (;;) {
      let field: string;
      if (text.charCodeAt(i) === QUOTE) {
        let parts = "";
        let from = i + 1;
        for (;;) {
          const q = text.indexOf('"', from);
          if (q === -1) {
            const line = records === 0 ? "the header" : `data row ${records}`;
            throw new UploadError(
              "malformed",
              `the file is not readable as CSV: a quoted field opened in ${line} is never closed`,
            );
          }
          if (text.charCodeAt(q + 1) === QUOTE) {
            parts += text.slice(from, q + 1);
            from = q + 2;
          } else {
            parts += text.slice(from, q);
            i = q + 1;
            break;
          }
        }
        // Text after the closing quote (`"a"b`) is kept rather than refused, as spreadsheets do.
        let j = i;
        while (j < n) {
          const c = text.charCodeAt(j);
          if (c === sep || c === LF || c === CR) break;
          j++;
        }
        field = j > i ? parts + text.slice(i, j) : parts;
        i = j;
      } else {
        let j = i;
        while (j < n) {
          const c = text.charCodeAt(j);
          if (c === sep || c === LF || c === CR) break;
          j++;
        }
        field = text.slice(i, j);
        i = j;
      }
      fields.push(field);
      if (i < n && text.charCodeAt(i) === sep) {
        i++;
        continue;
      }
      break;
    }
    if (i < n) {
      if (text.charCodeAt(i) === CR) i++;
      if (i < n && text.charCodeAt(i) === LF) i++;
    }
    records++;
    if (onRecord(fields, i) === false) return;
  }
}
