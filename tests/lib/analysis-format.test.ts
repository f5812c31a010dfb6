import { describe, expect, it } from "vitest";
import { formatCi, formatP, formatPercentile, formatValue, formatZ } from "@/lib/format";
import { formatBands, parseAgeBands, partitionLabel, partitionQuery, partitionsOfPlan } from "@/components/studies/analysis/partitions";

describe("numbers on the study page (UX.md, Numbers and words)", () => {
  it("gives values and CIs the analyte's decimals, z two and percentiles one, with bounds at the extremes", () => {
    // Expected strings typed from UX.md's rules (common practice, no source).
    expect(formatValue(5.456, 1)).toBe("5.5");
    expect(formatValue(null, 2)).toBe("—");
    expect(formatCi([3.91, 6.104], 2)).toBe("3.91 – 6.10");
    expect(formatZ(-1.964)).toBe("-1.96");
    expect(formatPercentile(0.02)).toBe("< 0.1");
    expect(formatPercentile(99.97)).toBe("> 99.9");
    expect(formatPercentile(42.25)).toBe("42.3");
    expect(formatP(0.0004)).toBe("< 0.001");
    expect(formatP(0.2346)).toBe("0.235");
  });
});

describe("age bands as the scientist types them", () => {
  it("reads half-open bands in the forms the page suggests", () => {
    expect(parseAgeBands("[0, 18) [18, 120)")).toEqual({ bands: [[0, 18], [18, 120]] });
    expect(parseAgeBands("0-18, 18-65, 65-120")).toEqual({ bands: [[0, 18], [18, 65], [65, 120]] });
    expect(parseAgeBands("0 18 120")).toEqual({ bands: [[0, 18], [18, 120]] });
    expect(formatBands([[0, 18], [18, 120]])).toBe("[0, 18) [18, 120)");
  });

  it("says what is wrong with bands that leave a gap, overlap, run backwards or are alone", () => {
    // The API's own rules and words (lib/studies/partitions.ts), so the page and the server agree.
    expect(parseAgeBands("[0, 18) [20, 120)")).toEqual({
      error: "Bands must follow one another: band 2 starts at 20, band 1 ends at 18 (a gap).",
    });
    expect(parseAgeBands("[18, 0) [0, 120)")).toEqual({ error: "Band 1 [18, 0) must start below its end." });
    expect(parseAgeBands("[0, 120)")).toEqual({ error: "Give at least two age bands." });
    expect(parseAgeBands("[0, 18) [18, 150)")).toEqual({ error: "A band's end is an age in years from 0 to 130." });
    expect(parseAgeBands(" ")).toEqual({ error: "Type at least two age bands, for example [0, 18) [18, 120)." });
  });
});

describe("partitions", () => {
  it("yields sex first, then the age bands, and names each in words", () => {
    const parts = partitionsOfPlan({ sex: true, ageBands: [[0, 18], [18, 120]] });
    expect(parts.map(partitionLabel)).toEqual([
      "Female, age 0 to under 18",
      "Female, age 18 to under 120",
      "Male, age 0 to under 18",
      "Male, age 18 to under 120",
    ]);
    expect(partitionsOfPlan(null)).toEqual([{}]);
    expect(partitionLabel({})).toBe("All donors");
    expect(partitionQuery({ sex: "M", ageFrom: 18 })).toBe("?sex=M&ageFrom=18");
    expect(partitionQuery({})).toBe("");
  });
});
