import { readFileSync } from "node:fs";
import path from "node:path";
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { checkUpload, previewUpload, UploadError, type UploadInput } from "@/lib/uploads";
import { createRandom } from "@/lib/stats/random";

// Files refused whole: the requirement's list (not CSV or XLSX, unknown encoding, empty,
// header only, over 20 MB, over 200,000 data rows) with the documented codes, statuses and
// messages. Status numbers: RFC 9110 (413 content too large, 415 unsupported media type) and
// RFC 4918 (422), as lib/uploads/errors.ts maps them.

const fixture = (name: string) => readFileSync(path.join(__dirname, "../fixtures/uploads", name));
const HEADER = "donor_code,sex,age_years,value\n";

async function refusal(input: UploadInput): Promise<{ code: string; status: number; message: string }> {
  try {
    await checkUpload(input, { unit: "mmol/L" });
  } catch (error) {
    if (!(error instanceof UploadError)) throw error;
    return { code: error.code, status: error.status, message: error.message };
  }
  throw new Error("the upload was not refused");
}

describe("files refused whole", () => {
  it("refuses binary garbage named .csv", async () => {
    const random = createRandom(7);
    const garbage = new Uint8Array(4096).map(() => random.nextInt(256));
    expect(await refusal(garbage)).toEqual({
      code: "unreadable",
      status: 415,
      message: "the file is neither CSV text nor an Excel workbook (.xlsx)",
    });
  });

  it("refuses a ZIP archive renamed .xlsx that is not a workbook", async () => {
    expect(await refusal(fixture("not-a-workbook.xlsx"))).toEqual({
      code: "unreadable",
      status: 415,
      message: "the file is a ZIP archive but not a readable Excel workbook (.xlsx)",
    });
  });

  it("refuses a truncated workbook", async () => {
    const whole = fixture("excel-style.xlsx");
    expect((await refusal(whole.subarray(0, 1500))).message).toBe("the file is a ZIP archive but not a readable Excel workbook (.xlsx)");
  });

  it("refuses an old-style .xls workbook", async () => {
    const ole = Buffer.concat([Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]), Buffer.alloc(504)]);
    expect(await refusal(ole)).toEqual({
      code: "unreadable",
      status: 415,
      message: "the file is an old-style Excel workbook (.xls) or another binary Office file; save it as .xlsx or CSV",
    });
  });

  it("refuses text that is not UTF-8 (a Windows-1252 ü)", async () => {
    expect(await refusal(fixture("windows-1252.csv"))).toEqual({
      code: "encoding",
      status: 415,
      message: 'the file is not UTF-8 text; save it as "CSV UTF-8" (or UTF-16 with a byte-order mark) and upload it again',
    });
  });

  it("refuses an empty file, and one of blank lines only", async () => {
    const empty = { code: "empty", status: 422, message: "the file is empty" };
    expect(await refusal(new Uint8Array(0))).toEqual(empty);
    expect(await refusal(Buffer.from("\r\n  \n\n"))).toEqual(empty);
  });

  it("refuses a header-only file", async () => {
    expect(await refusal(Buffer.from(`${HEADER}\n\n`))).toEqual({
      code: "no_data_rows",
      status: 422,
      message: "the file has a header row but no data rows",
    });
  });

  it("refuses a quoted field that never closes", async () => {
    // CSV text that is not readable as CSV: the file's content is at fault, not its type (422).
    expect(await refusal(Buffer.from(`${HEADER}D1,F,30,1\n"D2,F,30,1\n`))).toEqual({
      code: "malformed",
      status: 422,
      message: "the file is not readable as CSV: a quoted field opened in data row 2 is never closed",
    });
  });

  it("refuses a file over 20 MB, and stops reading a stream there", async () => {
    const message = "the file is larger than 20 MB; split it into several uploads";
    const over = Buffer.alloc(20 * 1024 * 1024 + 1, 0x20);
    expect(await refusal(over)).toEqual({ code: "too_large", status: 413, message });
    // 20 MiB exactly is allowed through to the next check (blank text: empty).
    expect((await refusal(over.subarray(0, 20 * 1024 * 1024))).code).toBe("empty");
    let chunksRead = 0;
    const chunks = (function* () {
      for (let i = 0; i < 100; i++) {
        chunksRead++;
        yield Buffer.alloc(1024 * 1024, 0x20);
      }
    })();
    expect(await refusal(Readable.from(chunks))).toEqual({ code: "too_large", status: 413, message });
    expect(chunksRead).toBeLessThanOrEqual(22);
  });

  it("refuses a file of more than 200,000 data rows, and accepts 200,000", async () => {
    const rows = (n: number) => {
      const lines: string[] = [HEADER];
      for (let i = 0; i < n; i++) lines.push(`D${i},F,30,1\n`);
      return Buffer.from(lines.join(""));
    };
    expect(await refusal(rows(200_001))).toEqual({
      code: "too_many_rows",
      status: 413,
      message: "the file has more than 200,000 data rows; split it into several uploads",
    });
    const report = await checkUpload(rows(200_000), { unit: "mmol/L" });
    expect(report.rows).toEqual({ total: 200_000, valid: 200_000, invalid: 0 });
  });

  it("the preview refuses the same files", async () => {
    await expect(previewUpload(fixture("not-a-workbook.xlsx"))).rejects.toThrow(
      "the file is a ZIP archive but not a readable Excel workbook (.xlsx)",
    );
    await expect(previewUpload(Buffer.from(HEADER))).rejects.toThrow("the file has a header row but no data rows");
  });
});

describe("encodings that are read", () => {
  const text = "donor_code,sex,age_years,value\nMüller-1,F,30,4.5\n";

  it.each([
    ["UTF-8 without BOM", Buffer.from(text, "utf8")],
    ["UTF-8 with BOM", Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(text, "utf8")])],
    ["UTF-16 LE with BOM", Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, "utf16le")])],
    ["UTF-16 BE with BOM", Buffer.concat([Buffer.from([0xfe, 0xff]), Buffer.from(text, "utf16le").swap16()])],
  ])("%s", async (_name, bytes) => {
    const report = await checkUpload(bytes, { unit: "mmol/L" });
    expect(report.headers).toEqual(["donor_code", "sex", "age_years", "value"]);
    expect(report.validRows.map((r) => [r.donorCode, r.value])).toEqual([["Müller-1", 4.5]]);
  });

  it("reads a stream as it reads bytes", async () => {
    const bytes = Buffer.from(text, "utf8");
    const report = await checkUpload(Readable.from([bytes.subarray(0, 7), bytes.subarray(7)]), { unit: "mmol/L" });
    expect(report.validRows.map((r) => r.donorCode)).toEqual(["Müller-1"]);
  });
});
