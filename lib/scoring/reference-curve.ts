/**
 * What the score page draws: the reference distribution on the scale the scoring model works on,
 * with the interval's limits and the patient's value placed on that scale. Pure: the model's
 * public description (never reference values) and the score in, plain numbers out.
 *
 * - gaussian: the normal density N(mean, sd) on the model's scale g (identity, ln, or Box-Cox
 *   with λ); the limits at g(low) and g(high); the value at mean + z·sd, which is g(value) by the
 *   definition of z and needs no transform of a value g cannot take (a censored "<0").
 * - empirical and zlog: the standard normal in z; the limits at z of the 2.5th and 97.5th
 *   percentiles (±1.96 for zlog by its definition), the value at its z.
 * - limits (a one-sided or flag-only interval): nothing to draw.
 *
 * @see Box GEP, Cox DR. An analysis of transformations. J R Stat Soc B 1964;26:211–252.
 * @see Hoffmann G et al. The zlog value as a basis for the standardization of laboratory results. J Lab Med 2017;41:23–32.
 */
import normal from "@stdlib/stats-base-dists-normal";
import { boxCoxOfValue } from "../stats/box-cox";

export type CurveModel =
  | { kind: "gaussian"; transform: "none" | "ln" | "box-cox"; lambda: number | null; mean: number; sd: number }
  | { kind: "empirical"; n: number }
  | { kind: "zlog"; scale: "log" | "linear" }
  | { kind: "limits" };

export interface ReferenceCurve {
  /** The axis the curve is drawn on. */
  axis: "value" | "ln" | "box-cox" | "z";
  /** λ of a Box-Cox axis, else null. */
  lambda: number | null;
  /** The density, evenly spaced over [min, max]. */
  points: { x: number; y: number }[];
  min: number;
  max: number;
  /** The limits on the axis (null where the interval has none or the axis cannot show it). */
  lower: number | null;
  upper: number | null;
  /** The value on the axis, kept within [min, max]; `clamped` says whether it was moved. */
  value: number | null;
  clamped: boolean;
}

/** Half-width of the drawn range in standard deviations, before the limits and value widen it. */
const SPAN_SD = 4;
/** How far out a value may sit before it is pinned to the edge of the chart, in sd. */
const MAX_SD = 6;
const STEPS = 240;

/** The model's transform g, or null where g is undefined for v (v ≤ 0 on a log scale). */
export function modelScaleOf(model: Extract<CurveModel, { kind: "gaussian" }>): (v: number) => number | null {
  if (model.transform === "none") return (v) => v;
  const lambda = model.transform === "ln" ? 0 : (model.lambda ?? 0);
  return (v) => (v > 0 ? boxCoxOfValue(v, lambda) : null);
}

/**
 * The inverse of g: a point of the axis back in the analyte's unit, for the tick labels; null
 * where no value maps there (1 + λy ≤ 0).
 */
export function valueOfScale(model: Extract<CurveModel, { kind: "gaussian" }>): (t: number) => number | null {
  if (model.transform === "none") return (t) => t;
  const lambda = model.transform === "ln" ? 0 : (model.lambda ?? 0);
  if (lambda === 0) return (t) => Math.exp(t);
  return (t) => {
    const base = 1 + lambda * t;
    return base > 0 ? Math.pow(base, 1 / lambda) : null;
  };
}

/**
 * The curve, limits and value to draw; null for a model that has no distribution (limits only).
 * @param model the scoring model's public description
 * @param score the interval's limits in the analyte's unit and the value's z (null when none)
 */
export function referenceCurve(model: CurveModel, score: { low: number | null; high: number | null; z: number | null }): ReferenceCurve | null {
  if (model.kind === "limits") return null;
  let centre: number;
  let sd: number;
  let lower: number | null;
  let upper: number | null;
  let axis: ReferenceCurve["axis"];
  let lambda: number | null = null;
  if (model.kind === "gaussian") {
    if (!(model.sd > 0) || !Number.isFinite(model.mean)) return null;
    const g = modelScaleOf(model);
    centre = model.mean;
    sd = model.sd;
    lower = score.low === null ? null : g(score.low);
    upper = score.high === null ? null : g(score.high);
    axis = model.transform === "none" ? "value" : model.transform;
    if (model.transform === "box-cox") lambda = model.lambda;
  } else {
    centre = 0;
    sd = 1;
    const q = model.kind === "zlog" ? 1.96 : normal.quantile(0.975, 0, 1);
    lower = score.low === null ? null : -q;
    upper = score.high === null ? null : q;
    axis = "z";
  }
  const raw = score.z === null || !Number.isFinite(score.z) ? null : centre + score.z * sd;
  const edge = MAX_SD * sd;
  const value = raw === null ? null : Math.min(centre + edge, Math.max(centre - edge, raw));
  const within = [lower, upper, value].filter((v): v is number => v !== null && Number.isFinite(v));
  const min = Math.min(centre - SPAN_SD * sd, ...within.map((v) => v - 0.25 * sd));
  const max = Math.max(centre + SPAN_SD * sd, ...within.map((v) => v + 0.25 * sd));
  const points: { x: number; y: number }[] = [];
  for (let i = 0; i <= STEPS; i++) {
    const x = min + ((max - min) * i) / STEPS;
    points.push({ x, y: normal.pdf(x, centre, sd) });
  }
  return { axis, lambda, points, min, max, lower, upper, value, clamped: raw !== null && value !== raw };
}

/** The curve's points up to the value: the area that is the percentile, for shading. */
export function shadedBelow(curve: ReferenceCurve): { x: number; y: number }[] {
  if (curve.value === null) return [];
  const v = curve.value;
  const below = curve.points.filter((p) => p.x <= v);
  // End exactly at the value so that the shading meets its marker.
  const last = curve.points.find((p) => p.x > v);
  if (last && below.length > 0) {
    const prev = below[below.length - 1];
    const t = (v - prev.x) / (last.x - prev.x);
    below.push({ x: v, y: prev.y + t * (last.y - prev.y) });
  }
  return below;
}

/**
 * Tick positions for an axis drawn on the model's scale but labelled in the analyte's unit: about
 * `count` points evenly spread on the axis, each moved to the nearest round value (two
 * significant digits) so that the labels are numbers a reader would write.
 */
export function unitTicks(
  model: Extract<CurveModel, { kind: "gaussian" }>,
  min: number,
  max: number,
  count = 6,
): { at: number; value: number }[] {
  const g = modelScaleOf(model);
  const inv = valueOfScale(model);
  const out: { at: number; value: number }[] = [];
  for (let i = 0; i <= count; i++) {
    const t = min + ((max - min) * i) / count;
    const v = inv(t);
    if (v === null || !Number.isFinite(v)) continue;
    const rounded = roundToSignificant(v, 2);
    const at = g(rounded);
    if (at === null || at < min || at > max) continue;
    if (out.some((o) => o.value === rounded)) continue;
    out.push({ at, value: rounded });
  }
  return out;
}

function roundToSignificant(v: number, digits: number): number {
  if (v === 0) return 0;
  const magnitude = Math.floor(Math.log10(Math.abs(v)));
  const factor = Math.pow(10, digits - 1 - magnitude);
  return Math.round(v * factor) / factor;
}

/**
 * LMS curves at one age as the gaussian on the Box-Cox scale with λ = L that they are there:
 * z = ((x/M)^L − 1)/(L·S) = (g(x) − g(M))/(M^L·S) with g(x) = (x^L − 1)/L, so the mean is g(M)
 * and the sd M^L·S; for L = 0, ln with mean ln M and sd S (METHODS.md §9). The score page
 * draws the distribution at the patient's age with it.
 * @example lmsAsGaussian({ L: 0, M: 100, S: 0.1 }) // { kind: "gaussian", transform: "ln", lambda: null, mean: 4.605…, sd: 0.1 }
 */
export function lmsAsGaussian(p: { L: number; M: number; S: number }): Extract<CurveModel, { kind: "gaussian" }> {
  if (Math.abs(p.L) < 1e-6) return { kind: "gaussian", transform: "ln", lambda: null, mean: Math.log(p.M), sd: p.S };
  const mL = Math.pow(p.M, p.L);
  return { kind: "gaussian", transform: "box-cox", lambda: p.L, mean: (mL - 1) / p.L, sd: mL * p.S };
}
