"use client";

import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type PaginationState } from "@tanstack/react-table";
import { Fragment, useMemo, useState } from "react";
import useSWR from "swr";
import { fetchJson } from "@/components/studies/api";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import type { OutboxItem, OutboxPage } from "@/lib/mail/outbox-query";

const STATUS: Record<OutboxItem["status"], { label: string; tone: "ok" | "warn" | "neutral" }> = {
  sent: { label: "Sent", tone: "ok" },
  queued: { label: "Queued", tone: "neutral" },
  failed: { label: "Failed", tone: "warn" },
};

/** An instant as 2026-03-02 14:05 UTC: the same for every reader of the outbox. */
function utcMinute(iso: string | null): string {
  return iso ? `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC` : "—";
}

const column = createColumnHelper<OutboxItem>();
const PAGE_SIZES = [25, 50, 100];
const control = "rounded-md border border-ink-300 bg-white px-2 py-1 text-sm focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500";

/**
 * The e-mail outbox, newest first, a page at a time from GET /api/v1/outbox through SWR; each
 * message's text opens on demand.
 */
export function OutboxTable() {
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 25 });
  const [open, setOpen] = useState<Set<string>>(new Set());
  const url = `/api/v1/outbox?page=${pagination.pageIndex + 1}&pageSize=${pagination.pageSize}`;
  const { data, error, isLoading, isValidating, mutate } = useSWR<OutboxPage>(url, fetchJson, { keepPreviousData: true, refreshInterval: 15_000 });

  const toggle = (id: string) =>
    setOpen((current) => {
      const next = new Set(current);
      if (next.has(id)) next.delete(id);
      else next.add(id);
      return next;
    });

  const columns = useMemo(
    () => [
      column.accessor("createdAt", { header: "Queued", cell: (c) => <span className="whitespace-nowrap tabular-nums">{utcMinute(c.getValue())}</span> }),
      column.accessor("status", {
        header: "Status",
        cell: (c) => {
          const m = c.row.original;
          return (
            <span className="space-y-0.5">
              <Badge tone={STATUS[m.status].tone}>{STATUS[m.status].label}</Badge>
              {m.status === "sent" ? <span className="block text-xs text-ink-500">{utcMinute(m.sentAt)}</span> : null}
              {m.lastError && m.status !== "sent" ? (
                <span className="block max-w-xs whitespace-normal text-xs text-signal-high">{m.lastError}</span>
              ) : null}
            </span>
          );
        },
      }),
      column.accessor("attempts", { header: "Attempts", cell: (c) => <span className="tabular-nums">{c.getValue()}</span> }),
      column.accessor("recipients", { header: "Recipients", cell: (c) => <span className="whitespace-normal">{c.getValue().join(", ")}</span> }),
      column.accessor("subject", {
        header: "Subject",
        cell: (c) => (
          <span className="whitespace-normal">
            {c.getValue()}
            <span className="block font-mono text-xs text-ink-500">{c.row.original.kind}</span>
          </span>
        ),
      }),
      column.display({
        id: "text",
        header: "Text",
        cell: (c) => {
          const id = c.row.original.id;
          const shown = open.has(id);
          return (
            <Button type="button" variant="secondary" className="px-2 py-0.5 text-xs" aria-expanded={shown} aria-controls={`outbox-text-${id}`} onClick={() => toggle(id)}>
              {shown ? "Hide text" : "Show text"}
            </Button>
          );
        },
      }),
    ],
    [open],
  );

  const table = useReactTable({
    data: data?.items ?? [],
    columns,
    state: { pagination },
    manualPagination: true,
    rowCount: data?.total ?? 0,
    onPaginationChange: setPagination,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (row) => row.id,
  });

  const total = data?.total ?? 0;
  const first = total === 0 ? 0 : pagination.pageIndex * pagination.pageSize + 1;
  const last = Math.min(total, (pagination.pageIndex + 1) * pagination.pageSize);

  return (
    <div className="space-y-3" data-testid="outbox">
      {error ? (
        <div role="alert" className="space-y-2 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high" data-testid="outbox-error">
          <p>The outbox could not be loaded: {error instanceof Error ? error.message : String(error)}</p>
          <Button type="button" variant="secondary" className="px-2 py-0.5 text-xs" onClick={() => mutate()}>
            Try again
          </Button>
        </div>
      ) : null}
      {isLoading && !data ? (
        <div aria-busy="true" aria-label="Loading the outbox" className="animate-pulse space-y-2 rounded-md border border-ink-200 p-3">
          {Array.from({ length: 6 }, (_, i) => (
            <div key={i} className="h-6 rounded bg-ink-100" />
          ))}
        </div>
      ) : data && total === 0 ? (
        <div className="rounded-md border border-ink-200 px-3 py-6 text-center text-sm text-ink-600" data-testid="outbox-empty">
          No e-mail has been queued yet. Submissions, sign-offs, returns and reviews coming due queue their messages here.
        </div>
      ) : data ? (
        <>
          <div className="overflow-x-auto rounded-md border border-ink-200" aria-busy={isValidating}>
            <table className="min-w-full divide-y divide-ink-200 text-sm">
              <caption className="sr-only">E-mail outbox, newest first, page {pagination.pageIndex + 1}</caption>
              <thead className="bg-ink-50">
                {table.getHeaderGroups().map((group) => (
                  <tr key={group.id}>
                    {group.headers.map((header) => (
                      <th key={header.id} scope="col" className="whitespace-nowrap px-3 py-2 text-left text-xs font-semibold uppercase tracking-wide text-ink-600">
                        {flexRender(header.column.columnDef.header, header.getContext())}
                      </th>
                    ))}
                  </tr>
                ))}
              </thead>
              <tbody className="divide-y divide-ink-100 bg-white">
                {table.getRowModel().rows.map((row) => (
                  <Fragment key={row.id}>
                    <tr data-testid="outbox-row" className={row.original.status === "failed" ? "bg-amber-50/60" : "hover:bg-ink-50/60"}>
                      {row.getVisibleCells().map((cell) => (
                        <td key={cell.id} className="px-3 py-1.5 align-top">
                          {flexRender(cell.column.columnDef.cell, cell.getContext())}
                        </td>
                      ))}
                    </tr>
                    {open.has(row.id) ? (
                      <tr>
                        <td colSpan={columns.length} className="bg-ink-50 px-3 py-2">
                          <pre id={`outbox-text-${row.id}`} data-testid="outbox-text" className="whitespace-pre-wrap font-sans text-sm text-ink-800">
                            {row.original.text}
                          </pre>
                        </td>
                      </tr>
                    ) : null}
                  </Fragment>
                ))}
              </tbody>
            </table>
          </div>
          <div className="flex flex-wrap items-center justify-between gap-3 text-sm text-ink-700">
            <span data-testid="outbox-range">
              {first.toLocaleString("en")}–{last.toLocaleString("en")} of {total.toLocaleString("en")} messages
            </span>
            <span className="flex flex-wrap items-center gap-2">
              <label htmlFor="outbox-page-size" className="text-ink-600">
                Rows per page
              </label>
              <select
                id="outbox-page-size"
                className={control}
                value={pagination.pageSize}
                onChange={(e) => setPagination({ pageIndex: 0, pageSize: Number(e.target.value) })}
              >
                {PAGE_SIZES.map((n) => (
                  <option key={n} value={n}>
                    {n}
                  </option>
                ))}
              </select>
              <Button type="button" variant="secondary" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
                ← Newer
              </Button>
              <Button type="button" variant="secondary" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
                Older →
              </Button>
            </span>
          </div>
        </>
      ) : null}
    </div>
  );
}
