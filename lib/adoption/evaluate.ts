/**
 * An adoption check decided by the laboratory's policy: each set of values counted against the
 * interval by lib/stats/verification.ts (verifyInterval), the decision, and the binomial
 * reasoning in numbers and in words. Pure: no I/O.
 */
import binomial from "@stdlib/stats-base-dists-binomial";
import { verifyInterval, type VerificationResult } from "@/lib/stats/verification";
import type { AdoptionPolicy } from "./policy";

export type AdoptionDecision = "accepted" | "second_set_needed" | "not_verified";

/** One probability of the reasoning: the event, its value if the interval were right, and what it means. */
export interface BinomialStatement {
  expression: string;
  probability: number;
  meaning: string;
}

export interface SetResult {
  n: number;
  below: number;
  above: number;
  outside: number;
  allowed: number;
  probabilities: VerificationResult["probabilities"];
  /** The binomial reasoning, each probability with its expression and meaning. */
  binomial: BinomialStatement[];
  reasons: string[];
  notes: string[];
}

export interface AdoptionEvaluation {
  decision: AdoptionDecision;
  first: SetResult;
  second: SetResult | null;
}

/** A probability for people: three significant digits, in plain decimals. */
export function formatProbability(p: number): string {
  if (p === 0) return "0";
  if (p >= 0.001) return String(+p.toPrecision(3));
  return p.toPrecision(3).replace(/e-(\d+)$/, " × 10^-$1");
}

const DECISION_OF = { verified: "accepted", "second-set-needed": "second_set_needed", "not-verified": "not_verified" } as const;

function setResult(r: VerificationResult, statements: BinomialStatement[]): SetResult {
  return {
    n: r.n,
    below: r.below,
    above: r.above,
    outside: r.outside,
    allowed: r.allowedOutside,
    probabilities: r.probabilities,
    binomial: statements,
    reasons: r.reasons,
    notes: r.notes,
  };
}

function statements(r: VerificationResult, policy: AdoptionPolicy, which: "first" | "second"): BinomialStatement[] {
  const n = r.n;
  const p = policy.expectedOutsideFraction;
  const given = `n = ${n}, p = ${p}`;
  const pct = `${+(100 * p).toFixed(4)}%`;
  const out: BinomialStatement[] = [
    {
      expression: `P(X ≤ ${r.allowedOutside} | ${given})`,
      probability: 1 - r.probabilities.failIfIntervalRight,
      meaning:
        `If the interval were right for this population, each healthy value would fall outside it with probability ${p} ` +
        `(${pct}), so the number outside among ${n} would follow Binomial(${n}, ${p}); ${r.allowedOutside} or fewer ` +
        `outside, which ${which === "first" ? "accepts at once" : "accepts on the second set"}, would then happen ` +
        `${formatProbability(1 - r.probabilities.failIfIntervalRight)} of the time.`,
    },
  ];
  if (r.outside > r.allowedOutside) {
    out.push({
      expression: `P(X ≥ ${r.outside} | ${given})`,
      probability: r.probabilities.atLeast,
      meaning:
        `${r.outside} or more of ${n} outside would happen with probability ${formatProbability(r.probabilities.atLeast)} ` +
        "if the interval were right: the smaller this is, the less the interval seems to fit the local population.",
    });
  }
  if (r.probabilities.rejectIfIntervalRight !== null) {
    out.push({
      expression: `P(X ≥ ${policy.firstSet.notVerifiedFrom} | ${given})`,
      probability: r.probabilities.rejectIfIntervalRight,
      meaning:
        `A right interval would be refused at once (${policy.firstSet.notVerifiedFrom} or more outside in the first set) ` +
        `with probability ${formatProbability(r.probabilities.rejectIfIntervalRight)}.`,
    });
  }
  if (which === "second") {
    const failOnce = 1 - binomial.cdf(policy.firstSet.acceptAtMost, n, p);
    const failBoth = failOnce * (1 - binomial.cdf(policy.secondSet.acceptAtMost, n, p));
    out.push({
      expression: `P(X₁ > ${policy.firstSet.acceptAtMost}) · P(X₂ > ${policy.secondSet.acceptAtMost} | ${given})`,
      probability: failBoth,
      meaning:
        `A right interval would fail both sets with probability about ${formatProbability(failBoth)} ` +
        `(${formatProbability(failOnce)} for each set, the sets independent).`,
    });
  }
  return out;
}

/**
 * Decides an adoption check: the first set alone (accepted, a second set needed, or not
 * verified at once), or with the second set (accepted or not verified).
 *
 * @see CLSI EP28-A3c (2010), 20-sample verification; METHODS.md §7.1 for the binomial reasoning.
 * @throws StatsInputError (from verifyInterval) for non-finite values or limits in the wrong order
 */
export function evaluateAdoption({
  policy,
  lower,
  upper,
  first,
  second,
}: {
  policy: AdoptionPolicy;
  lower: number | null;
  upper: number | null;
  first: readonly number[];
  second?: readonly number[] | null;
}): AdoptionEvaluation {
  const interval = { low: lower, high: upper };
  // With exactly valuesPerSet values, ⌊n · allowed/n⌋ = allowed (verifyInterval's epsilon keeps it exact).
  const fraction = (allowed: number) => allowed / policy.valuesPerSet;
  const common = { expectedOutsideFraction: policy.expectedOutsideFraction };
  const r1 = verifyInterval(first, interval, {
    ...common,
    maxOutsideFraction: fraction(policy.firstSet.acceptAtMost),
    notVerifiedFrom: policy.firstSet.notVerifiedFrom,
  });
  const firstResult = setResult(r1, statements(r1, policy, "first"));
  if (!second || r1.verdict !== "second-set-needed") {
    return { decision: DECISION_OF[r1.verdict], first: firstResult, second: null };
  }
  const r2 = verifyInterval(second, interval, {
    ...common,
    maxOutsideFraction: fraction(policy.secondSet.acceptAtMost),
    secondSet: true,
  });
  return { decision: DECISION_OF[r2.verdict], first: firstResult, second: setResult(r2, statements(r2, policy, "second")) };
}
