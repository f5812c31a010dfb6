import { describe, expect, it } from "vitest";
import { ageBandsSchema, inPartition, partitionLabel, partitionPlanSchema, partitionSchema, partitionsOfPlan } from "@/lib/studies/partitions";

// Expected partitions written out from contracts.md: sex first (F, M), then the bands in order.
describe("partitionsOfPlan", () => {
  it("gives one partition of everyone for no plan", () => {
    expect(partitionsOfPlan(null)).toEqual([{}]);
    expect(partitionsOfPlan({ sex: false, ageBands: null })).toEqual([{}]);
  });

  it("splits by sex", () => {
    expect(partitionsOfPlan({ sex: true, ageBands: null })).toEqual([{ sex: "F" }, { sex: "M" }]);
  });

  it("gives four partitions for sex and two bands", () => {
    expect(partitionsOfPlan({ sex: true, ageBands: [[0, 18], [18, 120]] })).toEqual([
      { sex: "F", ageFrom: 0, ageTo: 18 },
      { sex: "F", ageFrom: 18, ageTo: 120 },
      { sex: "M", ageFrom: 0, ageTo: 18 },
      { sex: "M", ageFrom: 18, ageTo: 120 },
    ]);
  });

  it("splits by age alone", () => {
    expect(partitionsOfPlan({ sex: false, ageBands: [[0, 18], [18, 65], [65, 130]] })).toHaveLength(3);
  });
});

describe("partitionLabel", () => {
  it("says who the partition holds", () => {
    expect(partitionLabel({})).toBe("All donors");
    expect(partitionLabel({ sex: "F" })).toBe("F");
    expect(partitionLabel({ sex: "M", ageFrom: 18, ageTo: 120 })).toBe("M, age 18 to under 120");
    expect(partitionLabel({ ageTo: 18 })).toBe("age under 18");
    expect(partitionLabel({ ageFrom: 65 })).toBe("age 65 and over");
  });
});

describe("inPartition", () => {
  it("treats the age range as half-open [ageFrom, ageTo)", () => {
    const adults = { ageFrom: 18, ageTo: 120 };
    expect(inPartition(adults, { sex: "F", ageYears: 18 })).toBe(true);
    expect(inPartition(adults, { sex: "F", ageYears: 17.999 })).toBe(false);
    expect(inPartition(adults, { sex: "F", ageYears: 120 })).toBe(false);
  });

  it("matches the sex when given", () => {
    expect(inPartition({ sex: "F" }, { sex: "M", ageYears: 40 })).toBe(false);
    expect(inPartition({ sex: "F" }, { sex: "F", ageYears: 40 })).toBe(true);
    expect(inPartition({}, { sex: "M", ageYears: 40 })).toBe(true);
  });
});

describe("partitionSchema", () => {
  it("refuses a range that does not start below its end", () => {
    const r = partitionSchema.safeParse({ ageFrom: 18, ageTo: 18 });
    expect(r.success).toBe(false);
    expect(r.error?.issues[0].message).toBe("ageFrom must be below ageTo (the range is [ageFrom, ageTo)).");
  });

  it("refuses unknown fields and another sex code", () => {
    expect(partitionSchema.safeParse({ sex: "X" }).error?.issues[0].message).toBe("sex is F or M.");
    expect(partitionSchema.safeParse({ age: 3 }).success).toBe(false);
  });
});

describe("ageBandsSchema", () => {
  it("accepts contiguous bands", () => {
    expect(ageBandsSchema.parse([[0, 18], [18, 120]])).toEqual([[0, 18], [18, 120]]);
  });

  it("refuses one band, a gap, an overlap, a reversed band and an age beyond 130", () => {
    expect(ageBandsSchema.safeParse([[0, 18]]).error?.issues[0].message).toBe("Give at least two age bands.");
    expect(ageBandsSchema.safeParse([[0, 18], [20, 120]]).error?.issues[0].message).toBe(
      "Bands must follow one another: band 2 starts at 20, band 1 ends at 18 (a gap).",
    );
    expect(ageBandsSchema.safeParse([[0, 18], [10, 120]]).error?.issues[0].message).toBe(
      "Bands must not overlap: band 2 starts at 10, band 1 ends at 18.",
    );
    expect(ageBandsSchema.safeParse([[18, 0], [0, 120]]).error?.issues[0].message).toBe("Band 1 [18, 0) must start below its end.");
    expect(ageBandsSchema.safeParse([[0, 18], [18, 140]]).error?.issues[0].message).toBe("A band's end is an age in years from 0 to 130.");
  });

  it("lets a plan leave age bands out", () => {
    expect(partitionPlanSchema.parse({ sex: true, ageBands: null })).toEqual({ sex: true, ageBands: null });
  });
});
