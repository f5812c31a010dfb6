/**
 * A workbook that unpacks to far more than it weighs ("ZIP bomb",
 * tests/fixtures/bad-input/zip-bomb.xlsx: 257 KB unpacking to 257 MiB) is refused before
 * exceljs reads it, by counting what it actually unpacks to; an ordinary workbook reads as before.
 */
import { describe, expect, it } from "vitest";
import { checkUpload, previewUpload, UploadError } from "@/lib/uploads";
import { corpusFile } from "../support/bad-input";

const REFUSAL = {
  code: "too_large",
  status: 413,
  message: "the workbook unpacks to more than 256 MB; save the donor results alone in a new workbook or as CSV",
};

async function refusalOf(promise: Promise<unknown>) {
  const error = await promise.then(
    () => null,
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(UploadError);
  const { code, status, message } = error as UploadError;
  return { code, status, message };
}

describe("workbooks that unpack to too much", () => {
  it("refuses the corpus's ZIP bomb as too large (413) when checking and when previewing", async () => {
    const bomb = corpusFile("zip-bomb.xlsx");
    expect(bomb.byteLength).toBeLessThan(300 * 1024);
    expect(await refusalOf(checkUpload(bomb, { unit: "mmol/L" }))).toEqual(REFUSAL);
    expect(await refusalOf(previewUpload(bomb))).toEqual(REFUSAL);
  });

  it("reads the corpus's formula workbook as before", async () => {
    const report = await checkUpload(corpusFile("formulas.xlsx"), { unit: "mmol/L" });
    expect(report.rows).toEqual({ total: 4, valid: 3, invalid: 1 });
  });
});
