"use client";

import { useState } from "react";
import { Button } from "@/components/ui/button";
import type { PendingUploadAnswer } from "./upload-types";

const PAGE = 25;

function Figure({ label, value, tone, testId }: { label: string; value: number; tone?: "ok" | "warn"; testId: string }) {
  const color = tone === "ok" ? "text-signal-ok" : tone === "warn" ? "text-signal-warn" : "text-ink-900";
  return (
    <div className="rounded-md border border-ink-200 px-3 py-2">
      <dt className="text-xs font-medium uppercase tracking-wide text-ink-500">{label}</dt>
      <dd className={`text-lg font-semibold ${color}`} data-testid={testId}>
        {value.toLocaleString("en")}
      </dd>
    </div>
  );
}

/** The validation report: the counts first, then each row with a problem and its reason, a page at a time. */
export function ValidationReport({ upload }: { upload: PendingUploadAnswer }) {
  const [page, setPage] = useState(0);
  const pages = Math.max(1, Math.ceil(upload.problems.length / PAGE));
  const shown = upload.problems.slice(page * PAGE, page * PAGE + PAGE);
  return (
    <div className="space-y-3" data-testid="validation-report">
      <h3 className="text-sm font-semibold text-ink-800">
        Validation report for {upload.fileName}
        {upload.sheet ? `, sheet “${upload.sheet}”` : ""}
      </h3>
      <dl className="grid grid-cols-3 gap-2">
        <Figure label="Rows read" value={upload.rows.total} testId="report-total" />
        <Figure label="Valid" value={upload.rows.valid} tone="ok" testId="report-valid" />
        <Figure label="With problems" value={upload.rows.invalid} tone={upload.rows.invalid > 0 ? "warn" : undefined} testId="report-invalid" />
      </dl>
      {upload.problems.length === 0 ? (
        <p className="text-sm text-ink-700">Every row is valid.</p>
      ) : (
        <>
          <p className="text-sm text-ink-700">
            Rows with problems are not stored; commit stores only the valid rows. To keep a row, correct it in the file and upload
            the corrected file after this one.
          </p>
          <div className="overflow-x-auto rounded-md border border-ink-200">
            <table className="min-w-full divide-y divide-ink-200 text-sm" data-testid="report-problems">
              <caption className="sr-only">Rows with problems</caption>
              <thead className="bg-ink-50">
                <tr>
                  {["Row", "Column", "Problem"].map((h) => (
                    <th key={h} scope="col" className="px-3 py-2 text-left text-xs font-semibold uppercase tracking-wide text-ink-600">
                      {h}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody className="divide-y divide-ink-100 bg-white">
                {shown.map((p, i) => (
                  <tr key={`${p.row}-${p.column}-${i}`}>
                    <td className="px-3 py-1.5 tabular-nums">{p.row}</td>
                    <td className="px-3 py-1.5 font-mono text-xs">{p.column}</td>
                    <td className="px-3 py-1.5">{p.message}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <div className="flex flex-wrap items-center justify-between gap-2 text-sm text-ink-600">
            <span>
              Problems {page * PAGE + 1}–{page * PAGE + shown.length} of {upload.problems.length.toLocaleString("en")}
              {upload.problemsOmitted > 0 ? ` (and ${upload.problemsOmitted.toLocaleString("en")} more not listed)` : ""}; rows are
              counted from 1 under the header.
            </span>
            {pages > 1 ? (
              <span className="flex gap-2">
                <Button type="button" variant="secondary" onClick={() => setPage(page - 1)} disabled={page === 0}>
                  Previous problems
                </Button>
                <Button type="button" variant="secondary" onClick={() => setPage(page + 1)} disabled={page + 1 >= pages}>
                  Next problems
                </Button>
              </span>
            ) : null}
          </div>
        </>
      )}
    </div>
  );
}
