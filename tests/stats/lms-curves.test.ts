import { describe, expect, it } from "vitest";
import { estimateLmsCurves } from "@/lib/stats/lms-curves";
import { lmsCentile } from "@/lib/stats/lms-z";
import { createRandom } from "@/lib/stats/random";
import { StatsInputError } from "@/lib/stats/validate";
import { lmsDonors } from "@/tests/support/lms-fixtures";

describe("estimateLmsCurves", () => {
  const { ages, values } = lmsDonors(20261104);

  it("gives the issue's document: centiles, L, M, S at each requested age, edf and warnings", () => {
    const { document: doc, fit, diagnostics } = estimateLmsCurves(ages, values, { at: [1, 5, 5, 12.25] });
    expect(Object.keys(doc)).toEqual(["n", "at", "lower", "median", "upper", "L", "M", "S", "edf", "warnings"]);
    expect(doc.n).toBe(3000);
    expect(doc.at).toEqual([1, 5, 5, 12.25]);
    for (const key of ["lower", "median", "upper", "L", "M", "S"] as const) expect(doc[key]).toHaveLength(4);
    expect(doc.median).toEqual(doc.M);
    doc.at.forEach((_, i) => {
      const p = { L: doc.L[i], M: doc.M[i], S: doc.S[i] };
      // The limits are the 2.5th and 97.5th centiles of METHODS.md §9 at the age's L, M, S.
      expect(doc.lower[i]).toBeCloseTo(lmsCentile(p, 2.5) as number, 9);
      expect(doc.upper[i]).toBeCloseTo(lmsCentile(p, 97.5) as number, 9);
      expect(doc.lower[i] as number).toBeLessThan(doc.median[i]);
      expect(doc.median[i]).toBeLessThan(doc.upper[i] as number);
    });
    expect(doc.edf).toEqual(fit.edf);
    expect(diagnostics.z).toHaveLength(3000);
    // Ages are uniform from birth: the first √age band (to 0.13 years) holds about 21 donors.
    expect(doc.warnings.every((w) => /hold only \d+ donors/.test(w))).toBe(true);
  }, 60_000);

  it("holds the curves to one degree of freedom per 10 donors, and says so", () => {
    // 80 donors, values uniform on [50, 70] from the seeded generator: left alone, GAIC(3) lets
    // the S curve follow single donors (about 18 edf on 50 donors in a trial run).
    const rng = createRandom(3);
    const a = Array.from({ length: 80 }, () => 18 * rng.nextFloat());
    const v = a.map(() => 50 + 20 * rng.nextFloat());
    const { document: doc, fit } = estimateLmsCurves(a, v, { at: [9] });
    expect(fit.edfBudget).toEqual({ limit: 8, binding: true });
    expect(doc.edf.L + doc.edf.M + doc.edf.S).toBeLessThanOrEqual(8);
    expect(doc.warnings).toContain(
      "with 80 donors the curves were held to 8 effective degrees of freedom in all (Bellwether allows one per 10 donors); the criterion wanted more, so more donors would give more detailed curves",
    );
  }, 60_000);

  it("refuses ages outside the donors' range and an empty list of ages", () => {
    expect(() => estimateLmsCurves(ages, values, { at: [] })).toThrow(
      new StatsInputError("give at least one age at which to read the curves"),
    );
    const oldest = Math.max(...ages);
    const youngest = Math.min(...ages);
    expect(() => estimateLmsCurves(ages, values, { at: [5, 19] })).toThrow(
      new StatsInputError(`age 19 is outside the donors' ages, ${youngest} to ${oldest} years; the curves are not extrapolated`),
    );
  }, 60_000);
});
