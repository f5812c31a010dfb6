import type { ReactNode } from "react";

export function Panel({ title, actions, children, className = "" }: {
  title?: ReactNode;
  actions?: ReactNode;
  children: ReactNode;
  className?: string;
}) {
  return (
    <section className={`min-w-0 rounded-lg border border-ink-200 bg-white ${className}`}>
      {title || actions ? (
        <header className="flex items-center justify-between gap-3 border-b border-ink-100 px-4 py-2.5">
          {title ? <h2>{title}</h2> : <span />}
          {actions}
        </header>
      ) : null}
      <div className="p-4">{children}</div>
    </section>
  );
}

export function PageHeader({ title, lead, actions }: { title: string; lead?: ReactNode; actions?: ReactNode }) {
  return (
    <div className="mb-5 flex flex-wrap items-end justify-between gap-3">
      <div>
        <h1>{title}</h1>
        {lead ? <p className="mt-1 max-w-3xl text-sm text-ink-600 [&_a]:underline">{lead}</p> : null}
      </div>
      {actions}
    </div>
  );
}
