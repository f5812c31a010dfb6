"use client";

import { useState } from "react";
import useSWR from "swr";
import { CentileChart } from "@/components/charts/centile-chart";
import { WormChart } from "@/components/charts/worm-chart";
import { Button } from "@/components/ui/button";
import { formatValue, formatZ } from "@/lib/format";
import { fetchJson, sendJson, studyApi } from "../analysis/api";
import { AnalysisSection, DoneNotice, EmptyState, ErrorNotice, inputClass, labelClass, Skeleton, tableClass, tdClass, thClass } from "../analysis/feedback";
import type { SectionAnalyte, SectionStudy } from "../analysis/types";
import { ageWords, fitSexWords, isLmsItem, type AgeCurveChart, type AgeCurveDonor, type FitSex, type LmsEstimate, type LmsListItem } from "./types";

/** Donors below which the section says a fit is refused (lib/stats/lms-fit.ts's LMS_MIN_DONORS). */
const MIN_DONORS = 50;

type FitChoice = "both" | "F" | "M" | "separate";

const pct = (v: number) => `${(v * 100).toFixed(1)}%`;

/** The study's LMS fits, newest first, through the estimates list's SWR key (shared with the Draft section). */
export function useLmsFits(studyId: string) {
  const key = `${studyApi(studyId)}/estimates`;
  const swr = useSWR<{ items: (LmsListItem & { options: Record<string, unknown> })[] }>(key, fetchJson);
  const fits = (swr.data?.items ?? []).filter(isLmsItem) as LmsListItem[];
  return { key, swr, fits };
}

/**
 * Step 2 of an age-curve study: fit the LMS centile curves (both sexes together, or each sex),
 * then read the chart, the limits at a table of ages, the advice, the warnings and the
 * diagnostics by age group (coverage and worm plots) of the fit chosen.
 */
export function AgeCurvesPanel({ study, analyte }: { study: SectionStudy; analyte: SectionAnalyte }) {
  const { swr, fits } = useLmsFits(study.id);
  const [choice, setChoice] = useState<FitChoice>("both");
  const [seed, setSeed] = useState("1");
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<unknown>(null);
  const [done, setDone] = useState<string | null>(null);
  const [selected, setSelected] = useState<string | null>(null);
  const shown = selected ?? fits[0]?.id ?? null;
  const open = study.status === "open";
  const donors = study.donorResultCount ?? 0;

  async function fit(event: React.FormEvent) {
    event.preventDefault();
    setPending(true);
    setError(null);
    setDone(null);
    try {
      const sexes: FitSex[] = choice === "separate" ? ["F", "M"] : [choice === "both" ? null : choice];
      let last: LmsEstimate | null = null;
      for (const sex of sexes) {
        last = await sendJson<LmsEstimate>("POST", `${studyApi(study.id)}/estimates`, { method: "lms", sex, seed: Number(seed) });
      }
      await swr.mutate();
      if (last) {
        setSelected(last.id);
        setDone(`Fitted ${sexes.length === 2 ? "the curves of each sex" : `the curves (${fitSexWords(last.sex).toLowerCase()}, n = ${last.n})`}.`);
      }
    } catch (err) {
      setError(err);
    } finally {
      setPending(false);
    }
  }

  const state = {
    done: fits.length > 0 ? `${fits.length} fit${fits.length === 1 ? "" : "s"} of the LMS curves.` : "No curves fitted yet.",
    next:
      donors < MIN_DONORS
        ? `Upload at least ${MIN_DONORS} donors with birth and collection dates (step 1); hundreds across the age range give useful curves.`
        : fits.length > 0
          ? "Read the chart, the advice and the diagnostics; fit each sex if the advice says so; then draft a version (step 3)."
          : "Fit the curves: both sexes together first; the fit says whether the sexes differ.",
  };

  return (
    <AnalysisSection id="age-curves" step={2} title="Age curves" state={state}>
      {open ? (
        <form onSubmit={fit} className="flex flex-wrap items-end gap-3" aria-label="Fit the LMS curves">
          <fieldset className="space-y-1">
            <legend className={labelClass}>Donors</legend>
            <div className="flex flex-wrap gap-3 text-sm">
              {(["both", "F", "M", "separate"] as const).map((c) => (
                <label key={c} className="flex items-center gap-1.5">
                  <input type="radio" name="fit-sex" value={c} checked={choice === c} onChange={() => setChoice(c)} />
                  {c === "separate" ? "Each sex separately" : fitSexWords(c === "both" ? null : c)}
                </label>
              ))}
            </div>
          </fieldset>
          <div className="w-28 space-y-1">
            <label htmlFor="fit-seed" className={labelClass}>
              Seed
            </label>
            <input id="fit-seed" className={inputClass} inputMode="numeric" value={seed} onChange={(e) => setSeed(e.target.value)} />
          </div>
          <Button type="submit" disabled={pending || donors === 0}>
            {pending ? "Fitting…" : "Fit the curves"}
          </Button>
          <p className="basis-full text-xs text-ink-600">
            Penalised likelihood with cubic splines in √age; the smoothing of each curve chosen by GAIC(3). The seed drives the check from other start values and is stored with the fit.
          </p>
        </form>
      ) : null}
      <ErrorNotice error={error} action="Fitting the curves" />
      <DoneNotice>{done}</DoneNotice>
      {swr.error ? <ErrorNotice error={swr.error} action="Loading the fits" /> : null}
      {!swr.data && !swr.error ? <Skeleton lines={2} label="Loading the fits" /> : null}
      {swr.data && fits.length === 0 ? (
        <EmptyState title="No curves yet" testId="age-curves-empty">
          <p>
            {donors < MIN_DONORS
              ? `The study holds ${donors} donor result${donors === 1 ? "" : "s"}; the fit needs at least ${MIN_DONORS}. Upload them under `
              : "Fit the curves above. The donors come from "}
            <a href="#donor-results" className="underline">Donor results</a>.
          </p>
        </EmptyState>
      ) : null}
      {fits.length > 0 ? (
        <div className="overflow-x-auto">
          <table className={tableClass} data-testid="lms-fits">
            <caption className="sr-only">LMS fits of the study, newest first</caption>
            <thead>
              <tr>
                <th scope="col" className={thClass}>Donors</th>
                <th scope="col" className={thClass}>n</th>
                <th scope="col" className={thClass}>Seed</th>
                <th scope="col" className={thClass}>Warnings</th>
                <th scope="col" className={thClass}>Fitted</th>
                <th scope="col" className={thClass}>
                  <span className="sr-only">Show</span>
                </th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-100">
              {fits.map((f) => (
                <tr key={f.id} className={f.id === shown ? "bg-tide-50" : undefined}>
                  <td className={tdClass}>{fitSexWords(f.options.sex)}</td>
                  <td className={tdClass}>{f.n.toLocaleString("en")}</td>
                  <td className={tdClass}>{f.options.seed}</td>
                  <td className={tdClass}>{f.warnings.length === 0 ? "none" : f.warnings.length}</td>
                  <td className={tdClass}>{f.createdAt.slice(0, 16).replace("T", " ")}</td>
                  <td className={tdClass}>
                    <Button type="button" variant="secondary" aria-pressed={f.id === shown} onClick={() => setSelected(f.id)}>
                      {f.id === shown ? "Shown" : "Show"}
                    </Button>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      {shown ? <FitDetail key={shown} studyId={study.id} estimateId={shown} analyte={analyte} /> : null}
    </AnalysisSection>
  );
}

/** One fit: the chart, the limits by age, advice and warnings, and the diagnostics by age group. */
function FitDetail({ studyId, estimateId, analyte }: { studyId: string; estimateId: string; analyte: SectionAnalyte }) {
  const base = `${studyApi(studyId)}/estimates/${estimateId}`;
  const estimate = useSWR<LmsEstimate>(base, fetchJson);
  const chart = useSWR<AgeCurveChart>(`${base}/age-curves`, fetchJson);
  const fmt = (v: number | null) => formatValue(v, analyte.decimals);
  if (estimate.error || chart.error) return <ErrorNotice error={estimate.error ?? chart.error} action="Loading the curves" />;
  if (!estimate.data || !chart.data) return <Skeleton lines={3} chart label="Loading the curves" />;
  const e = estimate.data;
  const c = chart.data;
  return (
    <div className="space-y-5" data-testid="lms-fit-detail">
      <h3 className="text-base font-semibold text-ink-900">
        {fitSexWords(e.sex)}: {e.n.toLocaleString("en")} donors, ages {ageWords(e.ageRange.min)} to {ageWords(e.ageRange.max)}
      </h3>
      <CentileChart curves={c.curves} donors={c.donors.points} n={c.n} thinned={c.donors.thinned} unit={c.unit} decimals={analyte.decimals} />
      <div className="grid gap-5 lg:grid-cols-2">
        <div className="space-y-2">
          <h4 className="text-sm font-semibold text-ink-800">Method advice</h4>
          <ul className="list-disc space-y-1 pl-5 text-sm text-ink-800" data-testid="lms-advice">
            {e.advice.map((a) => (
              <li key={a}>{a}</li>
            ))}
          </ul>
          {e.sexComparison ? (
            <p className="text-sm text-ink-700" data-testid="lms-sex-comparison">
              Mean z against the combined curves: women and girls {formatZ(e.sexComparison.women.meanZ)} (n = {e.sexComparison.women.n}), men and boys{" "}
              {formatZ(e.sexComparison.men.meanZ)} (n = {e.sexComparison.men.n}). {e.sexComparison.harrisBoyd.reasons.join(" ")}
            </p>
          ) : null}
          <h4 className="text-sm font-semibold text-ink-800">Warnings</h4>
          {e.warnings.length === 0 ? (
            <p className="text-sm text-ink-700" data-testid="lms-warnings">None: the diagnostics found no age group where the curves miss the donors.</p>
          ) : (
            <ul className="list-disc space-y-1 pl-5 text-sm text-amber-800" data-testid="lms-warnings">
              {e.warnings.map((w) => (
                <li key={w}>{w}</li>
              ))}
            </ul>
          )}
          <p className="text-xs text-ink-600">
            Effective degrees of freedom: L {e.edf.L.toFixed(1)}, M {e.edf.M.toFixed(1)}, S {e.edf.S.toFixed(1)}. Seed {e.seed}. {e.excluded} donor result
            {e.excluded === 1 ? "" : "s"} of these donors excluded when fitted.
          </p>
        </div>
        <div className="overflow-x-auto">
          <table className={tableClass} data-testid="lms-limits-table">
            <caption className="text-left text-sm font-semibold text-ink-800">Limits at exact ages ({c.unit})</caption>
            <thead>
              <tr>
                <th scope="col" className={thClass}>Age</th>
                <th scope="col" className={thClass}>2.5th centile</th>
                <th scope="col" className={thClass}>Median</th>
                <th scope="col" className={thClass}>97.5th centile</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-100">
              {e.at.map((a, i) => (
                <tr key={a}>
                  <td className={tdClass}>{ageWords(a)}</td>
                  <td className={tdClass}>{fmt(e.lower[i])}</td>
                  <td className={tdClass}>{fmt(e.median[i])}</td>
                  <td className={tdClass}>{fmt(e.upper[i])}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </div>
      <div className="space-y-3" data-testid="lms-diagnostics">
        <h4 className="text-sm font-semibold text-ink-800">Diagnostics by age group</h4>
        <div className="overflow-x-auto">
          <table className={tableClass} data-testid="lms-coverage">
            <caption className="sr-only">Coverage of the centile curves by age group: about 2.5% of donors are expected below and above</caption>
            <thead>
              <tr>
                <th scope="col" className={thClass}>Ages</th>
                <th scope="col" className={thClass}>n</th>
                <th scope="col" className={thClass}>Below 2.5th</th>
                <th scope="col" className={thClass}>Above 97.5th</th>
                <th scope="col" className={thClass}>Mean z</th>
                <th scope="col" className={thClass}>SD of z</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-100">
              {c.diagnostics.groups.map((g) => (
                <tr key={g.ageFrom}>
                  <td className={tdClass}>
                    {ageWords(g.ageFrom)} to {ageWords(g.ageTo)}
                  </td>
                  <td className={tdClass}>{g.n}</td>
                  <td className={tdClass}>{pct(g.below)}</td>
                  <td className={tdClass}>{pct(g.above)}</td>
                  <td className={tdClass}>{formatZ(g.meanZ)}</td>
                  <td className={tdClass}>{formatZ(g.sdZ)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <p className="text-xs text-ink-600">Expected: 2.5% below and 2.5% above in every group, mean z near 0 and SD near 1.</p>
        <div className="grid gap-3 sm:grid-cols-2 xl:grid-cols-3">
          {c.diagnostics.groups.map((g) => (
            <WormChart key={g.ageFrom} title={`${ageWords(g.ageFrom)} to ${ageWords(g.ageTo)} (n = ${g.n})`} points={g.qq} />
          ))}
        </div>
        {c.far.length > 0 ? <FarDonors studyId={studyId} far={c.far} unit={c.unit} fmt={fmt} /> : null}
      </div>
    </div>
  );
}

/**
 * The donors more than 4 SD from the median curve, each with an exclusion by hand: the reason is
 * required and kept with the exclusion; the curves leave the donor out from the next fit on.
 */
function FarDonors({ studyId, far, unit, fmt }: { studyId: string; far: AgeCurveDonor[]; unit: string; fmt: (v: number | null) => string }) {
  const [reason, setReason] = useState("");
  const [excluded, setExcluded] = useState<Set<number>>(new Set());
  const [error, setError] = useState<unknown>(null);
  const [pending, setPending] = useState<number | null>(null);
  const [needReason, setNeedReason] = useState(false);
  async function exclude(d: AgeCurveDonor) {
    setError(null);
    setNeedReason(!reason.trim());
    if (!reason.trim()) return;
    setPending(d.id);
    try {
      await sendJson("POST", `${studyApi(studyId)}/exclusions`, { donorResultIds: [d.id], reason: reason.trim() });
      setExcluded(new Set([...excluded, d.id]));
    } catch (err) {
      setError(err);
    } finally {
      setPending(null);
    }
  }
  return (
    <div className="space-y-2" data-testid="lms-far-donors">
      <h4 className="text-sm font-semibold text-ink-800">Donors more than 4 SD from the median curve</h4>
      <div className="max-w-xl space-y-1">
        <label htmlFor="far-reason" className={labelClass}>
          Reason for an exclusion
        </label>
        <input
          id="far-reason"
          className={inputClass}
          value={reason}
          aria-invalid={needReason ? true : undefined}
          onChange={(e) => setReason(e.target.value)}
          placeholder="e.g. haemolysed on the sample log"
        />
        {needReason ? (
          <p role="alert" className="text-xs text-signal-high">
            Give a reason before you exclude a donor: it is kept with the exclusion.
          </p>
        ) : null}
      </div>
      <ul className="space-y-1 text-sm text-ink-800">
        {far.map((d) => (
          <li key={d.id} className="flex flex-wrap items-center gap-2">
            <span>
              {d.donorCode}: {fmt(d.value)} {unit} at {ageWords(d.age)}, z {formatZ(d.z)}
            </span>
            {excluded.has(d.id) ? (
              <span className="text-ink-600">Excluded: fit again to leave it out of the curves.</span>
            ) : (
              <Button type="button" variant="secondary" disabled={pending !== null} onClick={() => exclude(d)}>
                {pending === d.id ? "Excluding…" : `Exclude donor ${d.donorCode}`}
              </Button>
            )}
          </li>
        ))}
      </ul>
      <ErrorNotice error={error} action="Excluding the donor" />
      <p className="text-xs text-ink-600">Check these results at the source first: a far value may be a healthy child&apos;s. An exclusion keeps its reason and who made it.</p>
    </div>
  );
}
