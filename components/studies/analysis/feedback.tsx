import type { ReactNode } from "react";
import { StudySection } from "@/components/studies/study-section";
import { errorMessage, nextStep } from "./api";

/** An error as the page shows it: what went wrong, then what to do next. */
export function ErrorNotice({ error, action }: { error: unknown; action?: string }) {
  if (!error) return null;
  return (
    <div role="alert" className="space-y-0.5 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high">
      <p>
        {action ? <span className="font-medium">{action}: </span> : null}
        {errorMessage(error)}
      </p>
      <p className="text-ink-700">{nextStep(error)}</p>
    </div>
  );
}

/** A confirmation of a step done. */
export function DoneNotice({ children }: { children: ReactNode }) {
  if (!children) return null;
  return (
    <p role="status" className="rounded-md bg-tide-50 px-3 py-2 text-sm text-tide-700">
      {children}
    </p>
  );
}

/** A grey block where content will appear: keeps the layout still while data loads. */
export function Skeleton({ lines = 3, chart = false, label = "Loading" }: { lines?: number; chart?: boolean; label?: string }) {
  return (
    <div className="animate-pulse space-y-2" aria-busy="true" aria-label={label} role="status">
      {chart ? <div className="h-40 rounded-md bg-ink-100" /> : null}
      {Array.from({ length: lines }, (_, i) => (
        <div key={i} className="h-4 rounded bg-ink-100" style={{ width: `${90 - i * 12}%` }} />
      ))}
    </div>
  );
}

/** What to do first when there is nothing to show yet. */
export function EmptyState({ title, children, testId }: { title: string; children?: ReactNode; testId?: string }) {
  return (
    <div className="space-y-1 rounded-md border border-dashed border-ink-300 px-4 py-4 text-sm text-ink-600" data-testid={testId}>
      <p className="font-medium text-ink-900">{title}</p>
      {children}
    </div>
  );
}

/** What a section has done and what comes next, for the section header. */
export interface SectionState {
  done?: ReactNode;
  next?: ReactNode;
}

/** A step of the study page, in the page frame's StudySection: anchor, numbered heading, "Done" and "Next". */
export function AnalysisSection({
  id,
  step,
  title,
  state,
  children,
}: {
  id: string;
  step: number;
  title: string;
  state: SectionState;
  children: ReactNode;
}) {
  return (
    <StudySection id={id} step={step} title={title} done={state.done} next={state.next}>
      {children}
    </StudySection>
  );
}

export const tableClass = "min-w-full divide-y divide-ink-200 text-sm";
export const thClass = "whitespace-nowrap px-3 py-2 text-left text-xs font-semibold uppercase tracking-wide text-ink-600";
export const tdClass = "px-3 py-2 align-top";
export const inputClass =
  "block w-full rounded-md border border-ink-300 bg-white px-2.5 py-1.5 text-sm text-ink-900 focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500 aria-[invalid=true]:border-signal-high";
export const labelClass = "block text-xs font-medium uppercase tracking-wide text-ink-600";
