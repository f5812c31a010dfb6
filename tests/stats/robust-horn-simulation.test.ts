import { beforeAll, describe, expect, it } from "vitest";
import chisquare from "@stdlib/stats-base-dists-chisquare";
import normal from "@stdlib/stats-base-dists-normal";
import { boxCoxInverse, boxCoxLambda, boxCoxTransform } from "@/lib/stats/box-cox";
import { quantileType6 } from "@/lib/stats/quantile";
import { createRandom } from "@/lib/stats/random";
import { robustPointLimits } from "@/lib/stats/robust-horn";

// Horn, Pesce & Copeland (Clin Chem 1998;44:622–631), abstract: four procedures (nonparametric,
// transformed, robust with a nonparametric lower limit, transformed robust) were compared by
// simulation for n = 20 … 120 from χ² distributions with 1, 4, 7 and 10 df, by the RMSE of the
// limits; "the robust estimator showed the best performance for small sample sizes. As the
// sample size increased, the performance values converged."
//
// Scale: as the authors' "transformed" and "transformed robust" procedures, both the parametric
// and the robust method run on Box-Cox-transformed data (λ by maximum likelihood on each sample,
// as Bellwether's estimate does) and their limits are carried back; the nonparametric limits are
// type-6 quantiles of the raw values. Errors are measured in the data's unit against the true
// 2.5th and 97.5th percentiles, @stdlib's chisquare.quantile. Point estimates only.
//
// Data: χ²(k) as the sum of k squared standard normals (its definition), each Φ⁻¹(u) of a uniform
// u from Bellwether's seeded generator. 1000 samples per cell, one seed; the same samples serve
// every method, so the ratios compare methods on identical data.
//
// Where a Box-Cox limit cannot be carried back (1 + λy ≤ 0, which for the lower limit means
// λ > 0 and a limit at or below 0), the lower limit is taken as 0, the bottom of χ²'s support;
// an undefined upper limit is left out of that method's RMSE.
//
// Measured with this test's seed (1998), RMSE of the lower / upper limit:
//   χ²  n   parametric        robust            nonparametric
//    1  20  0.0122 / 2.899    0.0079 / 6.878    –
//    1  40  0.0043 / 1.793    0.0030 / 2.969    0.0034 / 2.364
//    1  80  0.0020 / 1.374    0.0014 / 2.128    0.0020 / 1.459
//    4  20  0.360  / 2.971    0.333  / 5.304    –
//    4  40  0.222  / 2.022    0.216  / 2.768    0.240  / 3.300
//    4  80  0.147  / 1.340    0.147  / 1.692    0.175  / 1.917
//    7  20  0.714  / 3.273    0.789  / 5.981    –
//    7  40  0.490  / 2.342    0.511  / 3.176    0.597  / 3.767
//    7  80  0.326  / 1.503    0.340  / 1.775    0.430  / 2.168
//   10  20  1.028  / 3.863    1.211  / 6.498    –
//   10  40  0.694  / 2.456    0.758  / 3.166    0.913  / 3.996
//   10  80  0.479  / 1.674    0.509  / 1.967    0.619  / 2.411
//
// Margins: the same simulation with ten other seeds (1017, 2017, …, 10017) gave the ranges
// quoted beside each assertion; each bound sits outside the range it guards.

const DFS = [1, 4, 7, 10] as const;
const SIZES = [20, 40, 80] as const;
const SAMPLES = 1000;
const Z_975 = normal.quantile(0.975, 0, 1);

interface Cell {
  parametric: { lower: number; upper: number };
  robust: { lower: number; upper: number };
  nonparametric: { lower: number; upper: number } | null;
}

function simulate(seed: number): Map<string, Cell> {
  const random = createRandom(seed);
  const phiInverse = normal.quantile.factory(0, 1);
  const draw = (df: number) => {
    let s = 0;
    for (let k = 0; k < df; k++) {
      const z = phiInverse((random.nextUint32() + 0.5) / 0x100000000);
      s += z * z;
    }
    return s;
  };
  const cells = new Map<string, Cell>();
  for (const df of DFS) {
    const truth = { lower: chisquare.quantile(0.025, df), upper: chisquare.quantile(0.975, df) };
    for (const n of SIZES) {
      const sums: Record<string, { se: number; count: number }> = {};
      const add = (key: string, estimate: number | null, target: number) => {
        if (estimate === null) return;
        const s = (sums[key] ??= { se: 0, count: 0 });
        s.se += (estimate - target) ** 2;
        s.count++;
      };
      for (let r = 0; r < SAMPLES; r++) {
        const x = Array.from({ length: n }, () => draw(df));
        const lambda = boxCoxLambda(x);
        const y = boxCoxTransform(x, lambda);
        // Parametric point limits mean ± z(0.975)·SD on the Box-Cox scale (METHODS.md §2.1).
        const m = y.reduce((a, b) => a + b, 0) / n;
        const sd = Math.sqrt(y.reduce((a, b) => a + (b - m) ** 2, 0) / (n - 1));
        const back = (v: number) => (lambda !== 0 && !(1 + lambda * v > 0) ? null : boxCoxInverse(v, lambda));
        add("parametric.lower", back(m - Z_975 * sd) ?? 0, truth.lower);
        add("parametric.upper", back(m + Z_975 * sd), truth.upper);
        const robust = robustPointLimits(x, { transform: "box-cox", lambda });
        add("robust.lower", robust.lower ?? 0, truth.lower);
        add("robust.upper", robust.upper, truth.upper);
        if (n >= 40) {
          const sorted = [...x].sort((a, b) => a - b);
          add("nonparametric.lower", quantileType6(sorted, 0.025), truth.lower);
          add("nonparametric.upper", quantileType6(sorted, 0.975), truth.upper);
        }
      }
      const rmse = (key: string) => Math.sqrt(sums[key].se / sums[key].count);
      cells.set(`${df}/${n}`, {
        parametric: { lower: rmse("parametric.lower"), upper: rmse("parametric.upper") },
        robust: { lower: rmse("robust.lower"), upper: rmse("robust.upper") },
        nonparametric: n >= 40 ? { lower: rmse("nonparametric.lower"), upper: rmse("nonparametric.upper") } : null,
      });
    }
  }
  return cells;
}

describe("robust limits against the published simulation (Horn, Pesce & Copeland 1998)", () => {
  let cells: Map<string, Cell>;
  beforeAll(() => {
    cells = simulate(1998);
  });
  const cell = (df: number, n: number) => cells.get(`${df}/${n}`)!;
  const ratio = (df: number, n: number, other: "parametric" | "nonparametric", limit: "lower" | "upper") =>
    cell(df, n).robust[limit] / cell(df, n)[other]![limit];

  it("beats the nonparametric limits at n = 40 and 80 (the paper: robust best at small n)", () => {
    for (const n of [40, 80]) {
      for (const df of DFS) {
        // Measured RMSE ratio robust/nonparametric, lower limit: 0.62–0.90 over every df and
        // seed. Bound 0.95.
        expect(ratio(df, n, "nonparametric", "lower"), `lower, χ²(${df}), n = ${n}`).toBeLessThan(0.95);
      }
      for (const df of [4, 7, 10]) {
        // Upper limit: 0.78–0.92 at 4, 7 and 10 df. Bound 0.97. Not asserted at 1 df, where the
        // robust upper limit is worse (measured 1.19–1.48): χ²(1)'s tail is too long for the
        // Box-Cox scale to make symmetric at these n, and the prediction-interval width is
        // magnified on the way back.
        expect(ratio(df, n, "nonparametric", "upper"), `upper, χ²(${df}), n = ${n}`).toBeLessThan(0.97);
      }
    }
  });

  it("beats the transformed parametric lower limit of skewed data at n = 20, but not its upper limit", () => {
    // The paper: robust best at small n. Measured at n = 20, RMSE ratio robust/parametric:
    // lower limit 0.59–0.68 at 1 df and 0.94–0.97 at 4 df (bounds 0.75 and 0.99), but
    // 1.04–1.21 at 7 and 10 df; upper limit 1.6–68 (its prediction-interval width, t(0.975,
    // n − 1)·√(s² + s_T²) against z·s, is magnified by the back-transformation). On data that
    // the Box-Cox scale makes Gaussian the parametric limits are the better estimate, which is
    // why Bellwether advises them below 120 values when normality holds, and the robust ones
    // when it does not.
    expect(ratio(1, 20, "parametric", "lower")).toBeLessThan(0.75);
    expect(ratio(4, 20, "parametric", "lower")).toBeLessThan(0.99);
    for (const df of DFS) expect(ratio(df, 20, "parametric", "upper"), `χ²(${df})`).toBeGreaterThan(1);
  });

  it("comes closer to the parametric upper limit as n grows (the paper: the performance values converged)", () => {
    // Measured RMSE ratio robust/parametric for the upper limit, over every df and seed:
    // 1.59–68 at n = 20, 1.27–1.67 at n = 40, 1.18–1.57 at n = 80; within each df every n = 40
    // value is at least 0.25 below every n = 20 one and at least 0.07 above every n = 80 one.
    // Required here: a fall of at least 0.03 at each step.
    for (const df of DFS) {
      const [r20, r40, r80] = SIZES.map((n) => ratio(df, n, "parametric", "upper"));
      expect(r40, `χ²(${df}): n = 40 against 20`).toBeLessThan(r20 - 0.03);
      expect(r80, `χ²(${df}): n = 80 against 40`).toBeLessThan(r40 - 0.03);
    }
  });
});
