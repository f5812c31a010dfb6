"use client";

import { useCallback, useState } from "react";
import { useDropzone } from "react-dropzone";
import { Button } from "@/components/ui/button";
import { ColumnMappingForm } from "./column-mapping";
import { ProgressBar } from "./progress-bar";
import { readProblem } from "./api";
import { nextStepFor, refusalMessage, sendForm, type Progress } from "./upload-request";
import { mappingGap, ROUTINE_COLUMNS, TEMPLATE_COLUMNS, type ColumnMapping, type PendingUploadAnswer, type ProblemAnswer, type UploadColumn, type UploadPreviewAnswer } from "./upload-types";
import { ValidationReport } from "./validation-report";
import type { StudyAnalyte } from "./types";

/** lib/uploads' MAX_UPLOAD_BYTES (20 MiB). */
const MAX_FILE_BYTES = 20 * 1024 * 1024;

type Stage = "choose" | "previewing" | "preview" | "checking" | "report" | "deciding";

/** The example files in public/examples/ (scripts/examples.ts writes them). */
const EXAMPLES = [
  { href: "/examples/glucose-donors.csv", label: "a clean CSV in the template's columns" },
  { href: "/examples/glucose-donors-other-headers.xlsx", label: "an Excel workbook with other headers, to map" },
  { href: "/examples/glucose-donors-with-problems.csv", label: "a CSV with problems, for the validation report" },
];

/** The routine-results example for an indirect study (scripts/examples.ts writes it too). */
const ROUTINE_EXAMPLES = [{ href: "/examples/tsh-routine-results.csv", label: "routine TSH results of outpatients, inpatients and emergencies" }];

function bytes(n: number): string {
  if (n < 1024) return `${n} bytes`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KB`;
  return `${(n / 1024 / 1024).toFixed(1)} MB`;
}

function mappingOf(resolved: UploadPreviewAnswer["mapping"]): ColumnMapping {
  const out: ColumnMapping = {};
  for (const c of Object.keys(resolved) as UploadColumn[]) if (resolved[c]) out[c] = resolved[c]!;
  return out;
}

/**
 * The upload of healthy-donor results: drop zone or file picker → the columns and the first
 * rows → the validation report (counts, then the rows with problems) → commit or cancel. The
 * file chosen stays chosen through refusals, so the scientist can correct an option and retry.
 */
export function UploadPanel({
  studyId,
  analyte,
  onDecided,
  nextAfterCommit = "Screen them for outliers next.",
  routine = false,
}: {
  studyId: string;
  analyte: StudyAnalyte;
  onDecided: () => void;
  /** An indirect study's routine results (patient keys, collection times, settings, flags) instead of healthy donors. */
  routine?: boolean;
  /** The sentence after "Stored N donor results from F.": what the study's next step is. */
  nextAfterCommit?: string;
}) {
  const [file, setFile] = useState<File | null>(null);
  const [decimalComma, setDecimalComma] = useState(false);
  const [sheet, setSheet] = useState("");
  const [preview, setPreview] = useState<UploadPreviewAnswer | null>(null);
  const [mapping, setMapping] = useState<ColumnMapping>({});
  const [stage, setStage] = useState<Stage>("choose");
  const [progress, setProgress] = useState<Progress | null>(null);
  const [upload, setUpload] = useState<PendingUploadAnswer | null>(null);
  const [refusal, setRefusal] = useState<ProblemAnswer | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const base = `/api/v1/studies/${studyId}/uploads`;

  const runPreview = useCallback(
    async (chosen: File, sheetName: string) => {
      setStage("previewing");
      setRefusal(null);
      setNotice(null);
      setProgress({ transfer: 0, checking: null });
      const form = new FormData();
      form.set("file", chosen);
      if (sheetName) form.set("sheet", sheetName);
      const outcome = await sendForm<UploadPreviewAnswer>(`${base}/preview`, form, { onProgress: setProgress });
      setProgress(null);
      if (outcome.ok) {
        setPreview(outcome.value);
        setMapping(mappingOf(outcome.value.mapping));
        if (outcome.value.sheet) setSheet(outcome.value.sheet);
      } else {
        setPreview(null);
        setRefusal(outcome.problem);
      }
      setStage("preview");
    },
    [base],
  );

  const onDrop = useCallback(
    (accepted: File[]) => {
      const chosen = accepted[0];
      if (!chosen) return;
      setFile(chosen);
      setUpload(null);
      setSheet("");
      if (chosen.size > MAX_FILE_BYTES) {
        // The server would refuse it too (413); say so before sending 20 MB for nothing.
        setPreview(null);
        setNotice(null);
        setRefusal({ status: 413, uploadError: "too_large", detail: "the file is larger than 20 MB" });
        setStage("preview");
        return;
      }
      void runPreview(chosen, "");
    },
    [runPreview],
  );
  const busy = stage === "previewing" || stage === "checking" || stage === "deciding";
  const { getRootProps, getInputProps, isDragActive, open } = useDropzone({ onDrop, multiple: false, noClick: true, disabled: busy || stage === "report" });

  async function check() {
    if (!file) return;
    setStage("checking");
    setRefusal(null);
    setProgress({ transfer: 0, checking: null });
    const form = new FormData();
    form.set("file", file);
    form.set("mapping", JSON.stringify(mapping));
    form.set("decimalComma", String(decimalComma));
    if (sheet) form.set("sheet", sheet);
    const outcome = await sendForm<PendingUploadAnswer>(base, form, { ndjson: true, onProgress: setProgress });
    setProgress(null);
    if (outcome.ok) {
      setUpload(outcome.value);
      setStage("report");
    } else {
      setRefusal(outcome.problem);
      setStage("preview");
    }
  }

  function reset(message: string | null) {
    setFile(null);
    setPreview(null);
    setUpload(null);
    setMapping({});
    setSheet("");
    setRefusal(null);
    setNotice(message);
    setStage("choose");
  }

  async function decide(decision: "commit" | "cancel") {
    if (!upload) return;
    setStage("deciding");
    setRefusal(null);
    const res = await fetch(`${base}/${upload.id}/${decision}`, { method: "POST" }).catch(() => null);
    if (res?.ok) {
      const body = await res.json();
      reset(
        decision === "commit"
          ? `Stored ${body.stored.toLocaleString("en")} ${routine ? "routine" : "donor"} results from ${upload.fileName}. ${nextAfterCommit}`
          : `Cancelled the upload of ${upload.fileName}; nothing was stored.`,
      );
      onDecided();
      return;
    }
    setRefusal({ status: res?.status ?? 0, detail: res ? await readProblem(res) : "The server could not be reached." });
    setStage("report");
  }

  const gap = mappingGap(mapping, routine);
  const what = routine ? "routine results" : "donor results";
  const showSelectors = preview !== null && (!preview.matchesTemplate || preview.incomplete !== null);
  const templateHref = (format: "csv" | "xlsx") =>
    `/api/v1/uploads/template?format=${format}&analyte=${encodeURIComponent(analyte.code)}${routine ? "&kind=routine" : ""}`;

  return (
    <div className="space-y-4" data-testid="upload-panel">
      {notice ? (
        <p role="status" className="rounded-md bg-tide-50 px-3 py-2 text-sm text-tide-700" data-testid="upload-notice">
          {notice}
        </p>
      ) : null}

      {stage !== "report" && stage !== "deciding" ? (
        <div
          {...getRootProps({
            className: `rounded-lg border-2 border-dashed px-4 py-6 text-center text-sm transition-colors ${
              isDragActive ? "border-tide-500 bg-tide-50" : "border-ink-300 bg-ink-50"
            }`,
            "aria-label": `Drop zone for a file of ${what}`,
          })}
        >
          <input {...getInputProps({ id: "donor-file", "aria-label": `File of ${what} (CSV or XLSX)` })} />
          {file ? (
            <p className="text-ink-800" data-testid="chosen-file">
              <span className="font-medium">{file.name}</span> · {bytes(file.size)}
            </p>
          ) : (
            <p className="text-ink-700">{isDragActive ? "Drop the file here." : `Drop a CSV or Excel (.xlsx) file of ${what} here,`}</p>
          )}
          <p className="mt-2">
            <Button type="button" variant="secondary" onClick={open} disabled={busy}>
              {file ? "Choose another file…" : "or choose a file…"}
            </Button>
          </p>
          <p className="mt-2 text-xs text-ink-500">
            Up to 20 MB and 200,000 rows. Values in {analyte.unit} unless a unit column says otherwise.
          </p>
        </div>
      ) : null}

      {progress ? (
        <div className="space-y-2" aria-live="polite">
          <ProgressBar label="Sending the file" value={progress.transfer} />
          {stage === "checking" ? (
            <ProgressBar
              label="Checking the rows"
              value={progress.checking?.fraction ?? 0}
              detail={progress.checking ? `${progress.checking.rows.toLocaleString("en")} rows checked` : "waiting for the server"}
            />
          ) : null}
        </div>
      ) : null}

      {refusal ? (
        <div role="alert" className="space-y-1 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high" data-testid="upload-refusal">
          <p className="font-medium">{refusalMessage(refusal)}</p>
          <p className="text-ink-800">{nextStepFor(refusal)}</p>
        </div>
      ) : null}

      {file && (stage === "preview" || stage === "checking") ? (
        <div className="space-y-4">
          <div className="flex flex-wrap items-end gap-4 text-sm">
            {preview && preview.sheets.length > 1 ? (
              <div className="space-y-0.5">
                <label htmlFor="upload-sheet" className="block text-xs font-medium uppercase tracking-wide text-ink-600">
                  Sheet
                </label>
                <select
                  id="upload-sheet"
                  value={sheet}
                  disabled={busy}
                  onChange={(e) => {
                    setSheet(e.target.value);
                    void runPreview(file, e.target.value);
                  }}
                  className="rounded-md border border-ink-300 bg-white px-2 py-1 text-sm"
                >
                  {preview.sheets.map((s) => (
                    <option key={s} value={s}>
                      {s}
                    </option>
                  ))}
                </select>
              </div>
            ) : !preview || preview.format === "xlsx" ? (
              <div className="space-y-0.5">
                <label htmlFor="upload-sheet-name" className="block text-xs font-medium uppercase tracking-wide text-ink-600">
                  Sheet name (XLSX)
                </label>
                <span className="flex gap-2">
                  <input
                    id="upload-sheet-name"
                    value={sheet}
                    onChange={(e) => setSheet(e.target.value)}
                    placeholder="first sheet"
                    className="rounded-md border border-ink-300 bg-white px-2 py-1 text-sm"
                  />
                  <Button type="button" variant="secondary" onClick={() => runPreview(file, sheet)} disabled={busy}>
                    Read this sheet
                  </Button>
                </span>
              </div>
            ) : null}
            <label className="flex items-center gap-2">
              <input type="checkbox" checked={decimalComma} onChange={(e) => setDecimalComma(e.target.checked)} disabled={busy} />
              The file writes decimals with a comma (4,5)
            </label>
          </div>
          {preview ? (
            <>
              <p className="text-sm text-ink-700" data-testid="preview-summary">
                {preview.matchesTemplate
                  ? "The file's headers are the template's."
                  : `The file's headers are not the template's: check the column chosen for each template column${
                      preview.incomplete ? ", and choose the missing ones" : ""
                    }.`}{" "}
                {preview.format === "xlsx"
                  ? `Excel workbook, sheet “${preview.sheet}”.`
                  : `CSV separated by “${preview.separator}”${preview.separator === ";" ? " (such files often write decimals with a comma)" : ""}.`}
              </p>
              <ColumnMappingForm preview={preview} mapping={mapping} onChange={setMapping} showSelectors={showSelectors} />
            </>
          ) : null}
          <div className="flex flex-wrap items-center gap-3">
            <Button type="button" onClick={check} disabled={busy || !preview || gap !== null}>
              {stage === "checking" ? "Checking…" : "Check the file"}
            </Button>
            <span className="text-sm text-ink-600" data-testid="mapping-gap">
              {preview ? gap ?? "Checking stores nothing yet: you will see the report, then commit or cancel." : null}
            </span>
          </div>
        </div>
      ) : null}

      {upload && (stage === "report" || stage === "deciding") ? (
        <div className="space-y-3">
          <ValidationReport upload={upload} />
          <div className="flex flex-wrap items-center gap-3">
            <Button type="button" onClick={() => decide("commit")} disabled={stage === "deciding" || upload.rows.valid === 0}>
              Commit {upload.rows.valid.toLocaleString("en")} valid rows
            </Button>
            <Button type="button" variant="secondary" onClick={() => decide("cancel")} disabled={stage === "deciding"}>
              Cancel the upload
            </Button>
            <span className="text-sm text-ink-600">
              {upload.rows.valid === 0
                ? "No row is valid: cancel, correct the file and upload it again."
                : "Nothing is stored until you commit."}
            </span>
          </div>
        </div>
      ) : null}

      <div className="grid gap-3 border-t border-ink-100 pt-3 text-sm text-ink-700 md:grid-cols-2">
        <div>
          <p className="font-medium text-ink-800">Blank template</p>
          <p>
            Columns <span className="font-mono text-xs">{(routine ? ROUTINE_COLUMNS : TEMPLATE_COLUMNS).join(", ")}</span>:{" "}
            <a href={templateHref("csv")} download className="underline">
              CSV
            </a>{" "}
            ·{" "}
            <a href={templateHref("xlsx")} download className="underline">
              Excel (.xlsx)
            </a>
          </p>
        </div>
        <div>
          <p className="font-medium text-ink-800">
            {routine ? "Example file to try (TSH, invented patients)" : "Example files to try (glucose, GLU, invented donors)"}
          </p>
          <ul className="list-disc pl-5">
            {(routine ? ROUTINE_EXAMPLES : EXAMPLES).map((e) => (
              <li key={e.href}>
                <a href={e.href} download>
                  {e.label}
                </a>
              </li>
            ))}
          </ul>
        </div>
      </div>
    </div>
  );
}
