/**
 * The stored form of fitted LMS curves: a JSON-serialisable model that scoring reproduces
 * exactly. Each curve is a cubic B-spline on equally spaced knots in √age between the youngest
 * and the oldest donor's ages:
 *
 *   τ = (√age − √ageMin)/(√ageMax − √ageMin) ∈ [0, 1]
 *   L(age) = Σ Lₖ Bₖ(τ),  M(age) = exp(Σ logMₖ Bₖ(τ)),  S(age) = exp(Σ logSₖ Bₖ(τ))
 *
 * with Bₖ the uniform cubic B-splines of lib/stats/cubic-bspline.ts on `intervals` intervals
 * (intervals + 3 coefficients per curve). The square root spreads the first years of life, where
 * most analytes change fastest, over a fair share of the knots. Evaluation is a few
 * multiplications, Math.sqrt and Math.exp: the same model and age give the same L, M and S to
 * the last bit on every run of the same engine. Ages outside [ageMin, ageMax] have no curve.
 */
import { z } from "zod";
import { bsplineRow, bsplineValue } from "./cubic-bspline";
import { lmsCentile, lmsZ, type LmsParameters } from "./lms-z";
import { assertFiniteNumber, StatsInputError } from "./validate";

const finite = z.number().refine(Number.isFinite, "must be a finite number");

/** The largest number of spline intervals a stored model may have. */
export const LMS_MAX_INTERVALS = 200;

export const lmsModelSchema = z
  .object({
    kind: z.literal("lms"),
    /** How age enters the splines; only the square root for now. */
    ageTransform: z.literal("sqrt"),
    ageMin: finite.refine((v) => v >= 0, "ageMin must not be negative"),
    ageMax: finite,
    intervals: z.number().int().min(1).max(LMS_MAX_INTERVALS),
    L: z.array(finite),
    logM: z.array(finite),
    logS: z.array(finite),
  })
  .refine((m) => m.ageMax > m.ageMin, { message: "ageMax must be greater than ageMin", path: ["ageMax"] })
  .refine(
    (m) => [m.L, m.logM, m.logS].every((c) => c.length === m.intervals + 3),
    { message: "L, logM and logS each need intervals + 3 coefficients", path: ["intervals"] },
  );

export type LmsModel = z.infer<typeof lmsModelSchema>;

/** τ ∈ [0, 1] of an age already checked to lie in the model's range. */
export function lmsTau(model: Pick<LmsModel, "ageMin" | "ageMax">, ageYears: number): number {
  const t0 = Math.sqrt(model.ageMin);
  const t1 = Math.sqrt(model.ageMax);
  return (Math.sqrt(ageYears) - t0) / (t1 - t0);
}

/**
 * L, M and S of stored LMS curves at an exact age in years.
 * @see Cole TJ, Green PJ. Smoothing reference centile curves: the LMS method and penalized
 *   likelihood. Stat Med 1992;11:1305–1319; METHODS.md §9.
 * Complexity O(1).
 * Throws StatsInputError when the age is not finite or lies outside [ageMin, ageMax] (curves
 *   are not extrapolated).
 * @example lmsAt(model, 4.5) // { L: 0.41…, M: 181.9…, S: 0.22… }
 */
export function lmsAt(model: LmsModel, ageYears: number): LmsParameters {
  assertFiniteNumber(ageYears, "age");
  if (ageYears < model.ageMin || ageYears > model.ageMax) {
    throw new StatsInputError(
      `age ${ageYears} years is outside the curves' age range, ${model.ageMin} to ${model.ageMax} years`,
    );
  }
  const row = bsplineRow(lmsTau(model, ageYears), model.intervals);
  return {
    L: bsplineValue(model.L, row),
    M: Math.exp(bsplineValue(model.logM, row)),
    S: Math.exp(bsplineValue(model.logS, row)),
  };
}

/**
 * z of a value at an exact age under stored LMS curves: METHODS.md §9's formula at
 * {@link lmsAt}'s L, M and S (the L = 0 branch for |L| < 1e−6).
 * @see Cole TJ, Green PJ. Stat Med 1992;11:1305–1319; METHODS.md §9.
 * Complexity O(1).
 * Throws StatsInputError as lmsAt (age outside the curves) and lmsZ (a value that is not positive).
 * @example lmsZAt(model, 4.5, 250) // 1.32…
 */
export function lmsZAt(model: LmsModel, ageYears: number, value: number): number {
  return lmsZ(lmsAt(model, ageYears), value);
}

/**
 * The value at a centile (0 < centile < 100) at an exact age under stored LMS curves; null where
 * 1 + L·S·z ≤ 0 (no value has that z; not clamped).
 * @see Cole TJ, Green PJ. Stat Med 1992;11:1305–1319; METHODS.md §9.
 * Complexity O(1).
 * Throws StatsInputError as lmsAt and lmsCentile.
 * @example lmsCentileAt(model, 4.5, 97.5) // 262.1…
 */
export function lmsCentileAt(model: LmsModel, ageYears: number, centile: number): number | null {
  return lmsCentile(lmsAt(model, ageYears), centile);
}
