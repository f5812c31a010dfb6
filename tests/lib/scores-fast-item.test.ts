import { describe, expect, it } from "vitest";
import { fastScoreItem } from "@/lib/scores/fast-item";
import { scoreItemSchema } from "@/lib/scores/schemas";

/**
 * The quick check of canonical score items must never accept what scoreItemSchema would refuse
 * or change: whatever it accepts, the schema accepts unchanged. The expectations come from the
 * schema itself (the contract), not from the quick check.
 */
const accepted = [
  { analyte: "K", value: 4.2 },
  { loinc: "2823-3", value: "<0.5" },
  { analyte: "HGB", value: 140, unit: "g/L", sex: "female", ageYears: 0 },
  { analyte: "GLU", value: 5.1, sex: "M", ageYears: 150, ref: "x".repeat(64) },
  { analyte: "ALP", value: 90, birthDate: "2024-02-29", collectedAt: "2026-03-02T08:15:00Z" },
  { analyte: "ALP", value: 90, birthDate: "2000-02-29", collectedAt: "2026-03-02T08:15:00.123+05:30" },
  { analyte: "ALP", value: 90, birthDate: "1971-06-14", collectedAt: "2026-03-02" },
  { analyte: "K", loinc: "2823-3", value: ">=1000" },
];

const refusedOrChanged = [
  { analyte: "k", value: 4.2 },
  { analyte: " K", value: 4.2 },
  { analyte: "K", value: " <0.5" },
  { analyte: "K", value: "" },
  { analyte: "K", value: "1".repeat(33) },
  { analyte: "K" },
  { value: 4.2 },
  { analyte: "K", value: 4.2, extra: true },
  { analyte: "K", value: 4.2, sex: "f" },
  { analyte: "K", value: 4.2, ageYears: -1 },
  { analyte: "K", value: 4.2, ageYears: 150.5 },
  { analyte: "K", value: 4.2, birthDate: "1971-06-14" },
  { analyte: "K", value: 4.2, birthDate: "2023-02-29", collectedAt: "2026-03-02" },
  { analyte: "K", value: 4.2, birthDate: "1971-06-14", collectedAt: "2026-03-02T08:15:00" },
  { analyte: "K", value: 4.2, birthDate: "1971-06-14", collectedAt: "2026-03-02T08:15Z" },
  { analyte: "K", value: 4.2, birthDate: "1971-13-01", collectedAt: "2026-03-02" },
  { analyte: "K", value: 4.2, unit: "" },
  { analyte: "K", value: 4.2, ref: "x".repeat(65) },
  { analyte: "K", value: 4.2, ref: 7 },
  { loinc: "2823", value: 4.2 },
  { analyte: "K", value: null },
  "K",
  null,
  [{ analyte: "K", value: 4.2 }],
];

describe("fastScoreItem", () => {
  it("accepts canonical items, returning them as scoreItemSchema would", () => {
    for (const item of accepted) {
      const parsed = scoreItemSchema.safeParse(item);
      expect(parsed.success, JSON.stringify(item)).toBe(true);
      expect(fastScoreItem(item), JSON.stringify(item)).toEqual(parsed.data);
    }
  });

  it("leaves every other item to scoreItemSchema", () => {
    for (const item of refusedOrChanged) {
      const parsed = scoreItemSchema.safeParse(item);
      const fast = fastScoreItem(item);
      if (fast !== null) {
        // Never reached for these items; should one be accepted, it must be the schema's answer.
        expect(parsed.success && parsed.data).toEqual(fast);
      }
      expect(fast, JSON.stringify(item)).toBeNull();
    }
  });
});
