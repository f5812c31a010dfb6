/**
 * Cautions attached to every score. Each is a stable code (for the LIS and for tests) and a
 * plain sentence for the clinician; a sentence that names the value is formatted only when read
 * (a getter), since a batch of thousands explains its codes once with CAUTION_TEXTS. A statistic never stands in for a diagnosis: the general
 * caution travels with every score, and the specific ones say what limits this particular number.
 */

export type CautionCode =
  | "general"
  | "tail-extrapolated"
  | "outside-reference-data"
  | "unit-converted"
  | "value-censored"
  | "review-overdue"
  | "partition-chosen"
  | "partition-default"
  | "limits-only"
  | "flag-only"
  | "limits-at-age"
  | "limit-undefined-at-age"
  | "z-undefined"
  | "indirect-estimate";

export interface Caution {
  code: CautionCode;
  text: string;
}

export const GENERAL_CAUTION: Caution = {
  code: "general",
  text:
    "This z-score and percentile place the value among healthy reference individuals; they are " +
    "not a diagnosis. About 5% of healthy people fall outside a reference interval by design. " +
    "Interpret the result with the clinical picture, under the direction of the laboratory's " +
    "licensed director and local policy.",
};

/** A value further into the tail of a gaussian model than the reference data reached. */
export function tailExtrapolatedCaution(z: number, n: number | undefined): Caution {
  const reach =
    n === undefined
      ? "more than 3 standard deviations from the centre"
      : `beyond the most extreme value expected among the ${n} reference results`;
  return {
    code: "tail-extrapolated",
    get text() {
      return (
        `This value lies ${reach} (z = ${z.toFixed(2)}). The z-score and percentile extend the ` +
        "fitted distribution past the data it was built from and are less certain this far out."
      );
    },
  };
}

/** A value outside the range of an empirical model's reference data: the percentile is a bound. */
export function outsideReferenceDataCaution(side: "below" | "above", boundPercentile: number, n: number): Caution {
  const where = side === "below" ? "below the lowest" : "above the highest";
  return {
    code: "outside-reference-data",
    get text() {
      return (
        `This value is ${where} of the ${n} reference results, so its percentile can only be given ` +
        `as a bound (${side} ${boundPercentile.toFixed(2)}), and the z-score likewise; the true ` +
        "position is further out."
      );
    },
  };
}

export function unitConvertedCaution(from: string | undefined, to: string): Caution {
  return {
    code: "unit-converted",
    get text() {
      return (
        `The value was converted ${from ? `from ${from} ` : ""}to ${to} before scoring. If the ` +
        "result looks unexpected, check that the unit sent matches the unit measured."
      );
    },
  };
}

export function valueCensoredCaution(censored: "<" | ">", c: number, unit: string): Caution {
  const direction = censored === "<" ? "below" : "above";
  const further = censored === "<" ? "lower" : "higher";
  return {
    code: "value-censored",
    get text() {
      return (
        `The result was reported as "${censored}${c} ${unit}", ${direction} the measuring range. It ` +
        `was scored at ${c}, so the true z-score and percentile are ${further} than shown.`
      );
    },
  };
}

export const REVIEW_OVERDUE_CAUTION: Caution = {
  code: "review-overdue",
  text:
    "This reference interval is past its scheduled review date: the laboratory has not yet " +
    "re-confirmed that it still fits the current method and population.",
};

/** A zlog score: z comes from the interval's two limits, not from reference values. */
export const LIMITS_ONLY_CAUTION: Caution = {
  code: "limits-only",
  text:
    "This interval was adopted from an external source and verified locally; the laboratory holds " +
    "only its limits. The z-score and percentile come from those limits alone (the zlog method), " +
    "assuming the healthy values are log-normal between them, and are approximate.",
};

/**
 * An interval estimated indirectly from the laboratory's routine patient results (truncated
 * maximum likelihood): the reference population was separated statistically, not screened.
 */
export const INDIRECT_ESTIMATE_CAUTION: Caution = {
  code: "indirect-estimate",
  text:
    "This interval was estimated indirectly, from the laboratory's routine patient results with the " +
    "diseased part separated statistically (truncated maximum likelihood), not from screened healthy " +
    "donors. The z-score and percentile place the value on that fitted non-diseased distribution and " +
    "are less certain than those of a direct study.",
};

/** A one-sided interval: a flag and no z or percentile. */
export const FLAG_ONLY_CAUTION: Caution = {
  code: "flag-only",
  text:
    "This interval has a single limit, so only a flag is given: one limit says nothing of where " +
    "the healthy values centre or how widely they spread, so no z-score or percentile can be " +
    "computed from it.",
};

const ageWords = (ageYears: number) => `${(Math.round(ageYears * 100) / 100).toFixed(2)} years`;

/** LMS curves: the limits are those of the patient's exact age, not of an age band. */
export function limitsAtAgeCaution(ageYears: number): Caution {
  return {
    code: "limits-at-age",
    get text() {
      return (
        `The limits are those of the patient's exact age (${ageWords(ageYears)}) on the laboratory's ` +
        "continuous age curves (LMS method): they change smoothly with age, so the same value may be " +
        "judged differently a few months earlier or later. Check that the age is right."
      );
    },
  };
}

/**
 * LMS curves: at this age a limit has no value, since 1 + L·S·z ≤ 0 there (METHODS.md §9); that
 * side of the interval is open and nothing is clamped.
 */
export function limitUndefinedAtAgeCaution(sides: readonly ("lower" | "upper")[], ageYears: number): Caution {
  const which = sides.length === 2 ? "neither the 2.5th nor the 97.5th centile" : sides[0] === "lower" ? "no 2.5th centile (lower limit)" : "no 97.5th centile (upper limit)";
  return {
    code: "limit-undefined-at-age",
    get text() {
      return (
        `At ${ageWords(ageYears)} the age curves give ${which}: the curves' skewness puts that centile ` +
        "outside the values the LMS formula can reach (1 + L·S·z ≤ 0), so that side is left open rather " +
        "than set to an invented number. Ask the laboratory to review the curves."
      );
    },
  };
}

/** LMS curves: a value of 0 or below has no z (the Box-Cox scale needs positive values). */
export function zUndefinedCaution(value: number, unit: string): Caution {
  return {
    code: "z-undefined",
    get text() {
      return (
        `The age curves give no z-score or percentile for ${value} ${unit}: the LMS method is defined ` +
        "for positive values only, so only the flag against the limits is given."
      );
    },
  };
}

export type PartitionChoice = "sex" | "age" | "age-and-sex" | "default";

export function partitionCaution(choice: PartitionChoice): Caution {
  if (choice === "default") {
    return {
      code: "partition-default",
      text:
        "No age or sex was given, so the combined or default interval was used; an age- or " +
        "sex-specific interval, where the laboratory has one, may differ.",
    };
  }
  const by = choice === "age-and-sex" ? "age and sex" : choice;
  return {
    code: "partition-chosen",
    text:
      `The interval was chosen by the ${by} given with the request; if the ${by} is wrong, so is ` +
      "the interval used.",
  };
}

/**
 * One sentence per caution code that holds whatever the value: the scoring API explains each
 * code of its results once, in `cautionTexts`, with these. The per-score texts above may name the
 * value or the units; these never do, so a batch's explanations do not depend on its items.
 */
export const CAUTION_TEXTS: Readonly<Record<CautionCode, string>> = {
  general: GENERAL_CAUTION.text,
  "tail-extrapolated":
    "The value lies further out than the reference data reached, so its z-score and percentile extend the fitted distribution past the data it was built from and are less certain.",
  "outside-reference-data":
    "The value is outside the range of the reference results, so its percentile (and z-score) can only be given as a bound (below or above the value shown): the true position is further out.",
  "unit-converted":
    "The value was converted to the interval's unit before scoring; if the result looks unexpected, check that the unit sent matches the unit measured.",
  "value-censored":
    "The result was reported beyond the measuring range (\"<\" or \">\") and scored at that limit, so the true z-score and percentile are further out than shown (the percentile is a bound).",
  "review-overdue": REVIEW_OVERDUE_CAUTION.text,
  "partition-chosen":
    "The interval was chosen by the sex or age given with the request; if they are wrong, so is the interval used.",
  "partition-default":
    "No age or sex was given, so the combined or default interval was used; an age- or sex-specific interval, where the laboratory has one, may differ.",
  "limits-only": LIMITS_ONLY_CAUTION.text,
  "flag-only": FLAG_ONLY_CAUTION.text,
  "indirect-estimate": INDIRECT_ESTIMATE_CAUTION.text,
  "limits-at-age":
    "The limits are those of the patient's exact age on the laboratory's continuous age curves (LMS method): they change smoothly with age, so the same value may be judged differently a few months earlier or later. Check that the age is right.",
  "limit-undefined-at-age":
    "At this age the age curves give no value for one of the limits (1 + L·S·z ≤ 0 under the LMS formula), so that side of the interval is left open rather than set to an invented number. Ask the laboratory to review the curves.",
  "z-undefined":
    "The age curves give no z-score or percentile for a value of 0 or below: the LMS method is defined for positive values only, so only the flag against the limits is given.",
};
