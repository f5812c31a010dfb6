/**
 * The shapes of the study API answers that the Screening, Partitions, Estimates and Draft
 * sections read (the study API contracts, /work/shared contracts; DESIGN.md's API). Plain data:
 * the components import these, never the route handlers or the database layer.
 */
import type { OutlierEvidence } from "@/lib/stats/outliers";
import type {
  CensoredSection,
  Exclusion,
  NonparametricSection,
  NormalitySection,
  ParametricSection,
  Provenance,
  ScreeningSection,
} from "@/lib/stats/estimate";
import type { LimitsWithCi, RecommendedMethod } from "@/lib/stats/method-advice";

export type Sex = "F" | "M";

/** Who a partition holds: sex and a half-open age range [ageFrom, ageTo) in years; omitted = no restriction. */
export interface Partition {
  sex?: Sex;
  ageFrom?: number;
  ageTo?: number;
}

export interface PartitionPlan {
  sex: boolean;
  ageBands: [number, number][] | null;
}

/** What the study page passes each section (plain, serialisable). */
export interface SectionStudy {
  id: string;
  status: "open" | "closed" | string;
  title?: string;
  partitionPlan?: PartitionPlan | null;
  donorResultCount?: number;
}

export interface SectionAnalyte {
  code: string;
  name?: string;
  unit: string;
  decimals: number;
  criticalLow?: number | null;
  criticalHigh?: number | null;
}

export interface SectionProps {
  study: SectionStudy;
  analyte: SectionAnalyte;
}

// Screening

export type ScreenRule = "horn" | "dixon" | "tukey";

export interface OutlierDecision {
  id: string;
  donorResultId: number;
  decision: "exclude" | "keep";
  rule: string;
  reason: string;
  evidence?: unknown;
  exclusionId: string | null;
  decidedAt: string;
  undoneAt?: string | null;
}

export interface ScreenProposal {
  donorResultId: number;
  donorCode: string;
  sex: Sex;
  ageYears: number;
  value: number;
  explanation: string;
  evidence: OutlierEvidence;
  decision: null | { id: string; decision: "exclude" | "keep"; reason: string; decidedAt: string };
}

export interface ScreenResult {
  rule: ScreenRule;
  ruleApplied: ScreenRule | null;
  partition: Partition;
  n: number;
  proposals: ScreenProposal[];
}

export interface ExclusionItem {
  id: string;
  donorResultId: number;
  donorCode: string;
  sex: Sex;
  ageYears: number;
  value: number;
  source: "manual" | "outlier";
  rule: string | null;
  reason: string;
  createdAt: string;
  createdBy: { id: string; name: string } | null;
  undoneAt: string | null;
}

export interface DonorResultItem {
  id: number;
  donorCode: string;
  sex: Sex;
  ageYears: number;
  value: number;
  excluded?: boolean;
}

// Partitions

export interface AssessmentGroup {
  label: string;
  partition: Partition;
  n: number;
  mean: number | null;
  sd: number | null;
  median: number | null;
}

export interface AssessmentComparison {
  between: [string, string];
  /** Null when the test could not run (see `problems`). */
  harrisBoyd: {
    verdict: "partition" | "combine";
    z?: number;
    zCritical?: number;
    sdRatio?: number;
    sdRatioLimit?: number;
    reasons?: string[];
    [key: string]: unknown;
  } | null;
  lahti: {
    verdict: "partition" | "combine" | "marginal";
    combinedLimits?: { lower: number; upper: number };
    subgroups?: { label: string; n: number | null; belowLowerPercent: number; aboveUpperPercent: number }[];
    reasons?: string[];
    [key: string]: unknown;
  } | null;
  verdict?: "partition" | "combine" | "undecided";
  problems?: string[];
}

export interface PartitionAssessment {
  id: string;
  by: "sex" | "age";
  bands: [number, number][] | null;
  sex: Sex | null;
  groups: AssessmentGroup[];
  comparisons: AssessmentComparison[];
  verdict: "partition" | "combine" | "undecided";
  summary: string;
  warnings?: string[];
  createdAt?: string;
}

export interface PartitionPlanAnswer {
  partitionPlan: PartitionPlan | null;
  partitions: Partition[];
}

// Estimates

export type EstimateMethod = RecommendedMethod;
export type OutlierOptionValue = "none" | "horn" | "dixon" | "tukey";
export type TransformOptionValue = "auto" | "none" | "ln" | "box-cox";

/** The estimate document as stored, plus what the API adds. */
export interface EstimateDocument {
  id: string;
  studyId: string;
  partition: Partition;
  createdAt: string;
  n: number;
  excluded: Exclusion[];
  nonparametric: NonparametricSection;
  parametric: ParametricSection;
  robust: LimitsWithCi;
  normality: NormalitySection;
  recommended: EstimateMethod | null;
  warnings: string[];
  proposed: Exclusion[];
  screening: ScreeningSection;
  provenance: Provenance;
  censored: CensoredSection;
}

export interface EstimateListItem {
  id: string;
  partition: Partition;
  options: { outliers?: OutlierOptionValue; transform?: TransformOptionValue; seed?: number };
  n: number;
  createdAt: string;
  recommended: EstimateMethod | null;
  nonparametric: NonparametricSection;
  parametric: ParametricSection;
  robust: LimitsWithCi;
  warnings: string[];
}

/** GET /api/v1/studies/{id}/estimates/{estimateId}/chart-data */
export interface EstimateChartData {
  estimateId: string;
  partition: Partition;
  /** Measured values charted (censored ones cannot be placed on a value axis). */
  n: number;
  censored: { below: number; above: number };
  scale: { transform: "none" | "ln" | "box-cox"; lambda: number | null };
  histogram: {
    rule: "freedman-diaconis" | "sturges";
    binWidth: number;
    bins: { lower: number; upper: number; count: number; expected: number }[];
    curve: { x: number; y: number }[];
  } | null;
  qq: {
    points: { theoretical: number; sample: number; rank: number }[];
    line: { intercept: number; slope: number };
    thinned: boolean;
  } | null;
}

// Interval versions

export interface VersionPartition {
  id: string;
  position: number;
  sex: Sex | null;
  ageFrom: number | null;
  ageTo: number | null;
  ageFromDays?: number | null;
  ageToDays?: number | null;
  low: number | null;
  high: number | null;
  lowCi: [number, number] | null;
  highCi: [number, number] | null;
  method: EstimateMethod;
  n: number;
  model: { kind: string; transform?: string; lambda?: number | null; mean?: number; sd?: number; n?: number };
  estimateId: string | null;
}

export interface IntervalVersion {
  id: string;
  number: number;
  state: string;
  analyte: { code: string; name: string };
  studyId: string | null;
  unit: string;
  decimals: number;
  criticalLow: number | null;
  criticalHigh: number | null;
  note: string | null;
  createdAt: string;
  createdBy: { id: string; name: string } | null;
  partitions: VersionPartition[];
}

export type LimitsLike = LimitsWithCi;
