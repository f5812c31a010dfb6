/**
 * Reads a workbook's XML parts directly (unzipped with fflate), without exceljs, so that what a
 * spreadsheet program would see is checked independently of the library that wrote it.
 */
import { strFromU8, unzipSync } from "fflate";

export interface XmlCell {
  sheet: string;
  ref: string;
  /** The cell's `t` attribute (inlineStr, s, str, n, b …), "n" when absent. */
  type: string;
  /** The number format id of the cell's style (cellXfs), 0 when the cell has none. */
  numFmtId: number;
  /** Whether the cell holds a formula (`<f>`). */
  formula: boolean;
  /** The cell's text: the inline string, the shared string, or the value as written. */
  text: string;
}

const unescapeXml = (s: string) =>
  s
    .replace(/&#x([0-9a-fA-F]+);/g, (_, h) => String.fromCodePoint(parseInt(h, 16)))
    .replace(/&#([0-9]+);/g, (_, d) => String.fromCodePoint(Number(d)))
    .replace(/&lt;/g, "<")
    .replace(/&gt;/g, ">")
    .replace(/&quot;/g, '"')
    .replace(/&apos;/g, "'")
    .replace(/&amp;/g, "&");

/** The text of every `<t>` in a fragment, joined (rich text runs included). */
const textOf = (fragment: string) => [...fragment.matchAll(/<t(?:\s[^>]*)?>([\s\S]*?)<\/t>/g)].map((m) => unescapeXml(m[1])).join("");

/** Every cell of every worksheet, with its type, style's number format and whether it is a formula. */
export function xlsxCells(bytes: Uint8Array): XmlCell[] {
  const parts = unzipSync(bytes);
  const text = (name: string) => (parts[name] ? strFromU8(parts[name]) : "");
  const workbook = text("xl/workbook.xml");
  const rels = text("xl/_rels/workbook.xml.rels");
  const targetOf = new Map([...rels.matchAll(/<Relationship\b[^>]*\bId="([^"]+)"[^>]*\bTarget="([^"]+)"/g)].map((m) => [m[1], m[2]]));
  const shared = [...text("xl/sharedStrings.xml").matchAll(/<si>([\s\S]*?)<\/si>/g)].map((m) => textOf(m[1]));
  const styles = text("xl/styles.xml");
  const cellXfs = /<cellXfs\b[^>]*>([\s\S]*?)<\/cellXfs>/.exec(styles)?.[1] ?? "";
  const formats = [...cellXfs.matchAll(/<xf\b([^>]*?)\/?>/g)].map((m) => Number(/numFmtId="(\d+)"/.exec(m[1])?.[1] ?? 0));
  const cells: XmlCell[] = [];
  for (const m of workbook.matchAll(/<sheet\b[^>]*\bname="([^"]*)"[^>]*\br:id="([^"]+)"/g)) {
    const sheet = unescapeXml(m[1]);
    const target = targetOf.get(m[2])!.replace(/^\/?(xl\/)?/, "");
    const xml = text(`xl/${target}`);
    for (const c of xml.matchAll(/<c\b([^>]*?)(?:\/>|>([\s\S]*?)<\/c>)/g)) {
      const attrs = c[1];
      const body = c[2] ?? "";
      const type = /\bt="([^"]+)"/.exec(attrs)?.[1] ?? "n";
      const style = Number(/\bs="(\d+)"/.exec(attrs)?.[1] ?? 0);
      const value = /<v>([\s\S]*?)<\/v>/.exec(body)?.[1];
      const cellText = type === "inlineStr" ? textOf(body) : type === "s" ? shared[Number(value)] : unescapeXml(value ?? "");
      cells.push({
        sheet,
        ref: /\br="([^"]+)"/.exec(attrs)?.[1] ?? "",
        type,
        numFmtId: formats[style] ?? 0,
        formula: /<f[\s>/]/.test(body),
        text: cellText,
      });
    }
  }
  return cells;
}

/** What a spreadsheet program reads as the start of a formula in typed or imported text (OWASP's list). */
export const FORMULA_START = /^[=+\-@\t\r]/;
