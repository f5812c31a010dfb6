import "server-only";
import { AppError } from "@/lib/api/errors";
import { screenDonorValues, type DonorScreen, type ScreenProposal } from "@/lib/studies/screen";
import type { ScreenRule } from "@/lib/studies/screening-input";
import { normalPartition, type Partition } from "@/lib/studies/partitions";
import type { Executor } from "../client";
import { recordAuditEvent, type Actor } from "./audit";
import { listIncludedDonorValues } from "./donor-results";
import { listOutlierDecisions } from "./outlier-decisions";
import { findStudy } from "./studies";

export interface ScreenAnswer extends Omit<DonorScreen, "proposals"> {
  partition: Partition;
  proposals: (ScreenProposal & {
    decision: { id: string; decision: "exclude" | "keep"; reason: string; decidedAt: Date } | null;
  })[];
}

/**
 * The engine's outlier screen over a partition's measured donor results without an exclusion
 * in effect, each proposal with the decision in effect on it (or null). Stores nothing but an
 * audit event "study.screened"; allowed on a closed study, which it does not change.
 */
export async function screenStudy(
  executor: Executor,
  { studyId, rule, partition, actor }: { studyId: string; rule: ScreenRule; partition?: Partition; actor: Actor },
): Promise<ScreenAnswer> {
  const study = await findStudy(executor, { id: studyId });
  if (!study) throw new AppError("not_found", `There is no study with the id ${studyId}.`);
  const rows = await listIncludedDonorValues(executor, { studyId, partition });
  const screen = screenDonorValues(rows, rule);
  const ids = screen.proposals.map((p) => p.donorResultId);
  const decisions = ids.length > 0 ? await listOutlierDecisions(executor, { studyId, donorResultIds: ids }) : [];
  const byDonor = new Map(decisions.map((d) => [d.donorResultId, d]));
  const part = normalPartition(partition);
  await recordAuditEvent(executor, {
    actor,
    action: "study.screened",
    entityType: "study",
    entityId: studyId,
    summary: `Ran the ${screen.ruleApplied ?? rule} screen over ${screen.n} donor results of the study "${study.title}": ${screen.proposals.length} proposed`,
    details: { rule, ruleApplied: screen.ruleApplied, partition: part, n: screen.n, proposed: ids },
  });
  return {
    ...screen,
    partition: part,
    proposals: screen.proposals.map((p) => {
      const d = byDonor.get(p.donorResultId);
      return { ...p, decision: d ? { id: d.id, decision: d.decision, reason: d.reason, decidedAt: d.decidedAt } : null };
    }),
  };
}

/**
 * What a screen says of one donor result now, kept with an outlier decision: the proposal's
 * explanation and statistic when the screen proposes it, `proposed: false` otherwise, with the
 * rule that ran, the partition and n.
 */
export async function screenEvidenceOf(
  executor: Executor,
  { studyId, donorResultId, rule, partition }: { studyId: string; donorResultId: number; rule: ScreenRule; partition?: Partition },
): Promise<{ rule: string; evidence: Record<string, unknown> }> {
  const rows = await listIncludedDonorValues(executor, { studyId, partition });
  const screen = screenDonorValues(rows, rule);
  const proposal = screen.proposals.find((p) => p.donorResultId === donorResultId);
  const common = { ruleAsked: rule, ruleApplied: screen.ruleApplied, partition: normalPartition(partition), n: screen.n };
  if (!proposal) return { rule: screen.ruleApplied ?? rule, evidence: { proposed: false, ...common } };
  return {
    rule: screen.ruleApplied ?? rule,
    evidence: { proposed: true, ...common, explanation: proposal.explanation, statistic: proposal.evidence },
  };
}
