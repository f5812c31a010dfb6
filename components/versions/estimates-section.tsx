import { StudySection } from "@/components/studies/study-section";
import { SimpleTable } from "@/components/ui/simple-table";
import type { VersionReviewView as VersionReview } from "./types";
import { scopeLabel } from "@/lib/versions/comparison";
import { EstimateCharts } from "./estimate-charts";
import { lmsScopeLabel } from "@/lib/scoring/lms-curves-view";
import type { IndirectEstimateDocument } from "@/lib/studies/indirect-estimates";
import { IndirectEstimateBlock } from "./indirect-estimate-block";
import { ciText, fixed, METHOD_WORDS } from "./numbers";

const METHODS = ["nonparametric", "parametric", "robust"] as const;

/** For each partition, the methods side by side with their 90% CIs; the one chosen and the one recommended said in words. */
export function EstimatesSection({ review, step }: { review: VersionReview; step: number }) {
  const { version, estimates, analyte } = review;
  const d = analyte.decimals;
  return (
    <StudySection id="estimates" step={step} title="Estimates" done="Each partition's limits by every method, with 90% confidence intervals.">
      {version.partitions.map((p, i) => {
        const estimate = estimates[i];
        const label = scopeLabel(p);
        if (p.method === "lms") {
          // LMS curves: no methods side by side; the curves and their limits by age are under Partitions.
          const edf = (estimate?.document as unknown as { edf?: { L?: number; M?: number; S?: number } } | undefined)?.edf;
          return (
            <p key={p.id} className="text-sm text-ink-700" data-testid="estimate-block">
              <strong>{lmsScopeLabel(p) ?? label}</strong> · n = {p.n}: {METHOD_WORDS.lms}, fitted by penalised likelihood
              {edf && edf.L !== undefined && edf.M !== undefined && edf.S !== undefined
                ? ` (effective degrees of freedom L ${fixed(edf.L, 1)}, M ${fixed(edf.M, 1)}, S ${fixed(edf.S, 1)})`
                : ""}
              . The curves and the limits at each age are shown under Partitions.
            </p>
          );
        }
        if (!estimate) {
          return (
            <p key={p.id} className="text-sm text-ink-700">
              {label}: {METHOD_WORDS[p.method] ?? p.method} limits {fixed(p.low, d)} to {fixed(p.high, d)}; no estimate of a study behind them.
            </p>
          );
        }
        if (p.method === "indirect") {
          return (
            <IndirectEstimateBlock
              key={p.id}
              label={label}
              document={estimate.document as unknown as IndirectEstimateDocument}
              limits={{ lower: p.low, upper: p.high, lowerCi: p.lowCi, upperCi: p.highCi }}
              unit={analyte.unit}
              decimals={d}
            />
          );
        }
        const doc = estimate.document;
        return (
          <div key={p.id} className="space-y-2" data-testid="estimate-block">
            <h3 className="text-sm font-semibold text-ink-800">
              {label} · n = {estimate.n}
            </h3>
            <SimpleTable
              caption={`Methods side by side for ${label}`}
              head={["Method", `Lower limit (90% CI)`, `Upper limit (90% CI)`, "In this version"]}
              rows={METHODS.map((m) => {
                const s = doc[m];
                const words = [p.method === m ? "Chosen" : null, doc.recommended === m ? "recommended" : null].filter(Boolean).join(", ");
                return [
                  METHOD_WORDS[m],
                  `${fixed(s?.lower, d)} ${ciText(s?.lowerCi, d)}`,
                  `${fixed(s?.upper, d)} ${ciText(s?.upperCi, d)}`,
                  words ? <strong key="w">{words[0].toUpperCase() + words.slice(1)}</strong> : "",
                ];
              })}
            />
            {review.study ? (
              <EstimateCharts
                studyId={review.study.id}
                estimateId={estimate.id}
                limits={{ lower: p.low, upper: p.high, lowerCi: p.lowCi, upperCi: p.highCi }}
                method={`${(METHOD_WORDS[p.method] ?? p.method).toLowerCase()} (this version's)`}
                unit={analyte.unit}
                decimals={d}
              />
            ) : null}
          </div>
        );
      })}
      <p className="text-xs text-ink-500">Values in {analyte.unit}. The charts draw the limits of this version over the values each estimate was made from.</p>
    </StudySection>
  );
}

/** Every warning the estimates behind the version gave, in full. */
export function WarningsSection({ review, step }: { review: VersionReview; step: number }) {
  const warnings = review.version.partitions.flatMap((p, i) => (review.estimates[i]?.document.warnings ?? []).map((w) => `${scopeLabel(p)}: ${w}`));
  return (
    <StudySection id="warnings" step={step} title="Warnings" done={warnings.length === 0 ? "The estimates gave no warning." : `${warnings.length} warning${warnings.length === 1 ? "" : "s"}.`}>
      {warnings.length > 0 ? (
        <ul className="list-disc space-y-1 pl-5 text-sm text-signal-warn" data-testid="warnings">
          {warnings.map((w, i) => (
            <li key={i}>{w}</li>
          ))}
        </ul>
      ) : null}
    </StudySection>
  );
}
