import { describe, expect, it } from "vitest";
import { obx7, obx8 } from "@/lib/scoring/hl7";

// HL7 v2 OBX-7 / OBX-8 as summarised in METHODS.md §10.2 (READ: HL7 v2 field definition).
describe("obx7", () => {
  it("formats low-high, >low and <high with the analyte's decimals", () => {
    expect(obx7(3.5, 5.1, 1)).toBe("3.5-5.1");
    expect(obx7(3.5, 5.1, 2)).toBe("3.50-5.10");
    expect(obx7(135, 145, 0)).toBe("135-145");
    expect(obx7(10, null, 0)).toBe(">10");
    expect(obx7(null, 15, 0)).toBe("<15");
    expect(obx7(null, null, 1)).toBe("");
  });
  it("rounds limits half away from zero as toFixed does for these decimals", () => {
    expect(obx7(0.25, 1.75, 1)).toBe("0.3-1.8"); // toFixed: 0.25 → "0.3", 1.75 → "1.8"
  });
});

describe("obx8", () => {
  it("is the Table 0078 code, empty when no range applies", () => {
    for (const f of ["L", "H", "N", "LL", "HH", "<", ">"] as const) expect(obx8(f)).toBe(f);
    expect(obx8(null)).toBe("");
  });
});
