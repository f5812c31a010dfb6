/**
 * Fitting LMS reference curves by penalised likelihood (Cole & Green 1992).
 *
 * Each donor i has an age aᵢ and a positive value yᵢ; given curves L(a), M(a), S(a) the value's
 * z is ((y/M)^L − 1)/(L·S) (ln(y/M)/S at L = 0) and its log-likelihood, up to a constant,
 *   ℓᵢ = L·ln(yᵢ/M) − ln S − zᵢ²/2.
 * The three curves are cubic B-splines in √age (lib/stats/lms-model.ts): L itself, ln M and ln S
 * (the logarithms keep M and S positive). The square root spreads the first years of life, where
 * most analytes change fastest, over a fair share of the 24 spline intervals. For smoothing
 * parameters λ_L, λ_M, λ_S the fit maximises the penalised log-likelihood
 *   Σ ℓᵢ − ½ Σ_c λ_c ∫ f_c''(τ)² dτ
 * by Newton's method on the observed information, with step halving; where the observed
 * information does not make the system positive definite (far from the optimum), the step uses
 * Cole & Green's expected information instead (exact under the model for ln M and ln S; for L the
 * L ≈ 0 values 7S²/4 and −1/2 against ln M). Each curve's effective degrees of freedom (edf) is
 * its share of the diagonal of (I + P)⁻¹·I with I the expected information: the trace of its
 * smoother (Hastie & Tibshirani 1990). A curve's edf is at least 2: the penalty leaves a
 * straight line in τ free.
 *
 * The smoothing is chosen on a grid: λ_c = n·10^g with g from −8 to 0 in steps of 0.5, searched
 * one curve at a time (M, then S, then L, repeated until no move helps) to minimise the
 * generalised AIC, GAIC = −2·Σℓᵢ + κ·(edf_L + edf_M + edf_S), κ = 3 by default: GAIC(3) of
 * Rigby & Stasinopoulos (2005), which the WHO Child Growth Standards' methods report (WHO
 * Multicentre Growth Reference Study Group, 2006) tabulates beside AIC to choose its curves'
 * degrees of freedom (read in a secondary copy of that report; it also stretched age by a power
 * transformation before fitting cubic splines, as √age does here). Start values come from the data alone (a penalised least-squares median of ln y, then
 * one Box-Cox power and spread for the ratios to it); after the search, two restarts from start
 * values with L moved by amounts drawn from the seeded generator check that the fit did not stop
 * on a lesser optimum. The same data, options and seed give the same curves, to the bit.
 */
import { choleskyInPlace, choleskyInverse, choleskySolveInPlace } from "./cholesky";
import { bsplineRow, roughness, roughnessGradient, roughnessPenalty } from "./cubic-bspline";
import { boxCoxFitFromTable, boxCoxOfLog, logTableOfSorted } from "./box-cox";
import { LMS_MAX_INTERVALS, lmsTau, type LmsModel } from "./lms-model";
import { createRandom } from "./random";
import { assertFiniteSample, StatsInputError } from "./validate";

/** The fewest donors the fit accepts. */
export const LMS_MIN_DONORS = 50;
/** Spline intervals of each curve (27 coefficients per curve). */
export const LMS_DEFAULT_INTERVALS = 24;
/** The smoothing grid: λ = n·10^g, g = LMS_GRID_FROM, … + 0.5, …, LMS_GRID_TO. */
export const LMS_GRID_FROM = -8;
export const LMS_GRID_TO = 0;
const GRID_STEP = 0.5;
const GRID: readonly number[] = Array.from(
  { length: Math.round((LMS_GRID_TO - LMS_GRID_FROM) / GRID_STEP) + 1 },
  (_, i) => LMS_GRID_FROM + i * GRID_STEP,
);
export const LMS_DEFAULT_SEED = 1;
/** GAIC(3): the penalty per degree of freedom used by default. */
export const LMS_DEFAULT_CRITERION_PENALTY = 3;
/**
 * The curves may spend at most one effective degree of freedom per 10 donors in all (never
 * less than 6.5, which three straight lines in τ need): with few donors the criterion alone can
 * let S follow single donors. Bellwether's rule, stated, not from a source.
 */
export const LMS_DONORS_PER_EDF = 10;
export const LMS_MIN_EDF_BUDGET = 6.5;

export interface LmsFitOptions {
  /** Seed of the restart check (default 1). */
  seed?: number;
  /** Spline intervals per curve (default 24). */
  intervals?: number;
  /** GAIC penalty κ per degree of freedom (default 3). */
  criterionPenalty?: number;
}

export interface LmsCurveTriple<T> {
  L: T;
  M: T;
  S: T;
}

export interface LmsFit {
  model: LmsModel;
  n: number;
  /** Effective degrees of freedom of each curve. */
  edf: LmsCurveTriple<number>;
  /** The chosen smoothing, as log10(λ/n), and whether it lies on an end of the grid. */
  smoothing: LmsCurveTriple<{ log10LambdaPerDonor: number; atGridEnd: "roughest" | "smoothest" | null }>;
  /** Σℓᵢ at the fit, with the Jacobian term −Σ ln yᵢ, so comparable with other densities. */
  logLik: number;
  criterion: { name: "GAIC"; penalty: number; value: number };
  converged: boolean;
  /** Fits run during the search and the restarts. */
  fits: number;
  seed: number;
  restarts: { tried: number; improved: boolean };
  /** The most edf the curves could spend together, and whether the criterion wanted more. */
  edfBudget: { limit: number; binding: boolean };
}

/** Parameters are interleaved by coefficient: θ[3r + c] is coefficient r of curve c (L, ln M, ln S). */
const CURVE_COUNT = 3;
/** Coefficient r meets r ± 3 through the basis and the penalty: half-bandwidth 3·4 − 1. */
const BANDWIDTH = 11;

interface Design {
  n: number;
  k: number; // coefficients per curve
  intervals: number;
  index: Int32Array;
  w: Float64Array; // 4 per donor
  logY: Float64Array;
  sumLogY: number;
  omega: Float64Array; // k × k
}

interface State {
  theta: Float64Array;
  logLik: number; // without the Jacobian
  penalised: number;
  converged: boolean;
}

/** x ↦ (e^x − 1)/x, 1 at 0. */
function expm1OverX(x: number): number {
  if (Math.abs(x) < 1e-5) return 1 + x / 2 + (x * x) / 6;
  return Math.expm1(x) / x;
}

/** x ↦ (x·e^x − e^x + 1)/x², the series Σ_{n≥2} (n − 1)/n!·x^(n−2) near 0. */
function gOverX2(x: number): number {
  if (Math.abs(x) < 1e-2) return 0.5 + x / 3 + (x * x) / 8 + (x * x * x) / 30;
  return (x * Math.exp(x) - Math.expm1(x)) / (x * x);
}

/** x ↦ (e^x·(x² − 2x + 2) − 2)/x³, the series Σ_{n≥3} (n − 1)(n − 2)/n!·x^(n−3) near 0. */
function hOverX3(x: number): number {
  if (Math.abs(x) < 5e-2) return 1 / 3 + x / 4 + (x * x) / 10 + (x * x * x) / 36 + (x * x * x * x) / 168;
  return (Math.exp(x) * (x * x - 2 * x + 2) - 2) / (x * x * x);
}

function buildDesign(ages: readonly number[], values: readonly number[], intervals: number): {
  design: Design;
  ageMin: number;
  ageMax: number;
} {
  const n = ages.length;
  let ageMin = Infinity;
  let ageMax = -Infinity;
  for (const a of ages) {
    if (a < ageMin) ageMin = a;
    if (a > ageMax) ageMax = a;
  }
  const index = new Int32Array(n);
  const w = new Float64Array(4 * n);
  const logY = new Float64Array(n);
  let sumLogY = 0;
  for (let i = 0; i < n; i++) {
    const row = bsplineRow(lmsTau({ ageMin, ageMax }, ages[i]), intervals);
    index[i] = row.index;
    w[4 * i] = row.w0;
    w[4 * i + 1] = row.w1;
    w[4 * i + 2] = row.w2;
    w[4 * i + 3] = row.w3;
    logY[i] = Math.log(values[i]);
    sumLogY += logY[i];
  }
  const design = { n, k: intervals + 3, intervals, index, w, logY, sumLogY, omega: roughnessPenalty(intervals) };
  return { design, ageMin, ageMax };
}

type Information = "observed" | "expected";

/**
 * Σℓᵢ (without the Jacobian). With `grad` and `info`, also the score and the information:
 * observed (minus the Hessian, for Newton steps) or expected (Cole & Green's, positive
 * definite, for the fallback step and the edf).
 */
function evaluate(
  d: Design,
  theta: Float64Array,
  grad: Float64Array | null,
  info: Float64Array | null,
  kind: Information = "observed",
): number {
  const { n, index, w, logY } = d;
  const p = CURVE_COUNT * d.k;
  if (grad) grad.fill(0);
  if (info) info.fill(0);
  let total = 0;
  const dl = new Float64Array(3);
  const W = new Float64Array(9);
  for (let i = 0; i < n; i++) {
    const base = 3 * index[i];
    const i4 = 4 * i;
    const w0 = w[i4];
    const w1 = w[i4 + 1];
    const w2 = w[i4 + 2];
    const w3 = w[i4 + 3];
    const L = w0 * theta[base] + w1 * theta[base + 3] + w2 * theta[base + 6] + w3 * theta[base + 9];
    const m = w0 * theta[base + 1] + w1 * theta[base + 4] + w2 * theta[base + 7] + w3 * theta[base + 10];
    const s = w0 * theta[base + 2] + w1 * theta[base + 5] + w2 * theta[base + 8] + w3 * theta[base + 11];
    const S = Math.exp(s);
    const u = logY[i] - m;
    const x = L * u;
    const z = (u * expm1OverX(x)) / S;
    total += x - s - (z * z) / 2;
    if (!grad || !info) continue;
    const ex = Math.exp(x);
    const zL = ((u * u) / S) * gOverX2(x);
    const zm = -ex / S;
    dl[0] = u - z * zL;
    dl[1] = -L - z * zm;
    dl[2] = -1 + z * z;
    if (kind === "observed") {
      const zLL = ((u * u * u) / S) * hOverX3(x);
      W[0] = zL * zL + z * zLL;
      W[1] = W[3] = 1 + zm * zL - (z * u * ex) / S;
      W[2] = W[6] = -2 * z * zL;
      W[4] = zm * zm + (z * L * ex) / S;
      W[5] = W[7] = (2 * z * ex) / S;
      W[8] = 2 * z * z;
    } else {
      const S2 = S * S;
      W[0] = (7 * S2) / 4;
      W[1] = W[3] = -0.5;
      W[2] = W[6] = 0;
      W[4] = 1 / S2 + 2 * L * L;
      W[5] = W[7] = 2 * L;
      W[8] = 2;
    }
    for (let b = 0; b < 4; b++) {
      const wb = w[i4 + b];
      const rb = base + 3 * b;
      grad[rb] += wb * dl[0];
      grad[rb + 1] += wb * dl[1];
      grad[rb + 2] += wb * dl[2];
      for (let c = 0; c < 3; c++) {
        const row = (rb + c) * p + base;
        const f0 = wb * W[c * 3];
        const f1 = wb * W[c * 3 + 1];
        const f2 = wb * W[c * 3 + 2];
        for (let e = 0; e < 4; e++) {
          const we = w[i4 + e];
          const col = row + 3 * e;
          info[col] += f0 * we;
          info[col + 1] += f1 * we;
          info[col + 2] += f2 * we;
        }
      }
    }
  }
  return total;
}

function penaltyOf(d: Design, theta: Float64Array, lambdas: readonly number[]): number {
  let total = 0;
  for (let c = 0; c < CURVE_COUNT; c++) total += 0.5 * lambdas[c] * roughness(theta, d.intervals, c, CURVE_COUNT);
  return total;
}

function addPenalty(d: Design, a: Float64Array, lambdas: readonly number[]): void {
  const { k, omega } = d;
  const p = CURVE_COUNT * k;
  for (let c = 0; c < CURVE_COUNT; c++) {
    for (let r = 0; r < k; r++) {
      for (let q = Math.max(0, r - 3); q < Math.min(k, r + 4); q++) {
        a[(3 * r + c) * p + 3 * q + c] += lambdas[c] * omega[r * k + q];
      }
    }
  }
}

/** grad − P·θ into `out`. */
function penalisedScore(d: Design, theta: Float64Array, grad: Float64Array, lambdas: readonly number[], out: Float64Array): void {
  for (let c = 0; c < CURVE_COUNT; c++) roughnessGradient(theta, d.intervals, out, c, CURVE_COUNT);
  for (let r = 0; r < out.length; r++) out[r] = grad[r] - lambdas[r % CURVE_COUNT] * out[r];
}

/**
 * Newton's method on the penalised log-likelihood from `start`, at fixed smoothing: the
 * observed information where it makes the system positive definite, Cole & Green's expected
 * information where it does not; each step halved until the penalised log-likelihood does not fall.
 */
function fitAt(d: Design, lambdas: readonly number[], start: Float64Array): State {
  const p = CURVE_COUNT * d.k;
  const theta = Float64Array.from(start);
  const grad = new Float64Array(p);
  const info = new Float64Array(p * p);
  const step = new Float64Array(p);
  const score = new Float64Array(p);
  const trial = new Float64Array(p);
  let logLik = evaluate(d, theta, grad, info, "observed");
  let penalised = logLik - penaltyOf(d, theta, lambdas);
  let converged = false;
  for (let iter = 0; iter < 100; iter++) {
    penalisedScore(d, theta, grad, lambdas, score);
    addPenalty(d, info, lambdas);
    if (!choleskyInPlace(info, p, BANDWIDTH)) {
      evaluate(d, theta, grad, info, "expected");
      addPenalty(d, info, lambdas);
      if (!choleskyInPlace(info, p, BANDWIDTH)) break;
    }
    step.set(score);
    choleskySolveInPlace(info, p, step, BANDWIDTH);
    let decrement = 0;
    for (let r = 0; r < p; r++) decrement += score[r] * step[r];
    if (decrement < 1e-9) {
      converged = true;
      break;
    }
    let alpha = 1;
    let accepted = false;
    for (let h = 0; h < 40; h++) {
      for (let r = 0; r < p; r++) trial[r] = theta[r] + alpha * step[r];
      const pen = evaluate(d, trial, null, null) - penaltyOf(d, trial, lambdas);
      if (Number.isFinite(pen) && pen >= penalised) {
        theta.set(trial);
        penalised = pen;
        accepted = true;
        break;
      }
      alpha /= 2;
    }
    if (!accepted) {
      // No step along an ascent direction helps: the optimum to the precision of the sums.
      converged = decrement < 1e-6;
      break;
    }
    logLik = evaluate(d, theta, grad, info, "observed");
  }
  logLik = evaluate(d, theta, null, null);
  return { theta, logLik, penalised, converged };
}

/** edf of each curve: its share of the diagonal of (I + P)⁻¹·I, I the expected information at θ. */
function edfOf(d: Design, theta: Float64Array, lambdas: readonly number[]): number[] {
  const p = CURVE_COUNT * d.k;
  const info = new Float64Array(p * p);
  evaluate(d, theta, new Float64Array(p), info, "expected");
  const a = Float64Array.from(info);
  addPenalty(d, a, lambdas);
  if (!choleskyInPlace(a, p, BANDWIDTH)) return [NaN, NaN, NaN];
  const inv = choleskyInverse(a, p, BANDWIDTH);
  const edf = [0, 0, 0];
  for (let r = 0; r < p; r++) {
    let s = 0;
    const from = Math.max(0, r - BANDWIDTH);
    const to = Math.min(p - 1, r + BANDWIDTH);
    for (let c = from; c <= to; c++) s += inv[r * p + c] * info[c * p + r];
    edf[r % CURVE_COUNT] += s;
  }
  return edf;
}

/** Data-driven start: penalised least-squares median of ln y, then a Box-Cox power and spread of the ratios. */
function startValues(d: Design, lOffset: number): Float64Array {
  const { n, k, index, w, logY } = d;
  const a = new Float64Array(k * k);
  const b = new Float64Array(k);
  for (let i = 0; i < n; i++) {
    const j = index[i];
    for (let r = 0; r < 4; r++) {
      b[j + r] += w[4 * i + r] * logY[i];
      for (let c = 0; c < 4; c++) a[(j + r) * k + j + c] += w[4 * i + r] * w[4 * i + c];
    }
  }
  const lambda = n * 1e-4; // a moderate smoothing, only to start from
  for (let i = 0; i < k * k; i++) a[i] += lambda * d.omega[i];
  if (!choleskyInPlace(a, k, 3)) throw new StatsInputError("the ages do not spread enough to fit curves");
  choleskySolveInPlace(a, k, b, 3);
  const ratios = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const j = index[i];
    const m = w[4 * i] * b[j] + w[4 * i + 1] * b[j + 1] + w[4 * i + 2] * b[j + 2] + w[4 * i + 3] * b[j + 3];
    ratios[i] = Math.exp(logY[i] - m);
  }
  ratios.sort();
  const L0 = boxCoxFitFromTable(logTableOfSorted(ratios)).lambda + lOffset;
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i < n; i++) {
    const t = boxCoxOfLog(Math.log(ratios[i]), L0);
    s1 += t;
    s2 += t * t;
  }
  const mu = s1 / n;
  const sd = Math.sqrt(Math.max(s2 / n - mu * mu, 1e-12));
  const base = 1 + L0 * mu;
  const usePower = Math.abs(L0) >= 1e-6 && base > 0;
  const shiftM = usePower ? Math.log(base) / L0 : mu;
  const S0 = usePower ? sd / base : sd;
  const theta = new Float64Array(CURVE_COUNT * k);
  for (let r = 0; r < k; r++) {
    theta[3 * r] = L0;
    theta[3 * r + 1] = b[r] + shiftM;
    theta[3 * r + 2] = Math.log(S0);
  }
  return theta;
}

/**
 * LMS reference curves by penalised likelihood: cubic B-splines in √age for L, ln M and ln S,
 * smoothing of each curve chosen on a grid by GAIC(3), seeded restart check.
 * @see Cole TJ, Green PJ. Smoothing reference centile curves: the LMS method and penalized
 *   likelihood. Stat Med 1992;11:1305–1319; METHODS.md §9; Rigby RA, Stasinopoulos DM.
 *   Generalized additive models for location, scale and shape. J R Stat Soc C 2005;54:507–554
 *   (GAIC); WHO Multicentre Growth Reference Study Group. WHO Child Growth Standards: methods
 *   and development. WHO, 2006 (GAIC(3)); Hastie TJ, Tibshirani RJ. Generalized Additive Models. Chapman & Hall, 1990 (edf).
 * Complexity O(n) per Newton step (144 products per donor) plus a banded solve; about 50–60
 *   fits of a few steps each: 10,000 donors in 1–3 s (npm run bench:lms).
 * Throws StatsInputError when ages and values differ in length, hold fewer than 50 donors, a
 *   non-finite or negative age, a non-positive value, ages that are all equal, a number of
 *   intervals that is not an integer from 4 to 200, or a criterion penalty that is not positive.
 * @example fitLms(ages, values).model // { kind: "lms", ageTransform: "sqrt", … }
 */
export function fitLms(ages: readonly number[], values: readonly number[], options: LmsFitOptions = {}): LmsFit {
  assertFiniteSample(ages, "ages", LMS_MIN_DONORS);
  assertFiniteSample(values, "values", LMS_MIN_DONORS);
  if (ages.length !== values.length) {
    throw new StatsInputError(`ages and values differ in length (${ages.length} and ${values.length})`);
  }
  for (let i = 0; i < ages.length; i++) {
    if (ages[i] < 0) throw new StatsInputError(`ages[${i}] = ${ages[i]} is negative`);
    if (!(values[i] > 0)) {
      throw new StatsInputError(`values[${i}] = ${values[i]} is not positive; the LMS method needs values > 0`);
    }
  }
  const seed = options.seed ?? LMS_DEFAULT_SEED;
  const rng = createRandom(seed);
  const intervals = options.intervals ?? LMS_DEFAULT_INTERVALS;
  if (!Number.isInteger(intervals) || intervals < 4 || intervals > LMS_MAX_INTERVALS) {
    throw new StatsInputError(`the number of spline intervals must be an integer from 4 to ${LMS_MAX_INTERVALS} (got ${intervals})`);
  }
  const n = ages.length;
  const kappa = options.criterionPenalty ?? LMS_DEFAULT_CRITERION_PENALTY;
  if (!(Number.isFinite(kappa) && kappa > 0)) {
    throw new StatsInputError(`the criterion's penalty must be a positive number (got ${kappa})`);
  }
  const { design, ageMin, ageMax } = buildDesign(ages, values, intervals);
  if (!(ageMax > ageMin)) throw new StatsInputError("all donors have the same age; curves in age need a spread of ages");

  const lambdaOf = (g: number) => n * Math.pow(10, g);
  interface Point {
    state: State;
    edf: number[];
    gaic: number;
    /** Within the budget of degrees of freedom (at least LMS_DONORS_PER_EDF donors each). */
    eligible: boolean;
  }
  const edfBudget = Math.max(LMS_MIN_EDF_BUDGET, n / LMS_DONORS_PER_EDF);
  let overBudget = false;
  // An eligible point beats an ineligible one; among ineligible ones the fewer edf win.
  const better = (p: Point, q: Point): boolean => {
    if (p.eligible !== q.eligible) return p.eligible;
    if (!p.eligible) return p.edf[0] + p.edf[1] + p.edf[2] < q.edf[0] + q.edf[1] + q.edf[2];
    return p.gaic < q.gaic - 1e-9;
  };
  const cache = new Map<string, Point>();
  let fits = 0;
  const evaluateAt = (idx: readonly number[], from: Float64Array): Point => {
    const key = idx.join(",");
    const hit = cache.get(key);
    if (hit) return hit;
    const lambdas = idx.map((i) => lambdaOf(GRID[i]));
    const state = fitAt(design, lambdas, from);
    fits++;
    const edf = edfOf(design, state.theta, lambdas);
    const total = edf[0] + edf[1] + edf[2];
    const gaic = Number.isFinite(total) && Number.isFinite(state.logLik) ? -2 * state.logLik + kappa * total : Infinity;
    const point = { state, edf, gaic, eligible: total <= edfBudget };
    cache.set(key, point);
    return point;
  };

  const top = GRID.length - 1;
  const idx = [top, Math.round(top / 2), top]; // L and S smoothest, M in the middle
  let best = evaluateAt(idx, startValues(design, 0));
  // Coordinate search: M, S, L in turn, each curve's smoothing moved along its grid with the
  // other two held, each fit starting from its neighbour's. The first sweep scans each whole
  // grid (the criterion is flat over the smooth end, where a curve is already a straight line
  // in τ, so a walk that stops when the criterion rises can stop short); later sweeps look
  // LOCAL_SPAN steps either way. Sweeps repeat until one moves nothing.
  const LOCAL_SPAN = 2;
  for (let sweep = 0; sweep < 6; sweep++) {
    let moved = false;
    for (const c of [1, 2, 0]) {
      const centre = best;
      const origin = idx[c];
      let choice = origin;
      for (const dir of [-1, 1]) {
        let from = centre.state.theta;
        const end = sweep === 0 ? (dir < 0 ? 0 : top) : Math.max(0, Math.min(top, origin + dir * LOCAL_SPAN));
        for (let g = origin + dir; dir < 0 ? g >= end : g <= end; g += dir) {
          const trialIdx = idx.slice();
          trialIdx[c] = g;
          const p = evaluateAt(trialIdx, from);
          from = p.state.theta;
          if (!p.eligible && p.gaic < best.gaic - 1e-9) overBudget = true;
          if (better(p, best)) {
            best = p;
            choice = g;
          }
        }
      }
      if (choice !== origin) {
        idx[c] = choice;
        moved = true;
      }
    }
    if (!moved) break;
  }

  // Restart check at the chosen smoothing from start values with L moved either way.
  const lambdas = idx.map((i) => lambdaOf(GRID[i]));
  let improved = false;
  const tried = 2;
  for (let r = 0; r < tried; r++) {
    const offset = (r === 0 ? -1 : 1) * (0.5 + rng.nextFloat());
    const state = fitAt(design, lambdas, startValues(design, offset));
    fits++;
    if (state.penalised > best.state.penalised + 1e-6 * Math.max(1, Math.abs(best.state.penalised))) {
      const edf = edfOf(design, state.theta, lambdas);
      best = { state, edf, gaic: -2 * state.logLik + kappa * (edf[0] + edf[1] + edf[2]), eligible: best.eligible };
      improved = true;
    }
  }

  const k = design.k;
  const theta = best.state.theta;
  const curve = (c: number) => Array.from({ length: k }, (_, r) => theta[CURVE_COUNT * r + c]);
  const smoothingOf = (c: number) => ({
    log10LambdaPerDonor: GRID[idx[c]],
    atGridEnd: idx[c] === 0 ? ("roughest" as const) : idx[c] === top ? ("smoothest" as const) : null,
  });
  return {
    model: {
      kind: "lms",
      ageTransform: "sqrt",
      ageMin,
      ageMax,
      intervals,
      L: curve(0),
      logM: curve(1),
      logS: curve(2),
    },
    n,
    edf: { L: best.edf[0], M: best.edf[1], S: best.edf[2] },
    smoothing: { L: smoothingOf(0), M: smoothingOf(1), S: smoothingOf(2) },
    logLik: best.state.logLik - design.sumLogY,
    criterion: { name: "GAIC", penalty: kappa, value: best.gaic + 2 * design.sumLogY },
    converged: best.state.converged,
    fits,
    seed,
    restarts: { tried, improved },
    edfBudget: { limit: edfBudget, binding: overBudget },
  };
}

