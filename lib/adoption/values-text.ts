/**
 * Values typed or pasted into the adoption-check form → numbers. Separators: line breaks,
 * spaces, tabs, semicolons and commas; the decimal separator is the point (a value with a
 * decimal comma is named in the message). Each value is read as lib/uploads reads a file's.
 */
import { readNumberText, type NumberOut } from "@/lib/uploads/values";

export function parseValuesText(text: string): { values: number[]; problems: string[] } {
  const values: number[] = [];
  const problems: string[] = [];
  const out: NumberOut = { value: 0 };
  for (const token of text.split(/[\s;,]+/)) {
    if (token === "") continue;
    const message = readNumberText(token, false, "value", out);
    if (message === null) values.push(out.value);
    else problems.push(message);
  }
  return { values, problems };
}
