import { Badge } from "@/components/ui/badge";
import { DECISION_LABELS, DECISION_TONES, type AdoptionDecision } from "./types";

export interface SetView {
  n: number;
  below: number;
  above: number;
  outside: number;
  allowed: number;
  binomial: { expression: string; probability: string; meaning: string }[];
  reasons: string[];
  notes: string[];
  values: number[];
}

function sentence(text: string): string {
  const t = text.trim();
  return t === "" ? t : `${t[0].toUpperCase()}${t.slice(1)}${/[.!?]$/.test(t) ? "" : "."}`;
}

/** One set: the counts, the reasons in words, the binomial reasoning and the values themselves. */
export function SetResult({ title, set, twoSided, testId }: { title: string; set: SetView; twoSided: boolean; testId: string }) {
  return (
    <section className="space-y-3" data-testid={testId} aria-label={title}>
      <h3 className="text-sm font-semibold text-ink-900">{title}</h3>
      <dl className="grid grid-cols-2 gap-2 sm:grid-cols-4">
        {[
          ["Values", String(set.n)],
          ["Outside", `${set.outside} of ${set.n}`],
          ...(twoSided ? [["Below / above", `${set.below} / ${set.above}`]] : []),
          ["Allowed outside", `at most ${set.allowed}`],
        ].map(([k, v]) => (
          <div key={k} className="rounded-md bg-ink-50 px-3 py-2">
            <dt className="text-xs uppercase tracking-wide text-ink-500">{k}</dt>
            <dd className="font-semibold tabular-nums text-ink-900">{v}</dd>
          </div>
        ))}
      </dl>
      <ul className="list-disc space-y-1 pl-5 text-sm text-ink-800">
        {[...set.reasons, ...set.notes].map((r) => (
          <li key={r}>{sentence(r)}</li>
        ))}
      </ul>
      <table className="w-full text-left text-sm">
        <caption className="sr-only">Binomial reasoning for the {title.toLowerCase()}</caption>
        <thead className="text-xs uppercase tracking-wide text-ink-500">
          <tr>
            <th scope="col" className="py-1 pr-3 font-medium">If the interval were right</th>
            <th scope="col" className="py-1 pr-3 font-medium">Probability</th>
            <th scope="col" className="py-1 font-medium">In words</th>
          </tr>
        </thead>
        <tbody>
          {set.binomial.map((b) => (
            <tr key={b.expression} className="border-t border-ink-100 align-top">
              <td className="whitespace-nowrap py-1.5 pr-3 font-mono text-xs">{b.expression}</td>
              <td className="py-1.5 pr-3 font-semibold tabular-nums">{b.probability}</td>
              <td className="py-1.5 text-ink-700">{b.meaning}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <details className="text-sm">
        <summary className="cursor-pointer text-ink-600">The {set.n} values</summary>
        <p className="mt-1 font-mono text-xs text-ink-700">{set.values.join("  ")}</p>
      </details>
    </section>
  );
}

export function DecisionBadge({ decision }: { decision: AdoptionDecision }) {
  return <Badge tone={DECISION_TONES[decision]}>{DECISION_LABELS[decision]}</Badge>;
}
