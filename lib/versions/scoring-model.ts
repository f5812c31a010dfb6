/**
 * The scoring model of one partition of an interval version, built from the estimate the
 * scientist chose and the method picked. Flags come from the limits and z from the model, so
 * the model must put the chosen limits at percentiles 2.5 and 97.5 (tests/lib/versions/).
 */
import { PARTITION_METHODS } from "@/db/schema";
import { gaussianTransform } from "@/lib/scoring/gaussian";
import { scoringModelSchema, type ScoringModel } from "@/lib/scoring/model";
import type { DonorValue, ReferenceIntervalEstimate } from "@/lib/stats/estimate";
import { Z_975 } from "@/lib/stats/parametric";

export { PARTITION_METHODS };
export type PartitionMethod = (typeof PARTITION_METHODS)[number];

/** The limits of a method in an estimate document. */
export function limitsOf(document: ReferenceIntervalEstimate, method: PartitionMethod) {
  return document[method];
}

/** Thrown when a method gives no usable model; the caller turns it into a 422. */
export class ScoringModelError extends Error {}

/**
 * The scoring model for `method` in `document`:
 * - parametric: the gaussian the method fitted (transform, λ, mean and SD on that scale), whose
 *   2.5th and 97.5th percentiles are the parametric limits by construction (mean ∓ z·SD);
 * - robust: a gaussian on the same scale (the robust method runs on the parametric scale and λ)
 *   centred between the transformed limits, with SD = (g(high) − g(low))/(2·z(0.975)), so that
 *   it puts the robust limits at percentiles 2.5 and 97.5; g is the scorer's own transform
 *   (lib/scoring/gaussian.ts, through the one Box-Cox of lib/stats/box-cox.ts);
 * - nonparametric: the empirical model of the partition's values, sorted, whose inverse type-6
 *   quantile puts the type-6 limits at 2.5 and 97.5 (exactly when no value ties with a limit;
 *   ties take the mid-rank, see lib/stats/quantile.ts rankType6). Censored values enter at their
 *   limit ("<0.5" as 0.5): the nonparametric ranks place them below (or above) every measured
 *   value, and a number is needed for each rank; a limit that falls on a censored rank is itself
 *   that bound, so the model still reproduces it.
 * Validated with lib/scoring/model.ts's schema. Throws ScoringModelError when the method has no
 * limits or gives no valid model (e.g. two equal robust limits).
 */
export function scoringModelFor({
  document,
  method,
  values,
}: {
  document: ReferenceIntervalEstimate;
  method: PartitionMethod;
  /** The estimate's values; needed for the nonparametric method only. */
  values?: readonly DonorValue[];
}): ScoringModel {
  const limits = limitsOf(document, method);
  if (limits.lower === null || limits.upper === null) {
    throw new ScoringModelError(`the estimate has no ${method} limits`);
  }
  let model: unknown;
  if (method === "parametric") {
    const p = document.parametric;
    model = { kind: "gaussian", transform: p.transform, ...(p.transform === "box-cox" ? { lambda: p.lambda } : {}), mean: p.mean, sd: p.sd };
  } else if (method === "robust") {
    const { transform, lambda } = document.parametric;
    const scale = { kind: "gaussian" as const, transform, ...(transform === "box-cox" ? { lambda: lambda ?? undefined } : {}), mean: 0, sd: 1 };
    const g = gaussianTransform(scale);
    const low = g(limits.lower);
    const high = g(limits.upper);
    model = { ...scale, mean: (low + high) / 2, sd: (high - low) / (2 * Z_975) };
  } else {
    if (!values) throw new ScoringModelError("the nonparametric model needs the estimate's values");
    const numbers = values.map((v) => (typeof v === "number" ? v : v.value)).sort((a, b) => a - b);
    model = { kind: "empirical", values: numbers };
  }
  const parsed = scoringModelSchema.safeParse(model);
  if (!parsed.success) {
    throw new ScoringModelError(`the ${method} limits give no valid scoring model (${parsed.error.issues.map((i) => i.message).join("; ")})`);
  }
  return parsed.data;
}

/** A model as the API shows it: an empirical model's values stay on the server, only their number is told. */
export function publicModel(model: ScoringModel): Record<string, unknown> {
  return model.kind === "empirical" ? { kind: "empirical", n: model.values.length } : model;
}

/**
 * The scoring model of a partition adopted from an accepted adoption check, whose reference
 * values the laboratory does not hold: zlog from the two limits (log scale, Hoffmann et al.
 * 2017; the linear variant when the lower limit is not positive), or, for a one-sided interval,
 * limits only (a flag, no z: one limit says nothing of the distribution's centre or spread).
 */
export function adoptedScoringModel({ lower, upper }: { lower: number | null; upper: number | null }): ScoringModel {
  if (lower === null || upper === null) return { kind: "limits" };
  return { kind: "zlog", scale: lower > 0 ? "log" : "linear" };
}
