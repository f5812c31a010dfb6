import { describe, expect, it } from "vitest";
import { CAUTION_TEXTS } from "@/lib/scoring/cautions";
import { scoringModelSchema, scoringPartitionSchema } from "@/lib/scoring/model";
import { createScorer, lmsLimitsAt, scoreMany, scoreValue } from "@/lib/scoring/score";
import { StatsInputError } from "@/lib/stats/validate";

/**
 * LMS curves that are constant in age: every coefficient the same value, so L, M and S are that
 * value at every age (cubic B-splines sum to one; de Boor, A Practical Guide to Splines, 1978).
 */
function constantCurves(L: number, M: number, S: number, intervals = 4) {
  const k = intervals + 3;
  return {
    kind: "lms" as const,
    ageTransform: "sqrt" as const,
    ageMin: 0,
    ageMax: 18,
    intervals,
    L: Array(k).fill(L),
    logM: Array(k).fill(Math.log(M)),
    logS: Array(k).fill(Math.log(S)),
  };
}

// CDC WTAGEINF, weight-for-age, boys, age 0 months (METHODS.md §9's check values).
const CDC = { L: 1.815151075, M: 3.530203168, S: 0.152385273 };

function lmsPartition(model: ReturnType<typeof constantCurves>, extra: Record<string, unknown> = {}) {
  return scoringPartitionSchema.parse({ low: null, high: null, unit: "kg", decimals: 2, model, n: 3000, ...extra });
}

const codes = (s: { cautions: { code: string }[] }) => s.cautions.map((c) => c.code);

describe("lms scoring model", () => {
  it("is a scoring model of its own, stored exactly as lib/stats/lms-model.ts defines it", () => {
    const model = constantCurves(CDC.L, CDC.M, CDC.S);
    expect(scoringModelSchema.parse(model)).toEqual(model);
    const bad = scoringModelSchema.safeParse({ ...model, L: [1, 2] });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0].message).toBe("L, logM and logS each need intervals + 3 coefficients");
  });

  it("is the only model whose partition has no limits, and an lms partition has none", () => {
    const none = scoringPartitionSchema.safeParse({ low: null, high: null, unit: "kg", model: { kind: "gaussian", transform: "none", mean: 1, sd: 1 } });
    expect(none.error?.issues.map((i) => i.message)).toEqual(["a partition needs a low or a high limit (only LMS age curves have none)"]);
    const withLimits = scoringPartitionSchema.safeParse({ low: 2, high: 5, unit: "kg", model: constantCurves(CDC.L, CDC.M, CDC.S) });
    expect(withLimits.error?.issues.map((i) => i.message)).toEqual(["an lms partition's limits follow the age curves: low and high must be null"]);
  });
});

describe("scoring against LMS curves at an exact age", () => {
  const partition = lmsPartition(constantCurves(CDC.L, CDC.M, CDC.S));

  it("gives METHODS.md §9's CDC check values for z and percentile", () => {
    // METHODS.md §9 [COMPUTED]: X = 4.0 kg → z = 0.920302 (82.13th percentile); X = 2.5 kg → z = −1.682769 (4.62nd).
    // R: L<-1.815151075; M<-3.530203168; S<-0.152385273; x<-c(4,2.5); zz<-((x/M)^L-1)/(L*S); 100*pnorm(zz)
    //    → 0.920302052777896 −1.682769034106208; 82.12925316727672 4.62099058845781
    // Tolerance 1e-9: the constant curves reproduce L, M, S up to a few ulps of floating rounding.
    const high = scoreValue({ partition, value: 4.0, ageYears: 0.5 });
    expect(high.z).toBeCloseTo(0.920302052777896, 9);
    expect(high.percentile).toBeCloseTo(82.12925316727672, 8);
    const low = scoreValue({ partition, value: 2.5, ageYears: 0.5 });
    expect(low.z).toBeCloseTo(-1.682769034106208, 9);
    expect(low.percentile).toBeCloseTo(4.62099058845781, 8);
  });

  it("flags against the 2.5th and 97.5th centiles at that age and says so", () => {
    // R: M*(1+L*S*qnorm(c(0.025,0.975)))^(1/L) → 2.29559926121969 4.48166181954882 (CDC L, M, S above).
    const at = lmsLimitsAt(partition.model as ReturnType<typeof constantCurves>, 2);
    expect(at.low).toBeCloseTo(2.29559926121969, 9);
    expect(at.high).toBeCloseTo(4.48166181954882, 9);
    expect(at.L).toBeCloseTo(CDC.L, 12);
    const s = scoreValue({ partition, value: 4.5, ageYears: 2 });
    expect(s.flag).toBe("H");
    expect(s.hl7).toEqual({ obx7: "2.30-4.48", obx8: "H" });
    expect(s.lms).toMatchObject({ ageYears: 2 });
    expect(s.lms?.high).toBeCloseTo(4.48166181954882, 9);
    expect(codes(s)).toEqual(["general", "limits-at-age"]);
    expect(s.cautions[1].text).toContain("exact age (2.00 years)");
    expect(scoreValue({ partition, value: 2.2, ageYears: 2 }).flag).toBe("L");
    expect(scoreValue({ partition, value: 3, ageYears: 2 }).flag).toBe("N");
  });

  it("reads L, M and S at the exact age, not at a band", () => {
    // M(τ) = 100·2^τ with τ = √(age/16) on [0, 16]: coefficients linear in the knot index reproduce a
    // linear function of τ (cubic B-splines reproduce straight lines; de Boor 1978). L = 0 (ln branch), S = 0.1.
    const J = 8;
    const model = {
      kind: "lms" as const,
      ageTransform: "sqrt" as const,
      ageMin: 0,
      ageMax: 16,
      intervals: J,
      L: Array(J + 3).fill(0),
      logM: Array.from({ length: J + 3 }, (_, k) => Math.log(100) + (Math.log(2) * (k - 1)) / J),
      logS: Array(J + 3).fill(Math.log(0.1)),
    };
    const p = scoringPartitionSchema.parse({ low: null, high: null, unit: "U/L", decimals: 0, model, n: 500 });
    // At 4 years τ = 0.5, M = 100·√2 = 141.421356…; x = M gives z = 0. At 9 years τ = 0.75, M = 100·2^0.75 = 168.179283….
    expect(scoreValue({ partition: p, value: 100 * Math.SQRT2, ageYears: 4 }).z).toBeCloseTo(0, 12);
    expect(scoreValue({ partition: p, value: 100 * 2 ** 0.75, ageYears: 9 }).z).toBeCloseTo(0, 12);
    // L = 0: z = ln(x/M)/S; x = M·e^0.2 → z = 2 (METHODS.md §9's L = 0 branch).
    expect(scoreValue({ partition: p, value: 100 * Math.SQRT2 * Math.exp(0.2), ageYears: 4 }).z).toBeCloseTo(2, 12);
    // Limits at 4 years: M·exp(±S·qnorm(0.975)); R: 100*sqrt(2)*exp(c(-1,1)*0.1*qnorm(0.975)) → 116.2505038 172.0422652
    const at = scoreValue({ partition: p, value: 150, ageYears: 4 }).lms;
    expect(at?.low).toBeCloseTo(116.2505038, 6);
    expect(at?.high).toBeCloseTo(172.0422652, 6);
  });

  it("leaves a limit open where 1 + L·S·z ≤ 0, and says so, rather than clamping it", () => {
    // L = −2, S = 0.3, M = 10. R: 1 + L*S*qnorm(0.975) → −0.1759784 (no 97.5th centile);
    // M*(1+L*S*qnorm(0.025))^(1/L) → 6.77911046768609; x = 25: ((25/M)^L−1)/(L*S) → 1.4, 100*pnorm(1.4) → 91.9243340766229.
    const skewed = lmsPartition(constantCurves(-2, 10, 0.3));
    const s = scoreValue({ partition: skewed, value: 25, ageYears: 3 });
    expect(s.lms?.high).toBeNull();
    expect(s.lms?.low).toBeCloseTo(6.77911046768609, 9);
    expect(s.z).toBeCloseTo(1.4, 12);
    expect(s.percentile).toBeCloseTo(91.9243340766229, 9);
    expect(s.flag).toBe("N");
    expect(s.hl7.obx7).toBe(">6.78");
    expect(codes(s)).toEqual(["general", "limits-at-age", "limit-undefined-at-age"]);
    expect(s.cautions[2].text).toContain("no 97.5th centile (upper limit)");
    expect(s.cautions[2].text).toContain("1 + L·S·z ≤ 0");
  });

  it("gives no z for a value of 0 or below, says why, and still flags it", () => {
    const s = scoreValue({ partition, value: 0, ageYears: 1 });
    expect(s.z).toBeNull();
    expect(s.percentile).toBeNull();
    expect(s.flag).toBe("L");
    expect(codes(s)).toEqual(["general", "limits-at-age", "z-undefined"]);
    expect(s.cautions[2].text).toBe(
      "The age curves give no z-score or percentile for 0 kg: the LMS method is defined for positive values only, so only the flag against the limits is given.",
    );
  });

  it("bounds the percentile of a censored value and cautions in the tails", () => {
    const censored = scoreValue({ partition, value: 2.0, ageYears: 1, censored: "<" });
    expect(censored.flag).toBe("L");
    expect(censored.percentileBound).toBe("below");
    expect(codes(censored)).toEqual(["general", "limits-at-age", "value-censored"]);
    // n = 3000: the data reach |z| = Φ⁻¹(3000/3001) ≈ 3.4 (common practice, as for gaussian models); x = 6 kg is z ≈ 4.6.
    expect(codes(scoreValue({ partition, value: 6, ageYears: 1 }))).toEqual(["general", "limits-at-age", "tail-extrapolated"]);
  });

  it("needs the age, and refuses an age outside the curves with their range", () => {
    expect(() => scoreValue({ partition, value: 3 })).toThrow(
      new StatsInputError("this partition's limits follow age curves (LMS): the patient's exact age is needed to score a value"),
    );
    expect(() => scoreValue({ partition, value: 3, ageYears: 18.5 })).toThrow(
      new StatsInputError("age 18.5 years is outside the curves' age range, 0 to 18 years"),
    );
    expect(() => createScorer(partition)).toThrow(StatsInputError);
    expect(() => scoreMany(partition, [3])).toThrow(StatsInputError);
  });

  it("explains each new caution code once, without naming a value", () => {
    for (const code of ["limits-at-age", "limit-undefined-at-age", "z-undefined"] as const) {
      expect(CAUTION_TEXTS[code]).toMatch(/^[A-Z].*\.$/);
      expect(CAUTION_TEXTS[code]).not.toMatch(/\d+\.\d+ (years|kg)/);
    }
  });
});
