import { describe, expect, it } from "vitest";
import { createScorer, scoreMany, scoreValue, scoringPartitionSchema } from "@/lib/scoring";

// Albumin, RI 35–52 g/L: METHODS.md §10.1's zlog check table (COMPUTED from Hoffmann et al.,
// J Lab Med 2017;41:23–32: zlog = (ln x − (ln 35 + ln 52)/2)·3.92/(ln 52 − ln 35)).
const albumin = scoringPartitionSchema.parse({ low: 35, high: 52, unit: "g/L", decimals: 0, model: { kind: "zlog" }, n: 20 });

describe("zlog model (an adopted two-sided interval)", () => {
  it("defaults to the log scale and scores METHODS.md §10.1's albumin values", () => {
    expect(albumin.model).toEqual({ kind: "zlog", scale: "log" });
    const s = scoreValue({ partition: albumin, value: 34 });
    // METHODS.md §10.1 and §13 row 15: 34 g/L → zlog −2.2470, 1.23rd percentile. 4 decimals: the table's.
    expect(s.z).toBeCloseTo(-2.247, 4);
    expect(s.percentile).toBeCloseTo(1.23, 2);
    expect(s.flag).toBe("L");
    expect(s.cautions.map((c) => c.code)).toEqual(["general", "limits-only"]);
    // By hand: (ln 42 − (ln 35 + ln 52)/2)·3.92/(ln 52 − ln 35) = (3.737670 − 3.753296)·3.92/0.395896 = −0.1547.
    expect(scoreValue({ partition: albumin, value: 42 }).z).toBeCloseTo(-0.1547, 4);
    expect(scoreValue({ partition: albumin, value: 50 }).z).toBeCloseTo(1.5717, 4);
    // The limits map to ∓1.96 by construction (3.92/2).
    expect(createScorer(albumin)(35).z).toBeCloseTo(-1.96, 12);
    expect(createScorer(albumin)(52).z).toBeCloseTo(1.96, 12);
  });

  it("scores many values alike and lists the ones it cannot score", () => {
    const out = scoreMany(albumin, [34, 0, 43]);
    expect(out.z[0]).toBeCloseTo(-2.247, 4);
    expect(out.z[2]).toBeCloseTo(0.0783, 4); // METHODS.md §10.1: 43 → 0.0783
    expect(out.invalid).toEqual([1]);
  });

  it("needs both limits, and a positive low limit on the log scale", () => {
    const upperOnly = scoringPartitionSchema.safeParse({ low: null, high: 52, unit: "g/L", model: { kind: "zlog" } });
    expect(upperOnly.success).toBe(false);
    expect(upperOnly.error?.issues[0].message).toBe("a zlog model needs a low limit below a high limit");
    const zeroLow = scoringPartitionSchema.safeParse({ low: 0, high: 40, unit: "U/L", model: { kind: "zlog" } });
    expect(zeroLow.error?.issues[0].message).toBe("a zlog model on the log scale needs a positive low limit");
    // The linear scale: (x − (L + U)/2)·3.92/(U − L); 0–40, x = 30: (30 − 20)·3.92/40 = 0.98 (by hand).
    const linear = scoringPartitionSchema.parse({ low: 0, high: 40, unit: "U/L", model: { kind: "zlog", scale: "linear" } });
    expect(scoreValue({ partition: linear, value: 30 }).z).toBeCloseTo(0.98, 12);
  });
});

describe("limits model (an adopted one-sided interval)", () => {
  const upper = scoringPartitionSchema.parse({ low: null, high: 40, unit: "U/L", decimals: 0, model: { kind: "limits" }, n: 20 });

  it("gives a flag, no z or percentile, and says why", () => {
    const high = scoreValue({ partition: upper, value: 41 });
    expect(high).toMatchObject({ z: null, percentile: null, percentileBound: null, flag: "H" });
    expect(high.hl7.obx8).toBe("H");
    expect(high.cautions.map((c) => c.code)).toEqual(["general", "flag-only"]);
    expect(high.cautions[1].text).toContain("no z-score or percentile can be computed");
    expect(scoreValue({ partition: upper, value: 3 }).flag).toBe("N");
    expect(scoreValue({ partition: upper, value: 40 }).flag).toBe("N");
  });

  it("refuses to make a z scorer for it", () => {
    expect(() => createScorer(upper)).toThrow("this partition's model gives a flag only (a one-sided interval): it has no z-score or percentile");
    expect(() => scoreMany(upper, [1])).toThrow("gives a flag only");
  });
});
