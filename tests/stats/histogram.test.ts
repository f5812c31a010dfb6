import { describe, expect, it } from "vitest";
import { histogram } from "@/lib/stats/histogram";
import { StatsInputError } from "@/lib/stats/validate";

const WEIGHTS = [148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236];

describe("histogram", () => {
  it("bins by Freedman-Diaconis as R's nclass.FD does", () => {
    const h = histogram(WEIGHTS);
    // R: nclass.FD(x) = 6 (IQR 17, h = 2·17·11^(-1/3) = 15.28, range 88 → ceil(5.76) = 6).
    expect(h.rule).toBe("freedman-diaconis");
    expect(h.bins).toHaveLength(6);
    expect(h.binWidth).toBeCloseTo(88 / 6, 12);
    // R: table(cut(x, seq(148, 236, length.out = 7), right = FALSE, include.lowest = TRUE))
    expect(h.bins.map((b) => b.count)).toEqual([6, 2, 1, 1, 0, 1]);
    expect(h.bins[0].lower).toBe(148);
    expect(h.bins[5].upper).toBe(236);
  });

  it("gives expected counts under the fitted normal", () => {
    const h = histogram(WEIGHTS);
    // R: 11 * diff(pnorm(seq(148, 236, length.out = 7), mean(x), sd(x))); 1e-9 for Φ differences.
    const expected = [2.047318782285, 2.534883542531, 2.24360269383, 1.419486598847, 0.641870798772, 0.207388001879];
    h.bins.forEach((b, i) => expect(b.expected).toBeCloseTo(expected[i], 9));
    expect(h.fit).toEqual({ transform: "none", lambda: null, mean: expect.any(Number), sd: expect.any(Number) });
  });

  it("fits the normal on the ln scale and draws its density on the raw scale", () => {
    const h = histogram(WEIGHTS, { transform: "ln" });
    // R: lx <- log(x); 11 * diff(pnorm(log(e), mean(lx), sd(lx)))
    const expected = [2.402853609126, 2.813733696089, 2.187790936726, 1.232025497341, 0.537010802493, 0.190734563438];
    h.bins.forEach((b, i) => expect(b.expected).toBeCloseTo(expected[i], 9));
    // Density scaled to counts at x = 170, with the Jacobian 1/x:
    // R: 11 * (88/6) * dnorm(log(170), mean(lx), sd(lx)) / 170 = 2.86253648732
    const at170 = histogram(WEIGHTS, { transform: "ln", curveAt: [170] }).curve[0];
    expect(at170.x).toBe(170);
    expect(at170.y).toBeCloseTo(2.86253648732, 9);
    // Raw scale, R: 11 * (88/6) * dnorm(170, mean(x), sd(x)) = 2.57119204079
    expect(histogram(WEIGHTS, { curveAt: [170] }).curve[0].y).toBeCloseTo(2.57119204079, 9);
  });

  it("Box-Cox with lambda 0 is the ln fit, and lambda 1 the raw fit shifted by 1", () => {
    // Box & Cox 1964: g(x) = (x^λ − 1)/λ, λ = 0 meaning ln; λ = 1 is x − 1, so the expected
    // counts are the R values of the ln and raw fits above. 1e-9 for Φ differences.
    const lnExpected = [2.402853609126, 2.813733696089, 2.187790936726, 1.232025497341, 0.537010802493, 0.190734563438];
    const rawExpected = [2.047318782285, 2.534883542531, 2.24360269383, 1.419486598847, 0.641870798772, 0.207388001879];
    const bc0 = histogram(WEIGHTS, { transform: "box-cox", lambda: 0 });
    bc0.bins.forEach((b, i) => expect(b.expected).toBeCloseTo(lnExpected[i], 9));
    const bc1 = histogram(WEIGHTS, { transform: "box-cox", lambda: 1 });
    bc1.bins.forEach((b, i) => expect(b.expected).toBeCloseTo(rawExpected[i], 9));
    // R: mean(x) - 1 = 171 on the Box-Cox scale with λ = 1.
    expect(bc1.fit.mean).toBeCloseTo(171, 10);
  });

  it("falls back to Sturges when the IQR is zero, and caps the number of bins", () => {
    const x = [1, 5, 5, 5, 5, 5, 5, 5, 9];
    const h = histogram(x);
    // Sturges: ceil(log2 9) + 1 = 5 (R: nclass.Sturges(x) = 5).
    expect(h.rule).toBe("sturges");
    expect(h.bins).toHaveLength(5);
    const wide = Array.from({ length: 2000 }, (_, i) => (i === 0 ? 1e6 : i));
    expect(histogram(wide, { maxBins: 40 }).bins).toHaveLength(40);
  });

  it("counts every value exactly once, edges going to the upper bin", () => {
    const x = Array.from({ length: 997 }, (_, i) => Math.round(Math.sin(i) * 1000) / 10);
    const h = histogram(x);
    expect(h.bins.reduce((s, b) => s + b.count, 0)).toBe(997);
    // 0..12: IQR 6, FD width 2·6·13^(-1/3) = 5.13 → 3 bins of width 4: [0,4) [4,8) [8,12].
    const edge = histogram([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    expect(edge.bins.map((b) => b.count)).toEqual([4, 4, 5]);
  });

  it("rejects bad input", () => {
    expect(() => histogram([1])).toThrow("values needs at least 2 values (got 1)");
    expect(() => histogram([2, 2, 2])).toThrow("all values are equal");
    expect(() => histogram([1, -2, 3], { transform: "ln" })).toThrow(
      "values[1] = -2 is not positive; a log or Box-Cox transform needs values > 0",
    );
    expect(() => histogram([1, 2, 3], { transform: "box-cox" })).toThrow(
      "a Box-Cox histogram needs lambda",
    );
    expect(() => histogram([1, 2, 3], { maxBins: 0 })).toThrow(StatsInputError);
  });
});
