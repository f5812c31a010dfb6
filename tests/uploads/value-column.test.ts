import ExcelJS from "exceljs";
import { describe, expect, it } from "vitest";
import { readValueColumn, UploadError } from "@/lib/uploads";

const bytes = (text: string) => new TextEncoder().encode(text);

describe("readValueColumn (one column of values)", () => {
  it("reads a CSV with a header row", async () => {
    expect(await readValueColumn(bytes("potassium\n4.1\n3.9\n\n4.6\n"))).toEqual({ header: "potassium", values: [4.1, 3.9, 4.6], problems: [] });
  });

  it("reads a CSV without a header: the first row is a value", async () => {
    expect(await readValueColumn(bytes("4.1\n3.9\n"))).toEqual({ header: null, values: [4.1, 3.9], problems: [] });
  });

  it("reads the first column of an XLSX, numbers as numbers", async () => {
    const workbook = new ExcelJS.Workbook();
    const sheet = workbook.addWorksheet("Values");
    sheet.addRow(["value", "note"]);
    sheet.addRow([4.1, "a"]);
    sheet.addRow([3.95]);
    const buffer = new Uint8Array(await workbook.xlsx.writeBuffer());
    expect(await readValueColumn(buffer)).toEqual({ header: "value", values: [4.1, 3.95], problems: [] });
  });

  it("lists rows that are not numbers, by their row in the file", async () => {
    const out = await readValueColumn(bytes("value\n4.1\nhaemolysed\n4,2\n"));
    expect(out.values).toEqual([4.1]);
    expect(out.problems).toEqual([
      { row: 3, message: 'value "haemolysed" is not a number' },
      // A decimal comma splits the row in a comma-separated file: refused, not read as 4.
      { row: 4, message: '"4,2" has more cells than the first row; write one value per row with a decimal point' },
    ]);
  });

  it("refuses an empty file", async () => {
    await expect(readValueColumn(bytes(""))).rejects.toThrow(UploadError);
    await expect(readValueColumn(bytes(""))).rejects.toThrow("the file is empty");
    await expect(readValueColumn(bytes("\n\n"))).rejects.toThrow("the file is empty");
  });
});
