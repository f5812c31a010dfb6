import { describe, expect, it } from "vitest";
import { evaluateAdoption, formatProbability } from "@/lib/adoption/evaluate";
import { ADOPTION_POLICY } from "@/lib/adoption/policy";
import { parseValuesText } from "@/lib/adoption/values-text";

/** 20 values against 3.5–5.1: `below` under, `above` over, the rest inside. */
function values(below: number, above: number): number[] {
  const x = Array.from({ length: 20 }, (_, i) => 3.6 + i * 0.07);
  for (let i = 0; i < below; i++) x[i] = 3.0;
  for (let i = 0; i < above; i++) x[19 - i] = 6.0;
  return x;
}
const decide = (first: number[], second?: number[]) =>
  evaluateAdoption({ policy: ADOPTION_POLICY, lower: 3.5, upper: 5.1, first, second });

describe("evaluateAdoption (the laboratory's graded EP28-A3c policy)", () => {
  // The rule as the issue states it (issue 8, "Adoption checks"): at most 2 of 20 outside accepts;
  // 3 or 4 call for 20 more, accepted with at most 2 of those outside; 5 or more in the first
  // set, or more than 2 in the second, is not verified.
  const cases: [number, number | null, string][] = [
    [0, null, "accepted"],
    [2, null, "accepted"],
    [3, null, "second_set_needed"],
    [4, null, "second_set_needed"],
    [5, null, "not_verified"],
    [20, null, "not_verified"],
    [3, 2, "accepted"],
    [4, 0, "accepted"],
    [3, 3, "not_verified"],
    [4, 5, "not_verified"],
  ];
  for (const [k1, k2, decision] of cases) {
    it(`${k1} outside${k2 === null ? "" : `, then ${k2}`}: ${decision}`, () => {
      const r = decide(values(k1, 0), k2 === null ? undefined : values(0, k2));
      expect(r.decision).toBe(decision);
      expect(r.first.outside).toBe(k1);
      expect(r.second?.outside ?? null).toBe(k2);
    });
  }

  it("ignores a second set when the first set did not call for one", () => {
    expect(decide(values(1, 0), values(9, 0))).toMatchObject({ decision: "accepted", second: null });
  });

  it("states the binomial reasoning with R's values", () => {
    const r = decide(values(2, 1), values(0, 1));
    expect(r.first.binomial.map((b) => b.expression)).toEqual([
      "P(X ≤ 2 | n = 20, p = 0.05)",
      "P(X ≥ 3 | n = 20, p = 0.05)",
      "P(X ≥ 5 | n = 20, p = 0.05)",
    ]);
    // R: pbinom(2, 20, 0.05) = 0.9245163262115; 1 - pbinom(2, 20, 0.05) = 0.075483673788496;
    // 1 - pbinom(4, 20, 0.05) = 0.0025739403346523 (METHODS.md §7.1: 0.92452, 0.0755, 0.0026).
    expect(r.first.binomial[0].probability).toBeCloseTo(0.9245163262115, 12);
    expect(r.first.binomial[1].probability).toBeCloseTo(0.075483673788496, 12);
    expect(r.first.binomial[2].probability).toBeCloseTo(0.0025739403346523, 12);
    // R: (1 - pbinom(2, 20, 0.05))^2 = 0.0056977850086081 (METHODS.md §7.1: 0.0057).
    expect(r.second?.binomial.at(-1)?.probability).toBeCloseTo(0.0056977850086081, 12);
    expect(r.first.notes).toEqual([]);
  });

  it("formats probabilities with three significant digits", () => {
    expect(formatProbability(0.075483673788496)).toBe("0.0755");
    expect(formatProbability(0.9245163262115)).toBe("0.925");
    expect(formatProbability(0.0025739403346523)).toBe("0.00257");
    expect(formatProbability(0.00001234)).toBe("0.0000123");
    expect(formatProbability(1.234e-7)).toBe("1.23 × 10^-7");
  });
});

describe("parseValuesText", () => {
  it("reads values separated by lines, spaces, tabs, semicolons and commas", () => {
    expect(parseValuesText("4.1\n3.9, 4.6;5\t-0.5 \n\n")).toEqual({ values: [4.1, 3.9, 4.6, 5, -0.5], problems: [] });
  });
  it("names what is not a number", () => {
    expect(parseValuesText("4.1 abc <3").problems).toEqual(['value "abc" is not a number', 'value "<3" is not a number']);
  });
});
