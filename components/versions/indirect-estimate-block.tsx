import { IndirectChart } from "@/components/charts/indirect-chart";
import { SimpleTable } from "@/components/ui/simple-table";
import type { IndirectEstimateDocument } from "@/lib/studies/indirect-estimates";
import { ciText, fixed, METHOD_WORDS } from "./numbers";

const count = (n: number) => n.toLocaleString("en");

/**
 * The indirect estimate behind one partition, as the director reviews it: the limits beside
 * Bhattacharya's second opinion, the fit, the path from the routine results to the values
 * estimated (each cleaning step with the results it removed), and the chart with this version's
 * limits.
 */
export function IndirectEstimateBlock({
  label,
  document: doc,
  limits,
  unit,
  decimals: d,
}: {
  label: string;
  document: IndirectEstimateDocument;
  limits: { lower: number | null; upper: number | null; lowerCi: [number, number] | null; upperCi: [number, number] | null };
  unit: string;
  decimals: number;
}) {
  return (
    <div className="space-y-2" data-testid="estimate-block">
      <h3 className="text-sm font-semibold text-ink-800">
        {label} · n = {count(doc.n)} · {METHOD_WORDS.indirect}
      </h3>
      <SimpleTable
        caption={`The indirect limits and the second opinion for ${label}`}
        head={["Method", "Lower limit (90% CI)", "Upper limit (90% CI)", "In this version"]}
        rows={[
          ["Truncated maximum likelihood", `${fixed(doc.lower, d)} ${ciText(doc.lowerCi, d)}`, `${fixed(doc.upper, d)} ${ciText(doc.upperCi, d)}`, <strong key="c">Chosen</strong>],
          ["Bhattacharya (second opinion)", fixed(doc.secondOpinion.lower, d), fixed(doc.secondOpinion.upper, d), ""],
        ]}
      />
      <p className="text-sm text-ink-700">
        Non-diseased share {(doc.fraction * 100).toFixed(1)}% · truncation interval {fixed(doc.truncation[0], d)}–{fixed(doc.truncation[1], d)} {unit} · Box-Cox λ{" "}
        {doc.lambda.toFixed(3)} · χ² {doc.chiSquare.toFixed(1)} on {doc.df} df (p = {doc.pValue.toFixed(3)}) · {doc.bootstrap.replicates} bootstrap replicates, seed{" "}
        {doc.bootstrap.seed}
      </p>
      <SimpleTable
        caption={`Cleaning steps for ${label}`}
        testId="indirect-cleaning"
        head={["Step", "What it did", "Removed", "Remaining"]}
        rows={[
          [
            "Routine results",
            doc.cleaning.excluded > 0 ? `in the study, less ${count(doc.cleaning.excluded)} excluded by hand` : "in the study",
            doc.cleaning.excluded > 0 ? count(doc.cleaning.excluded) : "—",
            count(doc.cleaning.results - doc.cleaning.excluded),
          ],
          ...doc.cleaning.steps.map((s) => [s.step, s.description, count(s.removed), count(s.remaining)]),
        ]}
      />
      <IndirectChart bins={doc.histogram} truncation={doc.truncation} fraction={doc.fraction} limits={limits} unit={unit} decimals={d} />
    </div>
  );
}
