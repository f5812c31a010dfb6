import { describe, expect, it } from "vitest";
import { createScorer, scoreMany, scoreValue } from "@/lib/scoring/score";
import {
  gaussianModelSchema,
  scoringModelSchema,
  scoringPartitionSchema,
  type ScoringPartitionInput,
} from "@/lib/scoring/model";
import { GENERAL_CAUTION } from "@/lib/scoring/cautions";
import { StatsInputError } from "@/lib/stats/validate";
import fx from "../fixtures/scoring-checks.json";

const potassium = scoringPartitionSchema.parse({
  low: 3.5,
  high: 5.1,
  unit: "mmol/L",
  decimals: 1,
  model: { kind: "gaussian", transform: "none", mean: 4.3, sd: 0.4 },
  n: 120,
} satisfies ScoringPartitionInput);

const empirical = scoringPartitionSchema.parse({
  low: fx.empirical.q[1],
  high: fx.empirical.q[7],
  unit: "mmol/L",
  decimals: 0,
  model: { kind: "empirical", values: fx.empirical.values },
});

const codes = (s: { cautions: { code: string }[] }) => s.cautions.map((c) => c.code);

describe("scoreValue", () => {
  it("scores, flags and formats a value within the interval", () => {
    const s = scoreValue({ partition: potassium, value: 5.1 });
    // z = (5.1 − 4.3)/0.4 = 2; R: 100 * pnorm(2) = 97.72498680518208 (scoring-checks.R).
    expect(s.z).toBeCloseTo(2, 12);
    expect(s.percentile).toBeCloseTo(fx.normal.percentile, 10);
    expect(s.percentileBound).toBeNull();
    expect(s.flag).toBe("N"); // 5.1 is the high limit itself: inclusive
    expect(s.hl7).toEqual({ obx7: "3.5-5.1", obx8: "N" });
    expect(s.cautions).toEqual([GENERAL_CAUTION]);
  });

  it("always carries the general caution, in plain words that defer to the laboratory", () => {
    const text = scoreValue({ partition: potassium, value: 4 }).cautions[0].text;
    expect(text).toContain("not a diagnosis");
    expect(text).toContain("About 5% of healthy people fall outside");
    expect(text).toContain("licensed director");
    expect(text).toContain("clinical picture");
  });

  it("cautions when a gaussian score extrapolates beyond the reference data", () => {
    // n = 120: the data reach |z| = Φ⁻¹(120/121) = 2.40 (the largest plotting position i/(n+1), common practice); z = 2.5 is beyond.
    const beyond = scoreValue({ partition: potassium, value: 5.3 });
    expect(beyond.flag).toBe("H");
    expect(codes(beyond)).toEqual(["general", "tail-extrapolated"]);
    expect(beyond.cautions[1].text).toContain("120 reference results");
    expect(codes(scoreValue({ partition: potassium, value: 5.2 }))).toEqual(["general"]); // z = 2.25
    // Without n the reach is |z| = 3.
    const noN = scoringPartitionSchema.parse({ ...potassium, n: undefined });
    expect(codes(scoreValue({ partition: noN, value: 5.4 }))).toEqual(["general"]); // z = 2.75
    expect(codes(scoreValue({ partition: noN, value: 2.7 }))).toEqual(["general", "tail-extrapolated"]); // z = −4
  });

  it("reports a bound and a caution outside empirical data", () => {
    const s = scoreValue({ partition: empirical, value: 100 });
    expect(s.percentileBound).toBe("below");
    expect(s.percentile).toBeCloseTo(100 / 151, 12);
    expect(s.flag).toBe("L");
    expect(codes(s)).toEqual(["general", "outside-reference-data"]);
    expect(s.cautions[1].text).toContain("below the lowest of the 150 reference results");
    expect(s.hl7.obx7).toBe("135-146");
  });

  it("treats a censored value as a bound, with its caution and flag", () => {
    const s = scoreValue({ partition: potassium, value: 3.4, censored: "<" });
    expect(s.percentileBound).toBe("below");
    expect(s.flag).toBe("L");
    expect(codes(s)).toEqual(["general", "value-censored"]);
    expect(s.cautions[1].text).toContain('"<3.4 mmol/L"');
    const undetermined = scoreValue({ partition: potassium, value: 4.0, censored: "<" });
    expect(undetermined.flag).toBe("<");
    expect(undetermined.hl7.obx8).toBe("<");
  });

  it("adds unit-converted, review-overdue and partition cautions in a stable order", () => {
    const s = scoreValue({
      partition: potassium,
      value: 4.4,
      unitConverted: { from: "meq/L" },
      reviewOverdue: true,
      partitionChosenBy: "age-and-sex",
    });
    expect(codes(s)).toEqual(["general", "unit-converted", "review-overdue", "partition-chosen"]);
    expect(s.cautions[1].text).toContain("from meq/L to mmol/L");
    expect(s.cautions[3].text).toContain("age and sex given");
    const d = scoreValue({ partition: potassium, value: 4.4, partitionChosenBy: "default" });
    expect(codes(d)).toEqual(["general", "partition-default"]);
    expect(d.cautions[1].text).toContain("No age or sex was given");
  });

  it("flags LL/HH only from configured critical limits", () => {
    const crit = scoringPartitionSchema.parse({ ...potassium, criticalLow: 2.5, criticalHigh: 6.5 });
    expect(scoreValue({ partition: crit, value: 7 }).flag).toBe("HH");
    expect(scoreValue({ partition: potassium, value: 7 }).flag).toBe("H");
  });

  it("gives a clear per-value error", () => {
    const ln = scoringPartitionSchema.parse({ ...potassium, model: { kind: "gaussian", transform: "ln", mean: 1.4, sd: 0.1 } });
    expect(() => scoreValue({ partition: ln, value: -1 })).toThrow(StatsInputError);
    expect(() => scoreValue({ partition: ln, value: -1 })).toThrow(
      "value -1 is not positive; a log scoring model needs values > 0",
    );
    expect(() => scoreValue({ partition: potassium, value: NaN })).toThrow("value must be a finite number (got NaN)");
  });
});

describe("scoreMany", () => {
  it("gives R's z, percentile and bound for every model kind, in the batch and one value at a time", () => {
    // Expected: scripts/fixtures/scoring-checks.R ("everyKind"): pnorm of the transformed z for
    // gaussian models; for empirical ones the inverse type-6 quantile written out in R from
    // DESIGN.md's rule (mid-rank on ties, bounds outside the data), on 150 values and on a
    // small tied set. 1e-9: Φ and Φ⁻¹ of @stdlib against R's, and (x^λ − 1)/λ against expm1.
    const covered = new Set<string>();
    for (const c of fx.everyKind) {
      const partition = scoringPartitionSchema.parse({ low: null, high: 1e6, unit: "mmol/L", model: c.model });
      const kind = c.model.kind === "gaussian" ? `gaussian/${c.model.transform}` : "empirical";
      covered.add(kind);
      const many = scoreMany(partition, c.values);
      const one = createScorer(partition);
      expect(many.invalid).toEqual([]);
      c.values.forEach((v, i) => {
        const label = `${kind} at ${v}`;
        expect(many.z[i], label).toBeCloseTo(c.z[i], 9);
        expect(many.percentile[i], label).toBeCloseTo(c.percentile[i], 9);
        expect(many.bound[i], label).toBe(c.bound[i]);
        const s = one(v);
        expect(s.z, label).toBeCloseTo(c.z[i], 9);
        expect(s.percentile, label).toBeCloseTo(c.percentile[i], 9);
        expect(s.bound, label).toBe(c.bound[i] === -1 ? "below" : c.bound[i] === 1 ? "above" : null);
      });
    }
    // zlog and limits (adopted intervals) are checked in tests/scoring/adopted-models.test.ts
    // against METHODS.md §10.1's zlog table; they have no R fixture here.
    covered.add("zlog");
    covered.add("limits");
    // lms (age curves) scores at an age, not in batches: tests/scoring/lms-score.test.ts checks it
    // against METHODS.md §9's CDC values.
    covered.add("lms");
    // Every member of the union (lib/scoring/model.ts), so a new kind cannot go unchecked.
    const union = scoringModelSchema.options.flatMap((o) =>
      o.shape.kind.value === "gaussian"
        ? gaussianModelSchema.shape.transform.options.map((t) => `gaussian/${t}`)
        : [o.shape.kind.value],
    );
    expect([...covered].sort()).toEqual([...union].sort());
  });

  it("marks values it cannot score as NaN and lists them, leaving the rest", () => {
    const ln = scoringPartitionSchema.parse({ ...potassium, model: { kind: "gaussian", transform: "ln", mean: 1.4, sd: 0.1 } });
    const r = scoreMany(ln, [4, -1, NaN, 5]);
    expect(r.invalid).toEqual([1, 2]);
    expect(Number.isNaN(r.z[1])).toBe(true);
    expect(r.z[3]).toBeCloseTo((Math.log(5) - 1.4) / 0.1, 12);
  });
});
