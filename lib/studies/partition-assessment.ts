import { mean, median, sampleSd } from "@/lib/stats/descriptive";
import { harrisBoyd, type HarrisBoydResult } from "@/lib/stats/harris-boyd";
import { lahti, type LahtiResult } from "@/lib/stats/lahti";
import { StatsInputError } from "@/lib/stats/validate";
import type { PartitionAssessmentInput } from "./partition-input";
import { inPartition, partitionLabel, type Partition } from "./partitions";

export type Verdict = "partition" | "combine" | "undecided";

export interface AssessedGroup {
  label: string;
  partition: Partition;
  n: number;
  mean: number | null;
  sd: number | null;
  median: number | null;
}

export interface PartitionComparison {
  between: [string, string];
  /** The engine's Harris-Boyd result; null when it could not run (see `problems`). */
  harrisBoyd: HarrisBoydResult | null;
  /** The engine's Lahti result (empirical from 39 values in all, else gaussian); null when it could not run. */
  lahti: LahtiResult | null;
  verdict: Verdict;
  problems: string[];
}

export interface PartitionAssessmentResult {
  by: "sex" | "age";
  bands: [number, number][] | null;
  sex: "F" | "M" | null;
  /** The scale the numbers are computed on. */
  scale: "raw";
  groups: AssessedGroup[];
  comparisons: PartitionComparison[];
  verdict: Verdict;
  summary: string;
  warnings: string[];
  /** Measured donor results assessed, censored ones left out, and those in no group. */
  counts: { assessed: number; censored: number; outsideGroups: number };
}

interface DonorValue {
  sex: string;
  ageYears: number;
  value: number;
  censoringSide: "below" | "above" | null;
}

/** Lahti's empirical limits need 39 pooled values (lib/stats/lahti.ts); below that, the gaussian model. */
const LAHTI_EMPIRICAL_MIN = 39;

function groupsOf(input: PartitionAssessmentInput): Partition[] {
  if (input.by === "sex") return [{ sex: "F" }, { sex: "M" }];
  return input.bands.map(([ageFrom, ageTo]) => (input.sex ? { sex: input.sex, ageFrom, ageTo } : { ageFrom, ageTo }));
}

function attempt<T>(run: () => T, problems: string[], method: string): T | null {
  try {
    return run();
  } catch (err) {
    if (err instanceof StatsInputError) {
      problems.push(`${method} could not be computed: ${err.message}.`);
      return null;
    }
    throw err;
  }
}

function verdictOf(hb: HarrisBoydResult | null, la: LahtiResult | null): Verdict {
  if (hb && la && hb.verdict === la.verdict) return hb.verdict;
  return "undecided";
}

function sentence(c: PartitionComparison): string {
  const [a, b] = c.between;
  if (c.verdict === "partition") return `Harris-Boyd and Lahti both favour separate intervals for ${a} and ${b}.`;
  if (c.verdict === "combine") return `Harris-Boyd and Lahti both find ${a} and ${b} close enough for one interval.`;
  if (!c.harrisBoyd || !c.lahti) return `${a} against ${b}: not enough values to decide (${c.problems.join(" ")})`;
  return (
    `${a} against ${b}: Harris-Boyd says "${c.harrisBoyd.verdict}", Lahti says "${c.lahti.verdict}"; ` +
    "the choice rests on judgement and clinical context."
  );
}

/**
 * Harris-Boyd and Lahti, side by side, for sex (F against M) or for adjacent age bands
 * (optionally within one sex), over the donor results given (the caller leaves out those with
 * an exclusion in effect). Censored results are left out and counted in a warning. The verdict
 * of a comparison is the methods' shared verdict, "undecided" when they differ, Lahti is
 * marginal, or one could not run; the overall verdict is "partition" when any comparison says
 * so, "combine" when all do, "undecided" otherwise. Raw scale.
 * @see Harris EK, Boyd JC. Clin Chem 1990;36:265–270 (lib/stats/harris-boyd.ts); Lahti A et al.
 *   Clin Chem 2002;48:338–352 and 2004;50:891–900 (lib/stats/lahti.ts).
 */
export function assessPartitions(rows: readonly DonorValue[], input: PartitionAssessmentInput): PartitionAssessmentResult {
  const partitions = groupsOf(input);
  const values: number[][] = partitions.map(() => []);
  let censored = 0;
  let outsideGroups = 0;
  let assessed = 0;
  for (const r of rows) {
    if (input.by === "age" && input.sex && r.sex !== input.sex) continue;
    if (r.censoringSide !== null) {
      censored++;
      continue;
    }
    const g = partitions.findIndex((p) => inPartition(p, r));
    if (g < 0) {
      outsideGroups++;
      continue;
    }
    values[g].push(r.value);
    assessed++;
  }

  const groups: AssessedGroup[] = partitions.map((partition, i) => {
    const v = values[i];
    return {
      label: partitionLabel(partition),
      partition,
      n: v.length,
      mean: v.length > 0 ? mean(v) : null,
      sd: v.length > 1 ? sampleSd(v) : null,
      median: v.length > 0 ? median(v) : null,
    };
  });

  const comparisons: PartitionComparison[] = [];
  for (let i = 0; i + 1 < groups.length; i++) {
    const [a, b] = [groups[i], groups[i + 1]];
    const problems: string[] = [];
    const hb = attempt(() => harrisBoyd(values[i], values[i + 1]), problems, "Harris-Boyd");
    const pooled = values[i].length + values[i + 1].length;
    const la = attempt(
      () =>
        lahti(
          [
            { label: a.label, values: values[i] },
            { label: b.label, values: values[i + 1] },
          ],
          { method: pooled >= LAHTI_EMPIRICAL_MIN ? "empirical" : "gaussian" },
        ),
      problems,
      "Lahti",
    );
    const comparison: PartitionComparison = { between: [a.label, b.label], harrisBoyd: hb, lahti: la, verdict: verdictOf(hb, la), problems };
    comparisons.push(comparison);
  }

  const verdict: Verdict = comparisons.some((c) => c.verdict === "partition")
    ? "partition"
    : comparisons.every((c) => c.verdict === "combine")
      ? "combine"
      : "undecided";
  const warnings: string[] = [];
  if (censored > 0) {
    warnings.push(`${censored} censored donor result${censored === 1 ? " was" : "s were"} left out: a censored value has no number for the mean and SD.`);
  }
  if (outsideGroups > 0) {
    warnings.push(`${outsideGroups} donor result${outsideGroups === 1 ? " falls" : "s fall"} outside every age band and ${outsideGroups === 1 ? "was" : "were"} left out.`);
  }
  const head =
    verdict === "partition"
      ? "Partitioning is supported."
      : verdict === "combine"
        ? "One interval for all these groups is supported."
        : "The methods do not settle it: choose with judgement.";
  return {
    by: input.by,
    bands: input.by === "age" ? input.bands : null,
    sex: input.by === "age" ? (input.sex ?? null) : null,
    scale: "raw",
    groups,
    comparisons,
    verdict,
    summary: [head, ...comparisons.map(sentence)].join(" "),
    warnings,
    counts: { assessed, censored, outsideGroups },
  };
}
