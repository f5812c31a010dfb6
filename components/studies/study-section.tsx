import type { ReactNode } from "react";

/**
 * One step of the study page: an anchor (`id`), its heading, what is done and what comes next,
 * then the work itself. Every section of the page uses it, so the steps read alike.
 */
export function StudySection({
  id,
  step,
  title,
  done,
  next,
  children,
}: {
  id: string;
  step: number;
  title: string;
  done?: ReactNode;
  next?: ReactNode;
  children?: ReactNode;
}) {
  return (
    <section id={id} aria-labelledby={`${id}-heading`} className="min-w-0 scroll-mt-4 rounded-lg border border-ink-200 bg-white">
      <header className="border-b border-ink-100 px-4 py-3">
        <h2 id={`${id}-heading`} className="flex items-baseline gap-2">
          <span className="text-sm font-medium text-ink-500">{step}.</span>
          {title}
        </h2>
        <dl className="mt-1.5 grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
          {done ? (
            <>
              <dt className="font-medium text-ink-600">Done</dt>
              <dd className="text-ink-800" data-testid={`${id}-done`}>
                {done}
              </dd>
            </>
          ) : null}
          {next ? (
            <>
              <dt className="font-medium text-ink-600">Next</dt>
              <dd className="text-ink-800" data-testid={`${id}-next`}>
                {next}
              </dd>
            </>
          ) : null}
        </dl>
      </header>
      {children ? <div className="space-y-4 p-4">{children}</div> : null}
    </section>
  );
}
