/**
 * Diagnostics of fitted LMS curves against the donors they were fitted to: every donor's z,
 * and by age group the share of donors beyond the 2.5th and 97.5th centiles, the mean and SD of
 * z, and the Q-Q points of z (with the worm: z minus its normal score, the shape of a worm
 * plot); warnings where the fit looks poor or an age range holds few donors.
 */
import binomial from "@stdlib/stats-base-dists-binomial";
import chisquare from "@stdlib/stats-base-dists-chisquare";
import normal from "@stdlib/stats-base-dists-normal";
import { lmsAt, type LmsModel } from "./lms-model";
import { lmsZ } from "./lms-z";
import { assertFiniteSample, StatsInputError } from "./validate";

/** Φ⁻¹(0.975), from @stdlib: z beyond ±this lies outside the 2.5th–97.5th centiles. */
const Z975 = normal.quantile(0.975, 0, 1);

export interface LmsQqPoint {
  /** Normal score Φ⁻¹((rank − 3/8)/(n + 1/4)) (Blom). */
  theoretical: number;
  z: number;
  /** z − theoretical: the worm plot's vertical axis. */
  worm: number;
}

export interface LmsAgeGroup {
  ageFrom: number;
  ageTo: number;
  n: number;
  /** Share of the group's donors below the 2.5th centile curve (expected 0.025). */
  below: number;
  /** Share above the 97.5th centile curve (expected 0.025). */
  above: number;
  meanZ: number;
  sdZ: number;
  /** At most QQ_POINTS points, evenly spread over the ranks, both ends kept. */
  qq: LmsQqPoint[];
}

export interface LmsDiagnostics {
  /** z of each donor, in the order given. */
  z: number[];
  groups: LmsAgeGroup[];
  warnings: string[];
}

export interface LmsDiagnosticsOptions {
  /** Age groups of equal count (default: one per 250 donors, from 2 to 10). */
  groups?: number;
}

/** Bands equal in √age in which the donors are counted for the sparse-range warning. */
export const LMS_COVERAGE_BANDS = 12;
/** Fewer donors than this in a band draws the sparse-range warning. */
export const LMS_SPARSE_BAND = 30;
/** Family-wise level of the group tests (Bonferroni over 4 tests per group). */
const FAMILY_ALPHA = 0.05;
const QQ_POINTS = 40;

function fmtAge(a: number): string {
  return String(Math.round(a * 100) / 100);
}

function pct(x: number): string {
  return `${(Math.round(x * 1000) / 10).toFixed(1)}%`;
}

/** Two-sided binomial p-value of k successes in n at probability p (doubling the smaller tail). */
function binomialTwoSided(k: number, n: number, p: number): number {
  const lower = binomial.cdf(k, n, p);
  const upper = k === 0 ? 1 : 1 - binomial.cdf(k - 1, n, p);
  return Math.min(1, 2 * Math.min(lower, upper));
}

/**
 * LMS fit diagnostics: z of every donor against the curves, and by age group (equal counts,
 * in age order) the fractions beyond the 2.5th/97.5th centiles, mean and SD of z and a Q-Q
 * of z with the worm (van Buuren & Fredriks' worm plot shape). Warnings, with Bonferroni over
 * all group tests at a family-wise 5%: a tail fraction that differs from 2.5% (binomial test),
 * a mean z that differs from 0 (normal test), an SD of z that differs from 1 (χ² test); and any
 * of 12 bands equal in √age holding fewer than 30 donors.
 * @see Cole TJ, Green PJ. Stat Med 1992;11:1305–1319; van Buuren S, Fredriks M. Worm plot: a
 *   simple diagnostic device for modelling growth reference curves. Stat Med 2001;20:1259–1277.
 * Complexity O(n log n) (the sort within groups).
 * Throws StatsInputError when ages and values differ in length, are empty or not finite, a
 *   value is not positive, or an age lies outside the model's range.
 * @example lmsDiagnostics(fit.model, ages, values).groups[0].below // 0.024…
 */
export function lmsDiagnostics(
  model: LmsModel,
  ages: readonly number[],
  values: readonly number[],
  options: LmsDiagnosticsOptions = {},
): LmsDiagnostics {
  assertFiniteSample(ages, "ages");
  assertFiniteSample(values, "values");
  if (ages.length !== values.length) {
    throw new StatsInputError(`ages and values differ in length (${ages.length} and ${values.length})`);
  }
  const n = ages.length;
  const z = ages.map((a, i) => lmsZ(lmsAt(model, a), values[i]));
  const groupCount = Math.max(1, Math.min(n, options.groups ?? Math.max(2, Math.min(10, Math.round(n / 250)))));
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => ages[a] - ages[b] || a - b);
  const groups: LmsAgeGroup[] = [];
  const warnings: string[] = [];
  const alpha = FAMILY_ALPHA / (4 * groupCount);
  for (let g = 0; g < groupCount; g++) {
    const from = Math.floor((g * n) / groupCount);
    const to = Math.floor(((g + 1) * n) / groupCount);
    const members = order.slice(from, to);
    const m = members.length;
    if (m === 0) continue;
    const zs = members.map((i) => z[i]).sort((a, b) => a - b);
    let below = 0;
    let above = 0;
    let sum = 0;
    for (const v of zs) {
      if (v < -Z975) below++;
      if (v > Z975) above++;
      sum += v;
    }
    const meanZ = sum / m;
    let ss = 0;
    for (const v of zs) ss += (v - meanZ) * (v - meanZ);
    const sdZ = m > 1 ? Math.sqrt(ss / (m - 1)) : 0;
    const qq: LmsQqPoint[] = [];
    const points = Math.min(m, QQ_POINTS);
    let last = -1;
    for (let q = 0; q < points; q++) {
      const r = points === 1 ? 0 : Math.round((q * (m - 1)) / (points - 1));
      if (r === last) continue;
      last = r;
      const theoretical = normal.quantile((r + 1 - 0.375) / (m + 0.25), 0, 1);
      qq.push({ theoretical, z: zs[r], worm: zs[r] - theoretical });
    }
    const group: LmsAgeGroup = {
      ageFrom: ages[members[0]],
      ageTo: ages[members[m - 1]],
      n: m,
      below: below / m,
      above: above / m,
      meanZ,
      sdZ,
      qq,
    };
    groups.push(group);
    const where = `ages ${fmtAge(group.ageFrom)}–${fmtAge(group.ageTo)} years (${m} donors)`;
    if (binomialTwoSided(below, m, 0.025) < alpha) {
      warnings.push(`${where}: ${pct(group.below)} lie below the 2.5th centile curve, not about 2.5%; the curves fit this age range poorly`);
    }
    if (binomialTwoSided(above, m, 0.025) < alpha) {
      warnings.push(`${where}: ${pct(group.above)} lie above the 97.5th centile curve, not about 2.5%; the curves fit this age range poorly`);
    }
    if (m > 1 && 2 * (1 - normal.cdf(Math.abs(meanZ) * Math.sqrt(m), 0, 1)) < alpha) {
      warnings.push(`${where}: the mean z is ${meanZ.toFixed(2)}, not about 0; the median curve misses this age range`);
    }
    if (m > 2) {
      const stat = (m - 1) * sdZ * sdZ;
      const c = chisquare.cdf(stat, m - 1);
      if (2 * Math.min(c, 1 - c) < alpha) {
        warnings.push(`${where}: the SD of z is ${sdZ.toFixed(2)}, not about 1; the spread of the curves misses this age range`);
      }
    }
  }
  const t0 = Math.sqrt(model.ageMin);
  const t1 = Math.sqrt(model.ageMax);
  const counts = new Array<number>(LMS_COVERAGE_BANDS).fill(0);
  for (const a of ages) {
    const b = Math.min(LMS_COVERAGE_BANDS - 1, Math.floor(((Math.sqrt(a) - t0) / (t1 - t0)) * LMS_COVERAGE_BANDS));
    counts[b]++;
  }
  counts.forEach((count, b) => {
    if (count < LMS_SPARSE_BAND) {
      const from = (t0 + ((t1 - t0) * b) / LMS_COVERAGE_BANDS) ** 2;
      const to = (t0 + ((t1 - t0) * (b + 1)) / LMS_COVERAGE_BANDS) ** 2;
      warnings.push(
        `ages ${fmtAge(from)}–${fmtAge(to)} years hold only ${count} donor${count === 1 ? "" : "s"} (fewer than ${LMS_SPARSE_BAND}); the curves there rest on few results`,
      );
    }
  });
  return { z, groups, warnings };
}
