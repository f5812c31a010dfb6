"use client";

import { useRef, useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { TextField, SelectField } from "@/components/ui/field";
import { ApiError, errorMessage } from "@/components/studies/analysis/api";
import type { ScoreResponse } from "@/lib/scores/schemas";
import { AnalytePicker, analyteLabel } from "./analyte-picker";
import { postScores, scoreNextStep } from "./api";
import { PanelTable } from "./panel-table";
import { ItemErrorNotice, ScoreCard } from "./score-card";
import type { PatientInput, ScoreAnalyte, ValueInput } from "./types";
import { scoreItemsOf } from "./words";

export type Mode = "single" | "panel";

type Outcome =
  | { kind: "idle" }
  | { kind: "loading"; mode: Mode; count: number }
  | { kind: "error"; error: unknown }
  | { kind: "done"; mode: Mode; sent: ValueInput[]; response: ScoreResponse };

const newRow = (n: number, analyte: string | null = null, unit = ""): ValueInput => ({ key: `row${n}`, analyte, value: "", unit });

const SEX_OPTIONS = [
  { value: "", label: "Not given" },
  { value: "F", label: "Female" },
  { value: "M", label: "Male" },
] as const;

/** Field errors before anything is sent: what the service would refuse, said at the field. */
function checkInput(patient: PatientInput, rows: ValueInput[]): Record<string, string> {
  const errors: Record<string, string> = {};
  const age = patient.ageYears.trim().replace(",", ".");
  if (age !== "" && !patient.birthDate) {
    const n = Number(age);
    if (!Number.isFinite(n) || n < 0 || n > 150) errors.ageYears = "Give the age in years as a number from 0 to 150 (decimals allowed).";
  }
  if (patient.birthDate) {
    const collected = patient.collectedOn || new Date().toISOString().slice(0, 10);
    if (patient.birthDate > collected) errors.birthDate = "The birth date is after the collection date: check both.";
  }
  for (const r of rows) {
    if (!r.analyte) errors[`${r.key}-analyte`] = "Choose an analyte from the list.";
    if (!r.value.trim()) errors[`${r.key}-value`] = 'Enter the value (a number, or a censored result such as "<0.5").';
  }
  return errors;
}

/**
 * The score page's form and answers: an analyte search, the value with its unit, and the patient's
 * sex and age or birth date; one value gives the answer card, a panel gives one table for several
 * analytes of the same patient. Calls POST /api/v1/scores, the same route the LIS uses.
 */
export function ScoreWorkbench({
  analytes,
  initialAnalyte,
  initialQuery,
  initialMode = "single",
}: {
  analytes: ScoreAnalyte[];
  initialAnalyte: string | null;
  initialQuery: string;
  initialMode?: Mode;
}) {
  const unitOf = Object.fromEntries(analytes.map((a) => [a.code, a.unit]));
  const [mode, setMode] = useState<Mode>(initialMode);
  const [patient, setPatient] = useState<PatientInput>({ sex: "", ageYears: "", birthDate: "", collectedOn: "" });
  // Row keys are counted per page (not per module) so that the server's and the browser's first render agree.
  const rowCount = useRef(initialMode === "panel" ? 3 : 1);
  const addRow = () => newRow(++rowCount.current);
  const [rows, setRows] = useState<ValueInput[]>(() => {
    const first = newRow(1, initialAnalyte, initialAnalyte ? unitOf[initialAnalyte] : "");
    return initialMode === "panel" ? [first, newRow(2), newRow(3)] : [first];
  });
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [outcome, setOutcome] = useState<Outcome>({ kind: "idle" });
  const active = mode === "single" ? rows.slice(0, 1) : rows;

  const updateRow = (key: string, change: Partial<ValueInput>) =>
    setRows((rs) =>
      rs.map((r) => {
        if (r.key !== key) return r;
        const next = { ...r, ...change };
        // A new analyte brings its own unit, unless another unit was typed on purpose.
        if (change.analyte !== undefined && change.analyte && (!r.unit || r.unit === unitOf[r.analyte ?? ""])) next.unit = unitOf[change.analyte];
        return next;
      }),
    );

  const switchMode = (m: Mode) => {
    setMode(m);
    if (m === "panel" && rows.length < 2) setRows((rs) => [...rs, addRow()]);
    setOutcome({ kind: "idle" });
  };

  const submit = async (e: FormEvent) => {
    e.preventDefault();
    const found = checkInput(patient, active);
    setErrors(found);
    if (Object.keys(found).length > 0) return;
    setOutcome({ kind: "loading", mode, count: active.length });
    try {
      const response = await postScores(scoreItemsOf(patient, active, unitOf));
      setOutcome({ kind: "done", mode, sent: active, response });
    } catch (error) {
      setOutcome({ kind: "error", error });
    }
  };

  const labelOf = (code: string | null) => {
    const a = analytes.find((x) => x.code === code);
    return a ? analyteLabel(a) : (code ?? "—");
  };
  const available = analytes.filter((a) => !a.unavailable).length;

  return (
    <div className="space-y-5">
      <form onSubmit={submit} noValidate aria-label="Score a patient value" className="space-y-4 rounded-lg border border-ink-200 bg-white p-4">
        <div className="flex flex-wrap items-center justify-between gap-3">
          <div role="group" aria-label="What to score" className="inline-flex rounded-md border border-ink-300 p-0.5">
            {(["single", "panel"] as const).map((m) => (
              <button
                key={m}
                type="button"
                aria-pressed={mode === m}
                onClick={() => switchMode(m)}
                className={`rounded px-3 py-1 text-sm font-medium ${mode === m ? "bg-tide-600 text-white" : "text-ink-700 hover:bg-ink-100"}`}
              >
                {m === "single" ? "One value" : "Panel (several analytes)"}
              </button>
            ))}
          </div>
          <p className="text-xs text-ink-600">
            {available} of {analytes.length} analytes have an interval in force.
          </p>
        </div>

        <fieldset className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
          <legend className="mb-2 text-sm font-semibold text-ink-800">Patient{mode === "panel" ? " (entered once for the panel)" : ""}</legend>
          <SelectField
            label="Sex"
            name="sex"
            value={patient.sex}
            options={SEX_OPTIONS}
            onChange={(e) => setPatient({ ...patient, sex: e.target.value as PatientInput["sex"] })}
          />
          <TextField
            label="Age (years)"
            name="ageYears"
            inputMode="decimal"
            value={patient.ageYears}
            disabled={Boolean(patient.birthDate)}
            error={errors.ageYears}
            hint={patient.birthDate ? "The birth date gives the exact age." : "Or give the birth date."}
            onChange={(e) => setPatient({ ...patient, ageYears: e.target.value })}
          />
          <TextField
            label="Birth date"
            name="birthDate"
            type="date"
            value={patient.birthDate}
            error={errors.birthDate}
            hint="Wins over the age in years."
            onChange={(e) => setPatient({ ...patient, birthDate: e.target.value })}
          />
          <TextField
            label="Collected on"
            name="collectedOn"
            type="date"
            value={patient.collectedOn}
            hint="With the birth date; today when left empty."
            onChange={(e) => setPatient({ ...patient, collectedOn: e.target.value })}
          />
        </fieldset>

        <fieldset className="space-y-3">
          <legend className="mb-2 text-sm font-semibold text-ink-800">{mode === "panel" ? "Values" : "Value"}</legend>
          {active.map((row, i) => (
            <div key={row.key} className="grid items-start gap-3 sm:grid-cols-[minmax(0,2fr)_minmax(0,1fr)_minmax(0,1fr)_auto]" data-testid="value-row">
              <AnalytePicker
                analytes={analytes}
                value={row.analyte}
                id={`${row.key}-analyte`}
                label={mode === "panel" ? `Analyte ${i + 1}` : "Analyte"}
                initialQuery={i === 0 && !row.analyte ? initialQuery : ""}
                error={errors[`${row.key}-analyte`]}
                onChange={(code) => updateRow(row.key, { analyte: code })}
              />
              <TextField
                label={mode === "panel" ? `Value ${i + 1}` : "Value"}
                name={`${row.key}-value`}
                inputMode="decimal"
                autoComplete="off"
                value={row.value}
                error={errors[`${row.key}-value`]}
                hint='A number, or "<0.5" as reported.'
                onChange={(e) => updateRow(row.key, { value: e.target.value })}
              />
              <TextField
                label={mode === "panel" ? `Unit ${i + 1}` : "Unit"}
                name={`${row.key}-unit`}
                autoComplete="off"
                value={row.unit}
                hint={row.analyte ? `UCUM; converted to ${unitOf[row.analyte]} when it differs.` : "UCUM, e.g. mmol/L."}
                onChange={(e) => updateRow(row.key, { unit: e.target.value })}
              />
              {mode === "panel" ? (
                <Button
                  type="button"
                  variant="secondary"
                  className="sm:mt-5"
                  disabled={active.length <= 1}
                  aria-label={`Remove row ${i + 1}${row.analyte ? ` (${labelOf(row.analyte)})` : ""}`}
                  onClick={() => setRows((rs) => rs.filter((r) => r.key !== row.key))}
                >
                  Remove
                </Button>
              ) : null}
            </div>
          ))}
          {mode === "panel" ? (
            <Button type="button" variant="secondary" onClick={() => setRows((rs) => [...rs, addRow()])} disabled={rows.length >= 30}>
              Add an analyte
            </Button>
          ) : null}
        </fieldset>

        <div className="flex flex-wrap items-center gap-3 border-t border-ink-100 pt-3">
          <Button type="submit" disabled={outcome.kind === "loading"}>
            {mode === "panel" ? "Score the panel" : "Score"}
          </Button>
          <p className="text-xs text-ink-600">
            Nothing identifying the patient is sent or kept: only the analyte, the value, the sex and the age.
          </p>
        </div>
      </form>

      <div aria-live="polite">
        <Answer outcome={outcome} labelOf={labelOf} />
      </div>
    </div>
  );
}

function Answer({ outcome, labelOf }: { outcome: Outcome; labelOf: (code: string | null) => string }) {
  if (outcome.kind === "idle") {
    return (
      <div className="rounded-lg border border-dashed border-ink-300 bg-white px-4 py-6 text-sm text-ink-600" data-testid="score-empty">
        <p className="font-medium text-ink-900">No score yet.</p>
        <p>
          Choose an analyte, enter the value, the patient&apos;s sex and age, and press Score. The answer shows the flag against
          the reference interval in force, the z-score and percentile among healthy reference individuals, a chart, and the
          cautions that go with the number.
        </p>
      </div>
    );
  }
  if (outcome.kind === "loading") {
    return (
      <div className="animate-pulse space-y-3 rounded-lg border border-ink-200 bg-white p-4" role="status" aria-busy="true" aria-label="Scoring">
        <div className="flex gap-3">
          <div className="h-9 w-10 rounded bg-ink-200" />
          <div className="flex-1 space-y-2">
            <div className="h-4 w-1/2 rounded bg-ink-200" />
            <div className="h-4 w-2/3 rounded bg-ink-100" />
          </div>
        </div>
        {outcome.mode === "single" ? <div className="h-56 rounded bg-ink-100" /> : null}
        {Array.from({ length: outcome.mode === "single" ? 2 : outcome.count + 1 }, (_, i) => (
          <div key={i} className="h-4 rounded bg-ink-100" />
        ))}
      </div>
    );
  }
  if (outcome.kind === "error") {
    const forbidden = outcome.error instanceof ApiError && outcome.error.status === 403;
    return (
      <div role="alert" className="space-y-0.5 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high" data-testid="score-error">
        <p>
          <span className="font-medium">{forbidden ? "Not available to your account: " : "Not scored: "}</span>
          {errorMessage(outcome.error)}
        </p>
        <p className="text-ink-700">{scoreNextStep(outcome.error)}</p>
      </div>
    );
  }
  const { response, sent } = outcome;
  if (outcome.mode === "single") {
    const result = response.results[0];
    if (!result) return null;
    if ("error" in result) return <ItemErrorNotice error={result.error} analyte={labelOf(sent[0]?.analyte ?? null)} />;
    return <ScoreCard result={result} cautionTexts={response.cautionTexts} />;
  }
  return (
    <PanelTable
      cautionTexts={response.cautionTexts}
      rows={response.results.map((result, i) => ({ result, label: labelOf(sent[i]?.analyte ?? null), code: sent[i]?.analyte ?? "" }))}
    />
  );
}
