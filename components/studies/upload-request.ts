import type { PendingUploadAnswer, ProblemAnswer } from "./upload-types";
import { sentence } from "./api";

export interface Progress {
  /** The file's transfer to the server, 0–1. */
  transfer: number;
  /** The server's checking: rows checked and the share of the file read, 0–1; null until it starts. */
  checking: { rows: number; fraction: number } | null;
}

export type UploadOutcome<T> = { ok: true; value: T } | { ok: false; problem: ProblemAnswer };

function problemOf(status: number, text: string): ProblemAnswer {
  try {
    const body = JSON.parse(text);
    if (typeof body?.detail === "string") return { ...body, status: body.status ?? status };
  } catch {
    // Not a problem document: say what came back.
  }
  return { status, detail: status === 0 ? "The server could not be reached." : `The server answered ${status}.` };
}

/**
 * Sends a multipart form with XMLHttpRequest, whose upload events give the transfer's progress
 * (fetch has none). With `ndjson`, reads the checking's progress lines as they arrive and
 * resolves with the last line's outcome.
 */
export function sendForm<T>(
  url: string,
  form: FormData,
  { ndjson = false, onProgress }: { ndjson?: boolean; onProgress?: (p: Progress) => void } = {},
): Promise<UploadOutcome<T>> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    const progress: Progress = { transfer: 0, checking: null };
    let seen = 0;
    let last: unknown = null;
    const readLines = () => {
      const text = xhr.responseText;
      let end = text.indexOf("\n", seen);
      while (end !== -1) {
        const line = text.slice(seen, end).trim();
        seen = end + 1;
        end = text.indexOf("\n", seen);
        if (line === "") continue;
        const message = JSON.parse(line);
        if (typeof message.checked === "number") {
          progress.checking = { rows: message.checked, fraction: message.totalBytes > 0 ? message.bytesRead / message.totalBytes : 0 };
          onProgress?.({ ...progress });
        } else {
          last = message;
        }
      }
    };
    xhr.open("POST", url);
    xhr.setRequestHeader("accept", ndjson ? "application/x-ndjson" : "application/json");
    xhr.upload.onprogress = (e) => {
      if (!e.lengthComputable) return;
      progress.transfer = e.loaded / e.total;
      onProgress?.({ ...progress });
    };
    xhr.upload.onload = () => {
      progress.transfer = 1;
      onProgress?.({ ...progress });
    };
    xhr.onprogress = () => {
      if (ndjson && xhr.status === 200) readLines();
    };
    xhr.onerror = () => resolve({ ok: false, problem: problemOf(0, "") });
    xhr.onload = () => {
      const streamed = ndjson && xhr.status === 200 && (xhr.getResponseHeader("content-type") ?? "").includes("ndjson");
      if (!streamed) {
        if (xhr.status >= 200 && xhr.status < 300) resolve({ ok: true, value: JSON.parse(xhr.responseText) as T });
        else resolve({ ok: false, problem: problemOf(xhr.status, xhr.responseText) });
        return;
      }
      readLines();
      const outcome = last as { status: number; upload?: T; problem?: ProblemAnswer } | null;
      if (outcome?.upload !== undefined) resolve({ ok: true, value: outcome.upload });
      else if (outcome?.problem) resolve({ ok: false, problem: outcome.problem });
      else resolve({ ok: false, problem: { status: 500, detail: "The server stopped before answering." } });
    };
    xhr.send(form);
  });
}

/** What the scientist can do about a refusal, in one sentence. */
export function nextStepFor(problem: ProblemAnswer): string {
  switch (problem.uploadError) {
    case "too_large":
    case "too_many_rows":
      return "Split the file into several files of at most 20 MB and 200,000 rows each, and upload them one by one.";
    case "unreadable":
    case "encoding":
      return "Save the file as CSV (UTF-8) or as an Excel workbook (.xlsx) and choose it again; older .xls workbooks are not read.";
    case "malformed":
      return "Open the file, correct the line or column the message names, save it as CSV (UTF-8) or .xlsx and choose it again.";
    case "empty":
    case "no_data_rows":
      return "Choose the file that holds the donor results, or fill in the blank template below.";
    case "unknown_sheet":
      return `Choose one of the workbook's sheets${problem.sheets?.length ? `: ${problem.sheets.join(", ")}` : ""}.`;
    case "mapping":
      return "Choose the file's column for each template column below, then check the file again.";
  }
  if (problem.status === 409) return "Choose another file; a study keeps each file once, and a closed study takes none.";
  if (problem.status === 413) return "Split the file into several files of at most 20 MB each.";
  if (problem.status === 415) return "Save the file as CSV (UTF-8) or as an Excel workbook (.xlsx) and choose it again.";
  if (problem.status === 403) return "Ask a laboratory scientist or the director to upload it.";
  if (problem.status === 0 || problem.status >= 500) return "Try again in a moment; if it keeps failing, tell your administrator.";
  return "Correct what the message names and try again.";
}

export function refusalMessage(problem: ProblemAnswer): string {
  const prefix = problem.uploadError && problem.uploadError !== "mapping" ? "The file was refused: " : "";
  return prefix ? `${prefix}${sentence(problem.detail).replace(/^./, (c) => c.toLowerCase())}` : sentence(problem.detail);
}

export type { PendingUploadAnswer };
