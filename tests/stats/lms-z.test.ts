import { describe, expect, it } from "vitest";
import { lmsCentile, lmsPercentile, lmsValueAtZ, lmsZ } from "@/lib/stats/lms-z";
import { StatsInputError } from "@/lib/stats/validate";

// CDC WTAGEINF, weight-for-age, boys, age 0 months (METHODS.md §9, READ): L, M, S and the
// published percentiles. The recomputation reproduces each to ≥ 6 significant figures
// (METHODS.md §9, COMPUTED), so the tolerance is a relative 1e-6.
const CDC = { L: 1.815151075, M: 3.530203168, S: 0.152385273 };
const PUBLISHED: [number, number][] = [
  [3, 2.355450986],
  [5, 2.52690402],
  [10, 2.773801848],
  [25, 3.150611082],
  [50, 3.530203168],
  [75, 3.879076559],
  [90, 4.17249339],
  [95, 4.34029274],
  [97, 4.446488308],
];

function expectRelative(actual: number | null, expected: number, rel: number): void {
  expect(actual).not.toBeNull();
  expect(Math.abs((actual as number) - expected) / Math.abs(expected)).toBeLessThan(rel);
}

describe("LMS z and centiles (METHODS.md §9)", () => {
  it("reproduces the CDC published percentiles from L, M and S", () => {
    for (const [centile, value] of PUBLISHED) expectRelative(lmsCentile(CDC, centile), value, 1e-6);
  });

  it("gives the CDC check z-scores and percentile", () => {
    // METHODS.md §9 (COMPUTED): X = 4.0 kg → z = 0.920302 (82.13th percentile); X = 2.5 kg → z = −1.682769.
    // More digits from R: ((4/M)^L - 1)/(L*S) = 0.92030205277789556; ((2.5/M)^L - 1)/(L*S) = -1.6827690341062083.
    expect(lmsZ(CDC, 4.0)).toBeCloseTo(0.920302, 6);
    expect(lmsZ(CDC, 4.0)).toBeCloseTo(0.92030205277789556, 12);
    expect(lmsZ(CDC, 2.5)).toBeCloseTo(-1.682769, 6);
    expect(lmsZ(CDC, 2.5)).toBeCloseTo(-1.6827690341062083, 12);
    // R: 100*pnorm(0.92030205277789556) = 82.129253167276715
    expect(lmsPercentile(CDC, 4.0)).toBeCloseTo(82.129253167276715, 9);
  });

  it("takes the L = 0 branch for |L| < 1e-6", () => {
    // z = ln(X/M)/S: R log(1.2)/0.1 = 1.8232155679395459 (the formula of METHODS.md §9)
    expect(lmsZ({ L: 5e-7, M: 10, S: 0.1 }, 12)).toBeCloseTo(1.8232155679395459, 12);
    expect(lmsZ({ L: 0, M: 10, S: 0.1 }, 12)).toBeCloseTo(1.8232155679395459, 12);
    // X = M·exp(S·z): 10·exp(0.1·1.8232155679395459) = 12
    expect(lmsValueAtZ({ L: -5e-7, M: 10, S: 0.1 }, 1.8232155679395459)).toBeCloseTo(12, 12);
  });

  it("says a centile is undefined where 1 + L·S·z ≤ 0, and does not clamp it", () => {
    // L = 2, S = 0.3: 1 + 2·0.3·z ≤ 0 for z ≤ −1/0.6 = −1.6667 (METHODS.md §9: X undefined there)
    expect(lmsValueAtZ({ L: 2, M: 100, S: 0.3 }, -1.959964)).toBeNull();
    expect(lmsValueAtZ({ L: 2, M: 100, S: 0.3 }, -1 / 0.6)).toBeNull();
    expect(lmsCentile({ L: 2, M: 100, S: 0.3 }, 2.5)).toBeNull();
    // Just inside: 100·(1 + 0.6·(−1.6))^(1/2) = 100·√0.04 = 20 (arithmetic)
    expect(lmsValueAtZ({ L: 2, M: 100, S: 0.3 }, -1.6)).toBeCloseTo(20, 10);
    // Negative L: undefined above z = −1/(L·S); L = −1, S = 0.5 → z ≥ 2
    expect(lmsValueAtZ({ L: -1, M: 100, S: 0.5 }, 2.5)).toBeNull();
  });

  it("refuses bad input with a readable message", () => {
    expect(() => lmsZ(CDC, 0)).toThrow(new StatsInputError("an LMS z needs a positive value (got 0)"));
    expect(() => lmsZ(CDC, -1)).toThrow(new StatsInputError("an LMS z needs a positive value (got -1)"));
    expect(() => lmsZ({ ...CDC, M: 0 }, 1)).toThrow(new StatsInputError("M must be positive (got 0)"));
    expect(() => lmsZ({ ...CDC, S: -0.1 }, 1)).toThrow(new StatsInputError("S must be positive (got -0.1)"));
    expect(() => lmsZ({ ...CDC, L: Number.NaN }, 1)).toThrow(new StatsInputError("L must be a finite number (got NaN)"));
    expect(() => lmsCentile(CDC, 100)).toThrow(new StatsInputError("centile must be strictly between 0 and 100 (got 100)"));
    expect(() => lmsValueAtZ(CDC, Infinity)).toThrow(new StatsInputError("z must be a finite number (got Infinity)"));
  });
});
