import { StudySection } from "@/components/studies/study-section";
import { SimpleTable } from "@/components/ui/simple-table";
import type { ComparisonAnswer } from "@/lib/versions/comparison";
import { recentScoresSentences, transitionsSentence } from "@/lib/versions/recent-scores";
import { limitsText } from "./numbers";

const FLAG_WORDS: Record<string, string> = { L: "low", N: "normal", H: "high" };

function transitionsText(transitions: { from: string | null; to: string; count: number }[]): string {
  if (transitions.length === 0) return "none";
  return transitions.map((t) => `${t.count} ${t.from ? FLAG_WORDS[t.from] : "no interval"} → ${FLAG_WORDS[t.to]}`).join(", ");
}

/** What the version changes against the one in force: limits side by side and donors whose flag would change. */
export function ComparisonSection({
  comparison,
  decimals,
  step,
  routine = false,
}: {
  comparison: ComparisonAnswer<{ number: number }>;
  decimals: number;
  step: number;
  /** The study behind the version holds routine patient results (an indirect study), not donors. */
  routine?: boolean;
}) {
  const people = routine ? "routine results" : "donors";
  const { inForce, donorFlagChanges: changes } = comparison;
  const code = comparison.version.analyte.code;
  const oldName = inForce ? `Version ${inForce.number}` : null;
  const done = inForce
    ? `Compared with version ${inForce.number} of ${code}, ${comparison.basis === "in_force" ? "in force now" : "the version in force before this one"}.`
    : comparison.basis === "in_force"
      ? `No version of ${code} is in force: this one would be the first.`
      : `No version of ${code} was in force before this one.`;
  const changedWords = inForce
    ? `${changes.changed.toLocaleString("en")} of ${changes.total.toLocaleString("en")} ${people} in the study (without exclusions in effect) would be flagged differently under the new limits.`
    : `${changes.total.toLocaleString("en")} ${people} in the study (without exclusions in effect) fall in its partitions; there is nothing to change from.`;
  const byPartition = new Map(changes.byPartition.map((p) => [p.partition.label, p]));
  const recent = comparison.recentScores;
  const recentByPartition = new Map(recent.byPartition.map((p) => [p.partition.label, p]));
  return (
    <StudySection id="changes" step={step} title="What changes" done={done} next={<span data-testid="flag-changes">{changedWords}</span>}>
      <SimpleTable
        caption={`Limits of this version beside ${oldName ?? "no version"}, donor flag changes and recent patient score flag changes per partition`}
        testId="comparison-table"
        head={[
          "Partition",
          oldName ? `${oldName} (${comparison.version.unit})` : "In force",
          `This version (${comparison.version.unit})`,
          routine ? "Routine results" : "Donors",
          routine ? "Result flag changes" : "Donor flag changes",
          `Scores, last ${recent.days} days`,
          "Score flag changes",
        ]}
        rows={comparison.partitions.map((p) => {
          const c = byPartition.get(p.partition.label);
          const r = recentByPartition.get(p.partition.label);
          return [
            p.partition.label,
            p.old ? limitsText(p.old, decimals) : inForce ? "no partition of this scope" : "—",
            <strong key="new">{limitsText(p.new, decimals)}</strong>,
            (c?.total ?? 0).toLocaleString("en"),
            inForce ? `${c?.changed ?? 0}: ${transitionsText(c?.transitions ?? [])}` : "—",
            (r?.total ?? 0).toLocaleString("en"),
            r && r.total > 0 ? `${r.changed.toLocaleString("en")}: ${transitionsSentence(r.transitions)}` : "—",
          ];
        })}
      />
      {comparison.removedPartitions.length > 0 ? (
        <p className="text-sm text-ink-700" data-testid="removed-partitions">
          Partitions of {oldName} that this version does not keep as such:{" "}
          {comparison.removedPartitions.map((p) => `${p.partition.label} (${limitsText(p.old, decimals)})`).join("; ")}. Each donor is
          compared with the partition of {oldName} that covers them.
        </p>
      ) : null}
      {changes.notCovered > 0 ? (
        <p className="text-sm text-signal-warn">
          {changes.notCovered} donors fall in no partition of this version and are not counted.
        </p>
      ) : null}
      <div className="space-y-1 text-sm text-ink-800" data-testid="recent-score-changes">
        {recentScoresSentences(recent).map((sentence) => (
          <p key={sentence}>{sentence}</p>
        ))}
        {recent.unmappedPartitions.length > 0 ? (
          <p className="text-xs text-ink-500">
            Not re-flagged:{" "}
            {recent.unmappedPartitions.map((u) => `${u.count.toLocaleString("en")} scored in ${u.partition ? u.partition.label : "a partition no longer on record"}`).join("; ")}.
            The score log keeps the partition a score was made in, not the patient&apos;s sex or age, so such a score cannot be placed
            in a narrower partition.
          </p>
        ) : null}
      </div>
      <p className="text-xs text-ink-500">
        Flags: low below the lower limit, high above the upper, normal within (limits inclusive); critical low and high beyond this
        version&apos;s critical limits. Donors are placed by sex and age as scoring places a patient. Recent scores are the patient
        values scored in the last {recent.days} days against whatever version was in force then, each flagged again with this
        version&apos;s partition that covers the partition it was scored in.
      </p>
    </StudySection>
  );
}
