import "server-only";
import type { IntervalVersionView } from "@/components/intervals/types";
import { fixed, limitsText, METHOD_WORDS } from "@/components/versions/numbers";
import type { VersionOut } from "@/db/queries/interval-versions";
import { formatDate, formatDateTime } from "@/lib/format";
import { lmsScopeLabel } from "@/lib/scoring/lms-curves-view";
import { patientScopeLabel } from "@/lib/versions/availability";
import { scopeLabel } from "@/lib/versions/comparison";
import { reviewDueWording } from "@/lib/versions/review-due";
import { VERSION_STATE_LABELS } from "@/lib/versions/state-machine";

const ci = (pair: [number, number] | null, decimals: number) => (pair ? `${fixed(pair[0], decimals)}–${fixed(pair[1], decimals)}` : null);

/**
 * An interval version as the register and the history show it: limits with the version's
 * decimals, who signed it off and when, the review date in words against `now`. No donor data:
 * limits, CIs, method and n only.
 */
export function versionView(v: VersionOut, now: Date): IntervalVersionView {
  const approvals = v.signatures.filter((s) => s.meaning === "approved_for_clinical_use");
  const reviews = v.signatures.filter((s) => s.meaning === "reviewed_still_valid");
  const signedOff = approvals.at(-1);
  const reviewed = reviews.at(-1);
  const wording = v.state === "in_force" && v.reviewBy ? reviewDueWording(v.reviewBy, now) : null;
  return {
    id: v.id,
    number: v.number,
    state: v.state,
    stateLabel: VERSION_STATE_LABELS[v.state],
    effectiveFrom: v.effectiveFrom ? formatDate(v.effectiveFrom) : null,
    effectiveTo: v.effectiveTo ? formatDate(v.effectiveTo) : null,
    decimals: v.decimals,
    partitions: v.partitions.map((p) => {
      const low = ci(p.lowCi, v.decimals);
      const high = ci(p.highCi, v.decimals);
      return {
        scope: lmsScopeLabel(p) ?? patientScopeLabel(scopeLabel(p)),
        limits: limitsText({ low: p.low, high: p.high }, v.decimals),
        cis: low || high ? `lower ${low ?? "—"}, upper ${high ?? "—"}` : "",
        method: METHOD_WORDS[p.method] ?? p.method,
        n: p.n,
        curves: p.method === "lms" ? { sex: p.sex, n: p.n, model: p.model } : null,
      };
    }),
    signedOff: signedOff ? { by: signedOff.signer.name, at: formatDateTime(signedOff.at) } : null,
    reviewed: reviewed ? { by: reviewed.signer.name, at: formatDateTime(reviewed.at) } : null,
    reviewBy: v.reviewBy ? formatDate(v.reviewBy) : null,
    reviewWords: wording ? (wording.overdue ? `review ${wording.long}` : wording.long) : null,
    overdue: wording?.overdue ?? false,
    withdrawn: v.withdrawnAt ? { by: v.withdrawnBy?.name ?? "—", at: formatDateTime(v.withdrawnAt), reason: v.withdrawnReason } : null,
    note: v.note,
  };
}
