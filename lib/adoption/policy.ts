/**
 * The laboratory's policy for adoption checks: the thresholds of the 20-sample verification of
 * an interval the laboratory did not establish itself, stored with their source and the parts of
 * that source that are uncertain. A copy is kept in every check row, so a check is always read
 * against the rule it was decided by, even after the policy changes.
 */

export interface AdoptionPolicy {
  /** A name for the rule and the date this version of the policy was set. */
  name: string;
  version: string;
  /** Values in each set: exactly this many. */
  valuesPerSet: number;
  /** Fraction of healthy values outside a correct interval (central 95%, or a 95th percentile). */
  expectedOutsideFraction: number;
  firstSet: {
    /** At most this many outside: accepted. */
    acceptAtMost: number;
    /** From acceptAtMost + 1 up to notVerifiedFrom − 1 outside: a second set is needed. */
    notVerifiedFrom: number;
  };
  secondSet: {
    /** At most this many outside in the second set: accepted; more: not verified. */
    acceptAtMost: number;
  };
  /** Where the thresholds come from, in words. */
  source: string;
  /** What in that source is uncertain (METHODS.md §7.1). */
  caveats: string[];
}

export const ADOPTION_POLICY: AdoptionPolicy = {
  name: "20-sample verification after CLSI EP28-A3c, graded first set",
  version: "2026-12-02",
  valuesPerSet: 20,
  expectedOutsideFraction: 0.05,
  firstSet: { acceptAtMost: 2, notVerifiedFrom: 5 },
  secondSet: { acceptAtMost: 2 },
  source:
    "CLSI EP28-A3c, Defining, Establishing, and Verifying Reference Intervals in the Clinical Laboratory, " +
    "3rd ed. (2010): test 20 healthy local reference individuals; if at most 2 of 20 (10%) fall outside the " +
    "interval, accept it; if 3 or more fall outside, test a second set of 20 and accept when at most 2 of those " +
    "fall outside. Read at second hand in Ozarda, Higgins & Adeli, Clin Chem Lab Med 2019 (METHODS.md §7.1). " +
    "The grading of the first set (3 or 4 outside: a second set; 5 or more: not verified) is this laboratory's " +
    "policy, after secondary texts.",
  caveats: [
    "The full text of CLSI EP28-A3c was not available: the rule is read in a secondary source (a review), and its exact wording is from memory (METHODS.md §7.1).",
    "Rejecting at once with 5 or more of 20 outside is described only by some secondary texts and is uncertain; it is kept as a local policy option, not as EP28-A3c's rule.",
    "The check has little power: if 10%, 15% or 20% of local healthy values truly fall outside, the interval still passes the first set with probability 0.677, 0.405 or 0.206 (METHODS.md §7.1, binomial).",
    "For a one-sided interval the expected fraction beyond the single limit is taken as 5% (a 95th percentile); a limit at another percentile (e.g. the 99th) needs another policy.",
  ],
};
