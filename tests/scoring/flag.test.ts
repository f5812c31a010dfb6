import { describe, expect, it } from "vitest";
import { flagCensored, flagValue } from "@/lib/scoring/flag";

// Rules: METHODS.md §10.2 "Recommended flag logic" (common practice): limits inclusive;
// LL/HH only from configured critical limits.
describe("flagValue", () => {
  const limits = { low: 3.5, high: 5.1 };
  it("L below, H above, N within, limits inclusive", () => {
    expect(flagValue(3.4, limits)).toBe("L");
    expect(flagValue(3.5, limits)).toBe("N");
    expect(flagValue(4.2, limits)).toBe("N");
    expect(flagValue(5.1, limits)).toBe("N");
    expect(flagValue(5.2, limits)).toBe("H");
  });
  it("never derives LL/HH without critical limits", () => {
    expect(flagValue(-1000, limits)).toBe("L");
    expect(flagValue(1000, limits)).toBe("H");
  });
  it("LL/HH strictly beyond configured critical limits", () => {
    const crit = { ...limits, criticalLow: 2.5, criticalHigh: 6.5 };
    expect(flagValue(2.4, crit)).toBe("LL");
    expect(flagValue(2.5, crit)).toBe("L");
    expect(flagValue(6.5, crit)).toBe("H");
    expect(flagValue(6.6, crit)).toBe("HH");
    expect(flagValue(6.6, { ...limits, criticalLow: 2.5 })).toBe("H");
  });
  it("handles one-sided intervals", () => {
    expect(flagValue(0, { low: null, high: 5 })).toBe("N");
    expect(flagValue(6, { low: null, high: 5 })).toBe("H");
    expect(flagValue(100, { low: 10, high: null })).toBe("N");
    expect(flagValue(9, { low: 10, high: null })).toBe("L");
  });
});

describe("flagCensored", () => {
  const limits = { low: 0.5, high: 2, criticalHigh: 10 };
  it("gives L/H when the censoring point settles the side, else the off-scale code", () => {
    expect(flagCensored("<", 0.2, limits)).toBe("L");
    expect(flagCensored("<", 0.5, limits)).toBe("L");
    expect(flagCensored("<", 1, limits)).toBe("<");
    expect(flagCensored(">", 1, limits)).toBe(">");
    expect(flagCensored(">", 2, limits)).toBe("H");
    expect(flagCensored(">", 12, limits)).toBe("HH");
    expect(flagCensored("<", 0.1, { ...limits, criticalLow: 0.2 })).toBe("LL");
  });
});
