/**
 * LMS reference curves from paediatric donors in one call: the fit (lib/stats/lms-fit.ts), the
 * diagnostics (lib/stats/lms-diagnostics.ts), and the 2.5th, 50th and 97.5th centiles with L,
 * M and S at requested ages. What the command line prints and what the app will call.
 */
import normal from "@stdlib/stats-base-dists-normal";
import { lmsDiagnostics, type LmsDiagnostics } from "./lms-diagnostics";
import { fitLms, LMS_MIN_DONORS, type LmsFit, type LmsFitOptions } from "./lms-fit";
import { lmsAt } from "./lms-model";
import { lmsValueAtZ } from "./lms-z";
import { assertFiniteSample, StatsInputError } from "./validate";

/** Φ⁻¹(0.975) from @stdlib: the 2.5th and 97.5th centiles lie at z = ∓this. */
const Z975 = normal.quantile(0.975, 0, 1);
/** |z| beyond this marks a donor as far from the curves (a possible outlier). */
export const LMS_FAR_Z = 4;

export interface LmsCurvesOptions extends LmsFitOptions {
  /** Ages in years at which to give the centiles and L, M, S. */
  at: readonly number[];
}

/** The document of `bellwether lms`: one entry per requested age in each array. */
export interface LmsCurvesDocument {
  n: number;
  at: number[];
  /** 2.5th centile; null where 1 + L·S·z ≤ 0 (no value has that z; not clamped). */
  lower: (number | null)[];
  median: number[];
  /** 97.5th centile; null where 1 + L·S·z ≤ 0. */
  upper: (number | null)[];
  L: number[];
  M: number[];
  S: number[];
  edf: { L: number; M: number; S: number };
  warnings: string[];
}

export interface LmsCurvesResult {
  document: LmsCurvesDocument;
  fit: LmsFit;
  diagnostics: LmsDiagnostics;
}

function fmt(v: number): string {
  return String(Math.round(v * 1000) / 1000);
}

/**
 * Fits LMS curves (penalised likelihood, GAIC(3) smoothing, seeded restart check), runs the
 * diagnostics and gives the centiles and L, M, S at the requested ages.
 * @see Cole TJ, Green PJ. Stat Med 1992;11:1305–1319; METHODS.md §9.
 * Complexity that of fitLms, plus O(n log n) for the diagnostics.
 * Throws StatsInputError on bad donors (as fitLms), no requested age, or a requested age that
 *   is not finite or lies outside the donors' ages (the curves are not extrapolated).
 * @example estimateLmsCurves(ages, values, { at: [1, 5, 10] }).document.upper // [330.1, 261.9, …]
 */
export function estimateLmsCurves(
  ages: readonly number[],
  values: readonly number[],
  options: LmsCurvesOptions,
): LmsCurvesResult {
  const at = [...options.at];
  if (at.length === 0) throw new StatsInputError("give at least one age at which to read the curves");
  assertFiniteSample(at, "requested ages");
  assertFiniteSample(ages, "ages", LMS_MIN_DONORS);
  // The range is the donors' before the fit, so a request outside it costs no fit.
  let ageMin = Infinity;
  let ageMax = -Infinity;
  for (const a of ages) {
    if (a < ageMin) ageMin = a;
    if (a > ageMax) ageMax = a;
  }
  if (!(ageMax > ageMin)) throw new StatsInputError("all donors have the same age; curves in age need a spread of ages");
  for (const a of at) {
    if (a < ageMin || a > ageMax) {
      throw new StatsInputError(
        `age ${a} is outside the donors' ages, ${ageMin} to ${ageMax} years; the curves are not extrapolated`,
      );
    }
  }
  const fit = fitLms(ages, values, options);
  const { model } = fit;
  const diagnostics = lmsDiagnostics(model, ages, values);
  const warnings: string[] = [];
  if (!fit.converged) warnings.push("the penalised-likelihood fit did not converge; the curves may be unreliable");
  if (fit.restarts.improved) {
    warnings.push("a restart from other start values found a better fit than the first: the likelihood has several optima, read the curves with care");
  }
  if (fit.edfBudget.binding) {
    warnings.push(
      `with ${fit.n} donors the curves were held to ${Math.round(fit.edfBudget.limit * 10) / 10} effective degrees of freedom in all (Bellwether allows one per 10 donors); the criterion wanted more, so more donors would give more detailed curves`,
    );
  }
  for (const c of ["L", "M", "S"] as const) {
    if (fit.smoothing[c].atGridEnd === "roughest") {
      warnings.push(`the ${c} curve took the least smoothing Bellwether allows; it may follow noise rather than age`);
    }
  }
  warnings.push(...diagnostics.warnings);
  const far = diagnostics.z.filter((v) => Math.abs(v) > LMS_FAR_Z).length;
  if (far > 0) {
    warnings.push(`${far} donor${far === 1 ? " lies" : "s lie"} more than ${LMS_FAR_Z} SD from the median curve: check for outliers`);
  }
  const document: LmsCurvesDocument = {
    n: fit.n,
    at,
    lower: [],
    median: [],
    upper: [],
    L: [],
    M: [],
    S: [],
    edf: { ...fit.edf },
    warnings,
  };
  for (const a of at) {
    const p = lmsAt(model, a);
    const lower = lmsValueAtZ(p, -Z975);
    const upper = lmsValueAtZ(p, Z975);
    if (lower === null || upper === null) {
      warnings.push(
        `at ${fmt(a)} years the ${lower === null ? "2.5th" : "97.5th"} centile does not exist: 1 + L·S·z ≤ 0 (L = ${fmt(p.L)}, S = ${fmt(p.S)})`,
      );
    }
    document.lower.push(lower);
    document.median.push(p.M);
    document.upper.push(upper);
    document.L.push(p.L);
    document.M.push(p.M);
    document.S.push(p.S);
  }
  return { document, fit, diagnostics };
}
