import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { DecisionBadge, SetResult, type SetView } from "@/components/adoption/check-decision";
import { DraftVersionForm } from "@/components/adoption/draft-version-form";
import { SecondSetForm } from "@/components/adoption/second-set-form";
import { intervalText, SEX_WORDS } from "@/components/adoption/types";
import { PageHeader, Panel } from "@/components/ui/panel";
import { db } from "@/db/client";
import { findAdoptionCheck, type SetOut } from "@/db/queries/adoption-checks";
import { formatProbability } from "@/lib/adoption/evaluate";
import { AppError } from "@/lib/api/errors";
import { requirePageCaller } from "@/lib/auth/session";
import { formatDateTime } from "@/lib/format";
import { draftFromCheckAction, secondSetAction } from "../actions";

export const metadata: Metadata = { title: "Adoption check" };

async function loadCheck(id: string) {
  if (!z.uuid().safeParse(id).success) notFound();
  try {
    return await findAdoptionCheck(db(), { id });
  } catch (err) {
    if (err instanceof AppError && err.code === "not_found") notFound();
    throw err;
  }
}

function setView(set: SetOut): SetView {
  return {
    ...set,
    binomial: set.binomial.map((b) => ({ expression: b.expression, probability: formatProbability(b.probability), meaning: b.meaning })),
  };
}

const VERSION_STATE_WORDS: Record<string, string> = {
  draft: "Draft",
  awaiting_signoff: "Awaiting sign-off",
  in_force: "In force",
  superseded: "Superseded",
  withdrawn: "Withdrawn",
};

/** One adoption check: the decision, the counts and the binomial reasoning, then what comes next. */
export default async function AdoptionCheckPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePageCaller("studies:write");
  const { id } = await params;
  const check = await loadCheck(id);
  const unit = check.analyte.unit;
  const twoSided = check.lower !== null && check.upper !== null;
  const interval = intervalText(check.lower, check.upper, unit);
  const decisionWords =
    check.decision === "accepted"
      ? `The interval ${interval} is verified for the local population${check.second ? " on the second set" : ""}.`
      : check.decision === "second_set_needed"
        ? `${check.first.outside} of 20 fall outside: test 20 more local healthy donors. The interval is accepted if at most ${check.policy.secondSet.acceptAtMost} of those fall outside.`
        : "The interval is not verified for the local population: re-examine the method and the differences between the populations, and consider establishing a local interval with a study.";
  const scoring = twoSided
    ? "The version will have one partition with these limits, no confidence intervals, and the zlog scoring model: z-scores and percentiles from the two limits alone."
    : "The version will have one partition with this single limit; it will score a flag only, with no z-score or percentile, because one limit says nothing of where healthy values centre or how widely they spread.";
  return (
    <>
      <PageHeader
        title={`${check.analyte.code} · ${check.analyte.name}: ${interval}`}
        lead={
          <>
            {check.sex ? SEX_WORDS[check.sex] : "Both sexes"} · source: {check.source} · checked {formatDateTime(check.createdAt)}
            {check.createdBy ? ` by ${check.createdBy.name}` : ""}. <Link href="/adoption-checks">All adoption checks</Link>
          </>
        }
      />
      <div className="grid items-start gap-5 xl:grid-cols-[1fr_24rem]">
        <div className="space-y-5">
          <Panel title={<span className="flex items-center gap-2">Decision <DecisionBadge decision={check.decision} /></span>}>
            <p className="mb-4 text-sm font-medium text-ink-900" data-testid="decision-words">
              {decisionWords}
            </p>
            <div className="space-y-6">
              <SetResult title="First set" set={setView(check.first)} twoSided={twoSided} testId="first-set" />
              {check.second ? <SetResult title="Second set" set={setView(check.second)} twoSided={twoSided} testId="second-set" /> : null}
            </div>
          </Panel>
          <Panel title="The policy applied">
            <p className="text-sm text-ink-800">
              {check.policy.name} (policy of {check.policy.version}): at most {check.policy.firstSet.acceptAtMost} of {check.policy.valuesPerSet} outside
              accepts; {check.policy.firstSet.acceptAtMost + 1}
              {check.policy.firstSet.notVerifiedFrom - 1 === check.policy.firstSet.acceptAtMost + 2 ? " or " : " to "}
              {check.policy.firstSet.notVerifiedFrom - 1} call for a second set of{" "}
              {check.policy.valuesPerSet}, accepted with at most {check.policy.secondSet.acceptAtMost} outside;{" "}
              {check.policy.firstSet.notVerifiedFrom} or more in the first set is not verified.
            </p>
            <p className="mt-2 text-sm text-ink-700">{check.policy.source}</p>
            <ul className="mt-2 list-disc space-y-1 pl-5 text-sm text-ink-600">
              {check.policy.caveats.map((c) => (
                <li key={c}>{c}</li>
              ))}
            </ul>
          </Panel>
        </div>
        <div className="space-y-5">
          {check.decision === "second_set_needed" ? (
            <Panel title="Second set">
              <SecondSetForm action={secondSetAction} checkId={check.id} unit={unit} />
            </Panel>
          ) : null}
          {check.decision === "accepted" ? (
            <Panel title="Draft a version">
              <DraftVersionForm action={draftFromCheckAction} checkId={check.id} analyte={check.analyte.code} scoring={scoring} />
            </Panel>
          ) : null}
          {check.versions.length > 0 ? (
            <Panel title="Versions drafted from this check">
              <ul className="space-y-1 text-sm" data-testid="drafted-versions">
                {check.versions.map((v) => (
                  <li key={v.id}>
                    Version {v.number} of {check.analyte.code} · {VERSION_STATE_WORDS[v.state] ?? v.state}
                  </li>
                ))}
              </ul>
            </Panel>
          ) : null}
        </div>
      </div>
    </>
  );
}
