import { describe, expect, it } from "vitest";
import { scoringModelSchema, scoringPartitionSchema } from "@/lib/scoring/model";

const base = { low: 3.5, high: 5.1, unit: "mmol/L", model: { kind: "gaussian", transform: "none", mean: 4.3, sd: 0.4 } };
const issues = (v: unknown) => {
  const r = scoringPartitionSchema.safeParse(v);
  return r.success ? [] : r.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
};

describe("scoring model schema", () => {
  it("accepts both model kinds and defaults decimals to 1", () => {
    expect(scoringPartitionSchema.parse(base).decimals).toBe(1);
    expect(scoringModelSchema.parse({ kind: "empirical", values: [1, 2, 2, 3] }).kind).toBe("empirical");
    expect(scoringModelSchema.parse({ kind: "gaussian", transform: "box-cox", lambda: -0.3, mean: 1, sd: 1 }).kind).toBe(
      "gaussian",
    );
  });

  it("rejects inconsistent models and partitions with readable messages", () => {
    expect(issues({ ...base, model: { ...base.model, transform: "box-cox" } })).toEqual(["model.lambda: a box-cox model needs lambda"]);
    expect(issues({ ...base, model: { ...base.model, sd: 0 } })).toEqual(["model.sd: sd must be positive"]);
    expect(issues({ ...base, model: { kind: "empirical", values: [3, 1, 2] } })).toEqual([
      "model.values: values must be sorted ascending",
    ]);
    expect(issues({ ...base, model: { kind: "empirical", values: [3] } })).toEqual([
      "model.values: an empirical model needs at least 2 reference values",
    ]);
    expect(issues({ ...base, low: 6 })).toEqual(["low: low must not exceed high"]);
    expect(issues({ ...base, low: null, high: null })).toEqual([": a partition needs a low or a high limit (only LMS age curves have none)"]);
    expect(issues({ ...base, criticalLow: 4 })).toEqual(["criticalLow: criticalLow must not exceed low"]);
    expect(issues({ ...base, criticalHigh: 5 })).toEqual(["criticalHigh: criticalHigh must not be below high"]);
    expect(issues({ ...base, model: { kind: "centile-table" } }).length).toBe(1);
  });
});
