/**
 * From the uploaded bytes to either CSV text or XLSX bytes: size limit, format by content
 * (never by the file name, which the scientist's browser or a renaming may get wrong) and
 * text encoding.
 */
import { UploadError } from "./errors";

/** An upload as bytes, or as a stream of byte chunks (a Node Readable, a web ReadableStream). */
export type UploadInput = Uint8Array | AsyncIterable<Uint8Array>;

/** 20 MB (MiB: 20 × 1024 × 1024 bytes); a larger file is refused before it is parsed. */
export const MAX_UPLOAD_BYTES = 20 * 1024 * 1024;

export type SniffedFile = { format: "csv"; text: string; byteLength: number } | { format: "xlsx"; bytes: Uint8Array };

/** The refusal of a file over MAX_UPLOAD_BYTES, also what the upload route answers for a request body too large to hold it. */
export const TOO_LARGE = `the file is larger than 20 MB; split it into several uploads`;

/** Collects the input, refusing as soon as it passes the size limit (a stream is not read further). */
export async function collectBytes(input: UploadInput, onBytes?: (bytesRead: number) => void): Promise<Uint8Array> {
  if (input instanceof Uint8Array) {
    if (input.byteLength > MAX_UPLOAD_BYTES) throw new UploadError("too_large", TOO_LARGE);
    onBytes?.(input.byteLength);
    return input;
  }
  const chunks: Uint8Array[] = [];
  let total = 0;
  for await (const chunk of input) {
    total += chunk.byteLength;
    if (total > MAX_UPLOAD_BYTES) throw new UploadError("too_large", TOO_LARGE);
    chunks.push(chunk);
    onBytes?.(total);
  }
  return Buffer.concat(chunks, total);
}

/** More control characters than this in a text and it is taken for a binary file. */
const MAX_STRAY_CONTROLS = 8;

/** The line (from 1) of a character offset; a line ends at LF, CRLF or a lone CR. */
function lineOf(text: string, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || (c === 13 && text.charCodeAt(i + 1) !== 10)) line++;
  }
  return line;
}

/**
 * UTF-16 without a byte-order mark: ASCII text in it has a NUL in every other byte, at even
 * offsets (big-endian) or odd ones (little-endian). Looks at the first 1,024 bytes.
 */
function looksLikeUtf16(bytes: Uint8Array): boolean {
  const n = Math.min(bytes.byteLength, 1024) & ~1;
  if (n < 4) return false;
  let evenNul = 0;
  let oddNul = 0;
  for (let i = 0; i < n; i += 2) {
    if (bytes[i] === 0) evenNul++;
    if (bytes[i + 1] === 0) oddNul++;
  }
  const pairs = n / 2;
  return (oddNul >= 0.9 * pairs && evenNul === 0) || (evenNul >= 0.9 * pairs && oddNul === 0);
}

function startsWith(bytes: Uint8Array, prefix: readonly number[]): boolean {
  if (bytes.length < prefix.length) return false;
  for (let i = 0; i < prefix.length; i++) if (bytes[i] !== prefix[i]) return false;
  return true;
}

const ZIP = [0x50, 0x4b, 0x03, 0x04];
const EMPTY_ZIP = [0x50, 0x4b, 0x05, 0x06];
const OLE2 = [0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1];
const UTF8_BOM = [0xef, 0xbb, 0xbf];
const UTF16LE_BOM = [0xff, 0xfe];
const UTF16BE_BOM = [0xfe, 0xff];

export const NOT_CSV_OR_XLSX = "the file is neither CSV text nor an Excel workbook (.xlsx)";

/**
 * Decides the format from the bytes. Text is read as UTF-8 (with or without BOM) or as UTF-16
 * LE/BE when it starts with a byte-order mark; anything else that is not valid UTF-8 is
 * refused rather than guessed (Windows-1252 and Latin-1 misread silently as each other).
 */
export function sniffFile(bytes: Uint8Array): SniffedFile {
  if (bytes.byteLength === 0) throw new UploadError("empty", "the file is empty");
  if (startsWith(bytes, ZIP) || startsWith(bytes, EMPTY_ZIP)) return { format: "xlsx", bytes };
  if (startsWith(bytes, OLE2)) {
    throw new UploadError(
      "unreadable",
      "the file is an old-style Excel workbook (.xls) or another binary Office file; save it as .xlsx or CSV",
    );
  }
  let encoding = "utf-8";
  let skip = 0;
  if (startsWith(bytes, UTF8_BOM)) skip = 3;
  else if (startsWith(bytes, UTF16LE_BOM)) [encoding, skip] = ["utf-16le", 2];
  else if (startsWith(bytes, UTF16BE_BOM)) [encoding, skip] = ["utf-16be", 2];
  else if (bytes.indexOf(0) !== -1) {
    if (looksLikeUtf16(bytes)) {
      throw new UploadError(
        "encoding",
        'the file looks like UTF-16 text without a byte-order mark; save it as "CSV UTF-8" (or UTF-16 with a byte-order mark) and upload it again',
      );
    }
    throw new UploadError("unreadable", NOT_CSV_OR_XLSX);
  }
  let text: string;
  try {
    text = new TextDecoder(encoding, { fatal: true, ignoreBOM: true }).decode(bytes.subarray(skip));
  } catch {
    throw new UploadError(
      "encoding",
      encoding === "utf-8"
        ? "the file is not UTF-8 text; save it as \"CSV UTF-8\" (or UTF-16 with a byte-order mark) and upload it again"
        : `the file starts with a ${encoding.toUpperCase()} byte-order mark but is not valid ${encoding.toUpperCase()} text`,
    );
  }
  // Control characters other than tab, line feed and carriage return do not occur in a CSV
  // written by a spreadsheet or a script. Many of them: the bytes are some binary file; a few in
  // text: a stray character the scientist can find and remove, so say where.
  const control = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/g;
  const first = control.exec(text);
  if (first) {
    let count = 1;
    while (count <= MAX_STRAY_CONTROLS && control.exec(text)) count++;
    if (count > MAX_STRAY_CONTROLS) throw new UploadError("unreadable", NOT_CSV_OR_XLSX);
    const code = first[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, "0");
    throw new UploadError(
      "malformed",
      `line ${lineOf(text, first.index)} of the file holds the control character U+${code}, which CSV text does not contain; remove it and upload the file again`,
    );
  }
  if (text.trim() === "") throw new UploadError("empty", "the file is empty");
  return { format: "csv", text, byteLength: bytes.byteLength };
}
