import { describe, expect, it } from "vitest";
import {
  fromScale,
  parametricCiFactors,
  parametricFromScale,
  parametricLimits,
  toScale,
  Z_975,
} from "@/lib/stats/parametric";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";

const SKEWED = [2.1, 2.9, 3.2, 3.8, 4.4, 5.0, 5.9, 7.3, 9.6, 14.2];

describe("parametricLimits on the METHODS.md §2.2 data", () => {
  // Check values printed to 4 decimals in METHODS.md; 5e-5 is half a unit of the last digit.
  it("raw Gaussian: -1.3970 to 13.0770 (an impossible negative limit)", () => {
    // computed with R (METHODS.md §2.2)
    const r = parametricLimits(SKEWED);
    expect(r.lower!).toBeCloseTo(-1.397, 4);
    expect(r.upper!).toBeCloseTo(13.077, 4);
    expect(r.transform).toBe("none");
    expect(r.lambda).toBeNull();
  });

  it("log: 1.6015 to 15.5459", () => {
    // computed with R (METHODS.md §2.2)
    const r = parametricLimits(SKEWED, { transform: "ln" });
    expect(r.lower!).toBeCloseTo(1.6015, 4);
    expect(r.upper!).toBeCloseTo(15.5459, 4);
  });

  it("Box-Cox with λ̂ = -0.30300: 1.8388 to 18.3289; a value of 12 has z = 1.4270", () => {
    // computed with R (METHODS.md §2.2)
    const r = parametricLimits(SKEWED, { transform: "box-cox" });
    expect(r.lambda!).toBeCloseTo(-0.303, 4);
    expect(r.lower!).toBeCloseTo(1.8388, 4);
    // METHODS.md prints 18.3289, which R reproduces only with λ rounded to -0.303
    // (18.328922); with the unrounded λ̂ = -0.303014703 R gives 18.329124. The far upper tail
    // of a λ < 0 transform amplifies the 1.5e-5 difference in λ, hence 3e-4 here.
    expect(Math.abs(r.upper! - 18.3289)).toBeLessThan(3e-4);
    expect(r.upper!).toBeCloseTo(18.329124, 5); // R with λ̂ = -0.303014703304
    expect((toScale(12, "box-cox", r.lambda) - r.mean) / r.sd).toBeCloseTo(1.427, 3);
    // Exact 90% CIs (METHODS.md §2.3), R with λ = -0.303014703304, y the Box-Cox values:
    // k <- qt(c(.05, .95), 9, qnorm(.975)*sqrt(10))/sqrt(10) (1.27283901436, 3.40245257475);
    // inv(mean(y) - k[2]*sd(y)), inv(mean(y) - k[1]*sd(y)) = 1.05114997893, 2.49167987068;
    // inv(mean(y) + k[1]*sd(y)), inv(mean(y) + k[2]*sd(y)) = 10.7178982316, 84.4920981093.
    // 1e-6 relative: λ̂ differs from R's by < 1e-7, which the far tail of λ < 0 amplifies.
    const rel = (a: number, b: number) => Math.abs(a / b - 1);
    expect(rel(r.lowerCi![0], 1.05114997893)).toBeLessThan(1e-6);
    expect(rel(r.lowerCi![1], 2.49167987068)).toBeLessThan(1e-6);
    expect(rel(r.upperCi![0], 10.7178982316)).toBeLessThan(1e-6);
    expect(rel(r.upperCi![1], 84.4920981093)).toBeLessThan(1e-5);
  });

  it("ln and raw scales: exact 90% CIs", () => {
    // R, k as above: exp(mean(log(x)) -/+ k*sd(log(x))) and mean(x) -/+ k*sd(x).
    const ln = parametricLimits(SKEWED, { transform: "ln" });
    expect(ln.lowerCi![0]).toBeCloseTo(0.693886205582, 9);
    expect(ln.lowerCi![1]).toBeCloseTo(2.385355463245, 9);
    expect(ln.upperCi![0]).toBeCloseTo(10.437307848941, 9);
    expect(ln.upperCi![1]).toBeCloseTo(35.88007529008, 9);
    const raw = parametricLimits(SKEWED);
    expect(raw.lowerCi![0]).toBeCloseTo(-6.72319746568, 9);
    expect(raw.lowerCi![1]).toBeCloseTo(1.14017611468, 9);
    expect(raw.upperCi![0]).toBeCloseTo(10.53982388532, 9);
    expect(raw.upperCi![1]).toBeCloseTo(18.40319746568, 9);
  });
});

describe("parametricLimits against the R fixtures (scripts/fixtures/reference-limits.R)", () => {
  // 1e-6 relative: R and this code run the same formulas; λ̂ differs by < 1e-7, and the CI
  // factors (R's qt, or its integral for n = 1000) agree to 1e-9.
  const close = (a: number | null, b: number | null, label: string) => {
    expect(a, label).not.toBeNull();
    expect(Math.abs(a! / b! - 1), `${label}: ${a} vs ${b}`).toBeLessThan(1e-6);
  };
  for (const s of fixture.sets) {
    it(`${s.name}`, () => {
      const scales = [
        ["none", s.raw],
        ["ln", s.ln],
        ["box-cox", s.boxCox],
      ] as const;
      for (const [t, ref] of scales) {
        const r = parametricLimits(s.values, { transform: t });
        close(r.mean, ref.mean, `${t} mean`);
        close(r.sd, ref.sd, `${t} sd`);
        close(r.lower, ref.lower, `${t} lower`);
        close(r.upper, ref.upper, `${t} upper`);
        close(r.lowerCi![0], ref.lowerCi[0], `${t} lowerCi[0]`);
        close(r.lowerCi![1], ref.lowerCi[1], `${t} lowerCi[1]`);
        close(r.upperCi![0], ref.upperCi[0], `${t} upperCi[0]`);
        close(r.upperCi![1], ref.upperCi[1], `${t} upperCi[1]`);
      }
    });
  }
});

describe("exact 90% CIs in units of s (METHODS.md §2.3)", () => {
  /** n values with mean exactly 0 and SD (n − 1) exactly 1, up to rounding. */
  const standard = (n: number) => {
    const x = Array.from({ length: n }, (_, i) => i - (n - 1) / 2);
    const sd = Math.sqrt(x.reduce((a, v) => a + v * v, 0) / (n - 1));
    return x.map((v) => v / sd);
  };
  // METHODS.md §2.3, table "exact 90% CI of k" (COMPUTED with R's qt, z = 1.959964), printed
  // to 4 decimals; this code uses z = Φ⁻¹(0.975) = 1.95996398…, 4e-7 away: 6e-5 covers half a
  // unit of the last digit and that.
  const table: [number, number, number][] = [
    [20, 1.4426, 2.8095],
    [40, 1.5754, 2.501],
    [120, 1.7251, 2.2451],
    [240, 1.7898, 2.155],
  ];
  it.each(table)("n = %s: upper limit CI %s – %s s, the lower one its mirror", (n, lo, hi) => {
    const r = parametricFromScale(standard(n), "none", null);
    expect(Math.abs(r.upperCi![0] - lo)).toBeLessThan(6e-5);
    expect(Math.abs(r.upperCi![1] - hi)).toBeLessThan(6e-5);
    expect(Math.abs(r.lowerCi![0] + hi)).toBeLessThan(6e-5);
    expect(Math.abs(r.lowerCi![1] + lo)).toBeLessThan(6e-5);
  });

  it("is asymmetric about the limit, wider on the far side", () => {
    // METHODS.md §2.3: at n = 20 the upper limit 1.96 has 1.4426 – 2.8095, 0.52 below and
    // 0.85 above, where the old symmetric L ± 1.645·SE gave 1.3206 – 2.5993.
    const r = parametricFromScale(standard(20), "none", null);
    expect(r.upperCi![1] - r.upper!).toBeGreaterThan(r.upper! - r.upperCi![0] + 0.3);
  });

  it("uses z(0.975) from @stdlib", () => {
    // R: qnorm(.975) = 1.95996398454005
    expect(Z_975).toBeCloseTo(1.95996398454005, 12);
  });
});

describe("undefined back-transformation", () => {
  it("gives null instead of a number when 1 + λy ≤ 0", () => {
    // With λ = -2 every Box-Cox value is below 1/2; R: mean(y) + qnorm(.975)*sd(y) = 0.621,
    // so 1 + λ·upper < 0, while the lower limit 0.0257 maps back. The upper limit's exact CI
    // (R: k <- qt(c(.05, .95), 5, qnorm(.975)*sqrt(6))/sqrt(6)) has 1 + λ·(mean + k·sd) =
    // 0.0129 and -0.962: one end maps back, the other does not, and the CI is null. The lower
    // limit's CI maps back to 0.774210594201 – 1.200565892962.
    const y = [0.1, 0.2, 0.3, 0.4, 0.45, 0.49];
    const r = parametricFromScale(y, "box-cox", -2);
    expect(r.upper).toBeNull();
    expect(r.upperCi).toBeNull();
    expect(r.lower).not.toBeNull();
    expect(r.lowerCi![0]).toBeCloseTo(0.774210594201, 9);
    expect(r.lowerCi![1]).toBeCloseTo(1.200565892962, 9);
    expect(fromScale(1, "box-cox", -2)).toBeNull();
  });

  it("rejects input it cannot use", () => {
    expect(() => parametricLimits([1, 2])).toThrow(/at least 3/);
    expect(() => parametricLimits([1, 2, -3], { transform: "ln" })).toThrow(/not positive/);
    expect(() => parametricLimits([0, 2, 3], { transform: "box-cox" })).toThrow(StatsInputError);
    expect(() => parametricLimits([2, 2, 2])).toThrow(/spread/);
    expect(() => parametricLimits([1, 2, 3], { transform: "sqrt" as never })).toThrow(/unknown/);
    expect(() => parametricCiFactors(1)).toThrow(/n must be an integer ≥ 2 \(got 1\)/);
  });
});
