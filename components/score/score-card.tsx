import type { ScoreItemError, ScoreResult } from "@/lib/scores/schemas";
import { formatIsoDate } from "@/lib/format";
import { METHOD_WORDS } from "@/components/versions/numbers";
import { ageWords } from "@/lib/scoring/lms-curves-view";
import { formatValue } from "@/lib/format";
import { itemNextStep } from "./api";
import { ReferenceChart } from "./reference-chart";
import { FLAG_TONES, FLAG_WORDS, intervalText, partitionWords, percentileText, valueText, zText } from "./words";

export function FlagBadge({ flag, large = false }: { flag: ScoreResult["flag"]; large?: boolean }) {
  return (
    <span
      className={`inline-flex min-w-[2.25rem] items-center justify-center rounded-md border font-semibold tabular-nums ${FLAG_TONES[flag]} ${
        large ? "px-2.5 py-1 text-xl" : "px-1.5 py-0.5 text-sm"
      }`}
      data-testid="flag"
    >
      {flag}
    </span>
  );
}

/** The cautions of one score, each in its full sentence (never a tooltip). */
export function CautionList({ codes, texts }: { codes: string[]; texts: Record<string, string> }) {
  if (codes.length === 0) return null;
  return (
    <ul className="space-y-1.5" data-testid="cautions">
      {codes.map((code) => (
        <li key={code} className="flex gap-2 text-sm text-ink-800" data-caution={code}>
          <span aria-hidden className="mt-1.5 h-1.5 w-1.5 shrink-0 rounded-full bg-bronze-500" />
          <span>{texts[code] ?? code}</span>
        </li>
      ))}
    </ul>
  );
}

/** A value the service could not score: its reason in its place, and what to do next. */
export function ItemErrorNotice({ error, analyte }: { error: ScoreItemError["error"]; analyte: string }) {
  return (
    <div role="alert" className="space-y-0.5 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high" data-testid="item-error">
      <p>
        <span className="font-medium">{analyte}: not scored. </span>
        {error.title ? `${error.title}. ` : ""}
        {error.detail}
      </p>
      <p className="text-ink-700">{itemNextStep(error.type)}</p>
    </div>
  );
}

/**
 * The answer for one value (UX.md, Score): the flag and the value against the interval first,
 * then z and percentile, the chart, the interval's version and dates, and every caution in full.
 */
export function ScoreCard({ result, cautionTexts }: { result: ScoreResult; cautionTexts: Record<string, string> }) {
  const { interval } = result;
  const unit = interval.unit;
  const lms = result.model.kind === "lms" ? result.model : null;
  return (
    <article className="space-y-4 rounded-lg border border-ink-200 bg-white p-4" aria-labelledby="score-card-title" data-testid="score-card">
      <header className="flex flex-wrap items-start gap-3">
        <FlagBadge flag={result.flag} large />
        <div className="min-w-0">
          <h2 id="score-card-title">
            {result.analyte.name} ({result.analyte.code}): {FLAG_WORDS[result.flag].toLowerCase()}
          </h2>
          <p className="text-sm text-ink-700" data-testid="value-against-interval">
            <span className="text-base font-semibold tabular-nums text-ink-900">
              {valueText(result)} {unit}
            </span>{" "}
            against the reference interval{" "}
            <span className="font-semibold tabular-nums text-ink-900">
              {intervalText(interval)} {unit}
            </span>{" "}
            {lms ? (
              <>
                at the exact age of {ageWords(lms.ageYears)}, from the laboratory&apos;s continuous age curves (
                {interval.partition.sex ? `${interval.partition.sex === "F" ? "female" : "male"}, ` : ""}ages {ageWords(lms.ageMin)} to {ageWords(lms.ageMax)}).
              </>
            ) : (
              <>for {partitionWords(interval.partition)}.</>
            )}
          </p>
        </div>
      </header>

      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        <div className="rounded-md bg-ink-50 px-3 py-2">
          <dt className="text-xs font-medium uppercase tracking-wide text-ink-600">z-score</dt>
          <dd className="text-lg font-semibold tabular-nums text-ink-900" data-testid="z">
            {zText(result.z, result.percentileBound)}
          </dd>
        </div>
        <div className="rounded-md bg-ink-50 px-3 py-2">
          <dt className="text-xs font-medium uppercase tracking-wide text-ink-600">Percentile</dt>
          <dd className="text-lg font-semibold tabular-nums text-ink-900" data-testid="percentile">
            {percentileText(result.percentile, result.percentileBound)}
          </dd>
        </div>
        <div className="rounded-md bg-ink-50 px-3 py-2">
          <dt className="text-xs font-medium uppercase tracking-wide text-ink-600">HL7 flag (OBX-8)</dt>
          <dd className="text-lg font-semibold tabular-nums text-ink-900">{result.hl7.obx8 || "—"}</dd>
        </div>
        <div className="rounded-md bg-ink-50 px-3 py-2">
          <dt className="text-xs font-medium uppercase tracking-wide text-ink-600">Age used</dt>
          <dd className="text-lg font-semibold tabular-nums text-ink-900">
            {result.ageYearsUsed === null ? "not given" : lms ? `${result.ageYearsUsed.toFixed(2)} years` : `${result.ageYearsUsed.toFixed(1)} years`}
          </dd>
        </div>
      </dl>

      {lms ? (
        <p className="rounded-md bg-ink-50 px-3 py-2 text-sm text-ink-800" data-testid="lms-at-age">
          At {ageWords(lms.ageYears)} the curves give a median of {formatValue(lms.M, interval.decimals)} {unit}, a coefficient of
          variation S = {formatValue(lms.S, 3)} and a Box-Cox power L = {formatValue(lms.L, 2)}; the limits are the 2.5th and
          97.5th centiles there{interval.low === null || interval.high === null ? " (where the curves give one)" : ""}.
        </p>
      ) : null}

      <ReferenceChart result={result} />

      <p className="text-sm text-ink-700" data-testid="version-line">
        Interval version {interval.version}
        {interval.effectiveFrom ? `, in force since ${formatIsoDate(interval.effectiveFrom)}` : ""}
        {interval.reviewBy ? `, review due ${formatIsoDate(interval.reviewBy)}` : ""}.{" "}
        {interval.method === "indirect"
          ? `Limits estimated indirectly (truncated maximum likelihood) from n = ${interval.n.toLocaleString("en")} routine patient results.`
          : `${METHOD_WORDS[interval.method] ?? interval.method} limits from n = ${interval.n.toLocaleString("en")} reference individuals.`}
        {interval.criticalLow !== null || interval.criticalHigh !== null
          ? ` Critical limits: ${intervalText({ low: interval.criticalLow, high: interval.criticalHigh, decimals: interval.decimals })} ${unit}.`
          : ""}
      </p>

      <section aria-label="Cautions" className="space-y-2 border-t border-ink-100 pt-3">
        <h3 className="text-sm font-semibold text-ink-800">Cautions</h3>
        <CautionList codes={result.cautions} texts={cautionTexts} />
      </section>
    </article>
  );
}
