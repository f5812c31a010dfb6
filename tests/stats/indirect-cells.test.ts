import { describe, expect, it } from "vitest";
import { indirectCells, reportingResolution } from "@/lib/stats/indirect-cells";
import { StatsInputError } from "@/lib/stats/validate";

/** 200 values on a 0.1 grid from 3.0 to 6.9 (each reported value 5 times), as a laboratory reports them. */
function gridValues(): number[] {
  const out: number[] = [];
  for (let k = 0; k < 40; k++) for (let r = 0; r < 5; r++) out.push(Number((3 + k * 0.1).toFixed(1)));
  return out;
}

describe("reportingResolution", () => {
  it("finds the step of values reported at fixed decimals, and none for continuous values", () => {
    expect(reportingResolution(Float64Array.from(gridValues()).sort())).toBe(0.1);
    expect(reportingResolution(Float64Array.of(1, 1, 2, 2, 4, 4, 7, 7))).toBe(1);
    expect(reportingResolution(Float64Array.from({ length: 50 }, (_, i) => 1 + Math.sqrt(i)))).toBeNull();
  });
});

describe("indirectCells", () => {
  it("puts the edges half-way between reportable values, so ties fall inside one cell", () => {
    const c = indirectCells(gridValues());
    expect(c.resolution).toBe(0.1);
    // IQR (type 7) of the grid = 5.925 − 3.975 = 1.95; FD 2·1.95·200^(−1/3) = 0.667 → 0.7 (whole steps).
    expect(c.binWidth).toBeCloseTo(0.7, 12);
    expect(c.edges[0]).toBeCloseTo(2.95, 12);
    expect(c.edges[1]).toBeCloseTo(3.65, 12);
    expect(Array.from(c.counts).reduce((a, b) => a + b, 0)).toBe(200);
    // 3.0 … 3.6 (7 reported values × 5) in the first cell.
    expect(c.counts[0]).toBe(35);
    expect(c.censoredBelow).toBeNull();
  });

  it("keeps censored values in open end cells, counted in n, never dropped", () => {
    const values = [...gridValues(), { value: 2.5, side: "below" as const }, { value: 2.5, side: "below" as const }, { value: 8, side: "above" as const }];
    const c = indirectCells(values);
    expect(c.n).toBe(203);
    expect(c.censoredBelow).toEqual({ count: 2, limit: 2.5 });
    expect(c.censoredAbove).toEqual({ count: 1, limit: 8 });
    expect(c.edges[0]).toBe(0);
    // The regular cells start at the "<2.5" limit and end at the ">8" limit.
    expect(c.edges[1]).toBe(2.5);
    expect(c.edges[2]).toBeCloseTo(2.95, 12);
    expect(c.edges[c.edges.length - 2]).toBe(8);
    expect(c.edges[c.edges.length - 1]).toBe(Number.POSITIVE_INFINITY);
    expect(c.counts[0]).toBe(2);
    expect(c.counts[c.counts.length - 1]).toBe(1);
    expect(Array.from(c.counts).reduce((a, b) => a + b, 0)).toBe(203);
    expect(c.cellOf[200]).toBe(0);
    expect(c.cellOf[202]).toBe(c.counts.length - 1);
  });

  it("refuses values the power-normal model cannot take", () => {
    expect(() => indirectCells([...gridValues(), 0])).toThrow(StatsInputError);
    expect(() => indirectCells([...gridValues(), -1])).toThrow(/not positive/);
    expect(() => indirectCells([1, 2, 3])).toThrow(/at least 20 measured values/);
    expect(() => indirectCells(Array(30).fill(4))).toThrow(/all equal/);
    expect(() => indirectCells([...gridValues(), Number.NaN])).toThrow(/not a finite number/);
    expect(() => indirectCells([...gridValues(), { value: 0, side: "below" }])).toThrow(/censoring limit must be positive/);
  });
});
