/**
 * The LMS accuracy fixtures (scripts/fixtures/lms-curves.R) and the two simpler methods the
 * issue compares the LMS fit with: a binned fit (Box-Cox per one-year age bin, curves smoothed
 * across bins) and age-banded nonparametric limits. Both are common practice, no source.
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import { boxCoxFit, boxCoxTransform } from "@/lib/stats/box-cox";
import { lmsValueAtZ, type LmsParameters } from "@/lib/stats/lms-z";
import { quantileType6 } from "@/lib/stats/quantile";

const DIR = path.resolve(__dirname, "../fixtures/lms");

export interface LmsTruth {
  source: string;
  n: number;
  seeds: number[];
  ages: number[];
  L: number[];
  M: number[];
  S: number[];
  lower: number[];
  median: number[];
  upper: number[];
}

export function lmsTruth(): LmsTruth {
  return JSON.parse(readFileSync(path.join(DIR, "lms-truth.json"), "utf8")) as LmsTruth;
}

export function lmsFixturePath(seed: number): string {
  return path.join(DIR, `lms-seed-${seed}.csv`);
}

export function lmsDonors(seed: number): { ages: number[]; values: number[] } {
  const rows = readFileSync(lmsFixturePath(seed), "utf8").trim().split("\n").slice(1);
  return {
    ages: rows.map((r) => Number(r.split(",")[0])),
    values: rows.map((r) => Number(r.split(",")[1])),
  };
}

/** Φ⁻¹(0.975) (R: qnorm(0.975)). */
export const Z975 = 1.959963984540054;

/** Limits at one age. */
export interface Limits {
  lower: number;
  upper: number;
}

/**
 * Binned LMS: one Box-Cox fit per one-year bin (λ by maximum likelihood, then the mean μ and
 * SD σ of the transformed values give L = λ, M = (1 + λμ)^(1/λ), S = σ/(1 + λμ)), L, ln M and
 * ln S smoothed across bins with weights 1-2-1 (2-1 at the ends), linear between bin middles.
 */
export function binnedFit(ages: readonly number[], values: readonly number[]): (age: number) => Limits {
  const bins = 18;
  const mids: number[] = [];
  const raw: LmsParameters[] = [];
  for (let b = 0; b < bins; b++) {
    const x = values.filter((_, i) => ages[i] >= b && (ages[i] < b + 1 || (b === bins - 1 && ages[i] <= bins)));
    const lambda = boxCoxFit(x).lambda;
    const y = boxCoxTransform(x, lambda);
    const mu = y.reduce((s, v) => s + v, 0) / y.length;
    const sd = Math.sqrt(y.reduce((s, v) => s + (v - mu) ** 2, 0) / (y.length - 1));
    const base = 1 + lambda * mu;
    mids.push(b + 0.5);
    raw.push({ L: lambda, M: Math.exp(Math.log(base) / lambda), S: sd / base });
  }
  const smooth = (f: (p: LmsParameters) => number) =>
    raw.map((_, b) => {
      const here = f(raw[b]);
      if (b === 0) return (2 * here + f(raw[1])) / 3;
      if (b === bins - 1) return (2 * here + f(raw[b - 1])) / 3;
      return (f(raw[b - 1]) + 2 * here + f(raw[b + 1])) / 4;
    });
  const Ls = smooth((p) => p.L);
  const logMs = smooth((p) => Math.log(p.M));
  const logSs = smooth((p) => Math.log(p.S));
  return (age: number) => {
    const t = Math.min(bins - 1, Math.max(0, age - 0.5));
    const b = Math.min(bins - 2, Math.floor(t));
    const u = t - b;
    const lerp = (v: number[]) => v[b] * (1 - u) + v[b + 1] * u;
    const p = { L: lerp(Ls), M: Math.exp(lerp(logMs)), S: Math.exp(lerp(logSs)) };
    return { lower: lmsValueAtZ(p, -Z975) ?? Number.NaN, upper: lmsValueAtZ(p, Z975) ?? Number.NaN };
  };
}

/** Age bands of a typical paediatric alkaline phosphatase table, in years. */
export const AGE_BANDS: readonly [number, number][] = [
  [0, 1],
  [1, 3],
  [3, 6],
  [6, 9],
  [9, 12],
  [12, 14],
  [14, 16],
  [16, 18],
];

/** Nonparametric 2.5th and 97.5th percentiles (type 6) of the donors in the age's band. */
export function bandedNonparametric(ages: readonly number[], values: readonly number[]): (age: number) => Limits {
  const limits = AGE_BANDS.map(([from, to], b) => {
    const last = b === AGE_BANDS.length - 1;
    const x = values.filter((_, i) => ages[i] >= from && (ages[i] < to || (last && ages[i] <= to))).sort((a, c) => a - c);
    return { lower: quantileType6(x, 0.025) ?? Number.NaN, upper: quantileType6(x, 0.975) ?? Number.NaN };
  });
  return (age: number) => {
    const b = AGE_BANDS.findIndex(([from, to], i) => age >= from && (age < to || i === AGE_BANDS.length - 1));
    return limits[b];
  };
}

/** |fitted − true| of each limit as a fraction of the true 95% width at that age. */
export function errorFractions(fitted: Limits, truth: LmsTruth, i: number): Limits {
  const width = truth.upper[i] - truth.lower[i];
  return {
    lower: Math.abs(fitted.lower - truth.lower[i]) / width,
    upper: Math.abs(fitted.upper - truth.upper[i]) / width,
  };
}
