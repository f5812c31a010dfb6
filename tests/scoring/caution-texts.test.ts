import { describe, expect, it } from "vitest";
import { CAUTION_TEXTS, scoreValue, scoringPartitionSchema, type CautionCode } from "@/lib/scoring";

/**
 * CAUTION_TEXTS explains each caution code once for a whole batch, so its sentences may not
 * depend on a value: none names one, and every code scoreValue can give has one.
 */
const ALL_CODES: CautionCode[] = [
  "general", "tail-extrapolated", "outside-reference-data", "unit-converted", "value-censored",
  "review-overdue", "partition-chosen", "partition-default", "limits-only", "flag-only",
  "limits-at-age", "limit-undefined-at-age", "z-undefined", "indirect-estimate",
];

describe("CAUTION_TEXTS", () => {
  it("has one sentence or more for every code, none naming a value", () => {
    expect(Object.keys(CAUTION_TEXTS).sort()).toEqual([...ALL_CODES].sort());
    for (const code of ALL_CODES) {
      expect(CAUTION_TEXTS[code], code).toMatch(/^[A-Z].*\.$/);
      // A value, a z or a bound would show as a decimal or "z ="; the fixed "5%" is no value.
      expect(CAUTION_TEXTS[code], code).not.toMatch(/\d\.\d|z = |\d+ reference results/);
    }
  });

  it("keeps the per-score sentences, formatted when read", () => {
    const partition = scoringPartitionSchema.parse({ low: 3.5, high: 5.1, unit: "mmol/L", model: { kind: "gaussian", transform: "none", mean: 4.3, sd: 0.4 }, n: 120 });
    const s = scoreValue({ partition, value: 6.5, censored: ">", unitConverted: { from: "mg/dL" } });
    const texts = Object.fromEntries(s.cautions.map((c) => [c.code, c.text]));
    // z = (6.5 − 4.3)/0.4 = 5.5 (arithmetic).
    expect(texts["tail-extrapolated"]).toContain("(z = 5.50)");
    expect(texts["value-censored"]).toBe('The result was reported as ">6.5 mmol/L", above the measuring range. It was scored at 6.5, so the true z-score and percentile are higher than shown.');
    expect(texts["unit-converted"]).toContain("from mg/dL to mmol/L");
  });
});
