import Link from "next/link";
import { Badge } from "@/components/ui/badge";
import { SimpleTable } from "@/components/ui/simple-table";
import { LmsPartitionsCurves } from "@/components/versions/lms-partition";
import type { IntervalVersionView } from "./types";

const STATE_TONES: Record<string, "ok" | "neutral" | "warn" | "off" | "brand"> = {
  in_force: "ok",
  awaiting_signoff: "brand",
  draft: "neutral",
  superseded: "off",
  withdrawn: "warn",
};

/**
 * One interval version: its state in words, when it was in force, the limits by partition with
 * their 90% CIs, method and n, and who signed, reviewed or withdrew it. `reviewHref` links lab
 * roles to the version's review page.
 */
export function VersionCard({ version: v, unit, reviewHref }: { version: IntervalVersionView; unit: string; reviewHref?: string }) {
  const span =
    v.effectiveFrom && v.effectiveTo
      ? `In force from ${v.effectiveFrom} to ${v.effectiveTo}`
      : v.effectiveFrom
        ? `In force since ${v.effectiveFrom}`
        : "Never in force";
  return (
    <article className="space-y-3 rounded-lg border border-ink-200 bg-white p-4" data-testid={`version-${v.number}`} aria-labelledby={`version-${v.number}-title`}>
      <header className="flex flex-wrap items-center justify-between gap-2">
        <h2 id={`version-${v.number}-title`} className="flex items-center gap-2">
          Version {v.number} <Badge tone={STATE_TONES[v.state] ?? "neutral"}>{v.stateLabel}</Badge>
        </h2>
        {reviewHref ? <Link href={reviewHref} className="text-sm">Open the version&apos;s review</Link> : null}
      </header>
      <p className="text-sm text-ink-700">
        {span}.
        {v.reviewBy && v.state === "in_force" ? (
          <>
            {" "}
            Review by {v.reviewBy}
            {v.reviewWords ? (
              <>
                {" "}
                <Badge tone={v.overdue ? "warn" : "neutral"}>{v.reviewWords}</Badge>
              </>
            ) : null}
          </>
        ) : null}
      </p>
      <SimpleTable
        caption={`Version ${v.number}: limits by partition (${unit})`}
        head={["Partition", "Limits", "90% CIs of the limits", "Method", "n"]}
        rows={v.partitions.map((p) => [
          p.scope,
          <span key="l" className="whitespace-nowrap tabular-nums">
            <strong>{p.limits}</strong> {unit}
          </span>,
          p.cis ? `${p.cis} ${unit}` : "—",
          p.method,
          p.n.toLocaleString("en"),
        ])}
      />
      <LmsPartitionsCurves partitions={v.partitions.flatMap((p) => (p.curves ? [p.curves] : []))} unit={unit} decimals={v.decimals} />
      <ul className="space-y-0.5 text-sm text-ink-700">
        <li>{v.signedOff ? `Signed off by ${v.signedOff.by}, ${v.signedOff.at}.` : "Not signed off."}</li>
        {v.reviewed ? <li>Last reviewed by {v.reviewed.by}, {v.reviewed.at}: still valid.</li> : null}
        {v.withdrawn ? (
          <li>
            Withdrawn by {v.withdrawn.by}, {v.withdrawn.at}
            {v.withdrawn.reason ? `: ${v.withdrawn.reason}` : ""}.
          </li>
        ) : null}
        {v.note ? <li>Note: {v.note}</li> : null}
      </ul>
    </article>
  );
}
