"use client";

import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  useReactTable,
  type PaginationState,
  type SortingState,
} from "@tanstack/react-table";
import { useMemo, useState } from "react";
import useSWR from "swr";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { fetchJson } from "./api";
import type { StudyAnalyte } from "./types";

/** One donor result as GET …/donor-results gives it (exclusion fields arrive with screening). */
export interface DonorResultItem {
  id: number;
  rowNumber: number;
  donorCode: string;
  sex: "F" | "M";
  ageYears: number;
  collectedOn: string | null;
  value: number;
  censoringSide: "below" | "above" | null;
  censoringInclusive: boolean | null;
  originalValue: number | null;
  originalUnit: string | null;
  /** Routine results (an indirect study): collection date and time, setting and flags. */
  collectedAt?: string | null;
  setting?: string | null;
  flags?: string[] | null;
  excluded?: boolean;
  exclusion?: { id: string; source: string; reason: string } | null;
}

interface DonorResultsPage {
  items: DonorResultItem[];
  total: number;
  page: number;
  pageSize: number;
}

export interface DonorFilters {
  sex: "" | "F" | "M";
  ageFrom: string;
  ageTo: string;
  excluded: "" | "true" | "false";
}

const PAGE_SIZES = [25, 50, 100];
const NO_FILTERS: DonorFilters = { sex: "", ageFrom: "", ageTo: "", excluded: "" };

/**
 * `<0.5`, `<=0.5`, `>1000` for censored values; the value itself otherwise, in the analyte's
 * decimals (null: as the file wrote it, for the value before conversion).
 */
export function formatDonorValue(item: Pick<DonorResultItem, "value" | "censoringSide" | "censoringInclusive">, decimals: number | null): string {
  const number = decimals === null ? String(item.value) : item.value.toFixed(decimals);
  if (!item.censoringSide) return number;
  const sign = item.censoringSide === "below" ? "<" : ">";
  return `${sign}${item.censoringInclusive ? "=" : ""}${number}`;
}

/** The API's query for a page of the table: only what is set. */
export function donorResultsUrl(studyId: string, p: PaginationState, sorting: SortingState, filters: DonorFilters): string {
  const q = new URLSearchParams({ page: String(p.pageIndex + 1), pageSize: String(p.pageSize) });
  if (sorting[0]) q.set("sort", `${sorting[0].desc ? "-" : ""}${sorting[0].id}`);
  if (filters.sex) q.set("sex", filters.sex);
  if (filters.ageFrom.trim() !== "") q.set("ageFrom", filters.ageFrom.trim());
  if (filters.ageTo.trim() !== "") q.set("ageTo", filters.ageTo.trim());
  if (filters.excluded) q.set("excluded", filters.excluded);
  return `/api/v1/studies/${studyId}/donor-results?${q}`;
}

const column = createColumnHelper<DonorResultItem>();
const control = "rounded-md border border-ink-300 bg-white px-2 py-1 text-sm focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500";

/**
 * The study's donor results, a page at a time: paging, sorting and filtering happen in
 * PostgreSQL (GET …/donor-results through SWR), so 200,000 rows cost the browser one page.
 */
export function DonorResultsTable({ studyId, analyte, routine = false }: { studyId: string; analyte: StudyAnalyte; routine?: boolean }) {
  const [pagination, setPagination] = useState<PaginationState>({ pageIndex: 0, pageSize: 25 });
  const [sorting, setSorting] = useState<SortingState>([{ id: "rowNumber", desc: false }]);
  const [draft, setDraft] = useState<DonorFilters>(NO_FILTERS);
  const [filters, setFilters] = useState<DonorFilters>(NO_FILTERS);
  const url = donorResultsUrl(studyId, pagination, sorting, filters);
  const { data, error, isLoading, isValidating, mutate } = useSWR<DonorResultsPage>(url, fetchJson, { keepPreviousData: true });

  const columns = useMemo(
    () => [
      column.accessor("rowNumber", { header: "Row" }),
      column.accessor("donorCode", { header: routine ? "Patient key" : "Donor code", cell: (c) => <span className="font-mono">{c.getValue()}</span> }),
      column.accessor("sex", { header: "Sex" }),
      column.accessor("ageYears", { header: "Age (years)", cell: (c) => c.getValue().toFixed(1) }),
      column.accessor("collectedOn", {
        header: routine ? "Collected at" : "Collected on",
        cell: (c) => (routine ? (c.row.original.collectedAt?.slice(0, 16).replace("T", " ") ?? c.getValue() ?? "—") : (c.getValue() ?? "—")),
      }),
      ...(routine
        ? [
            column.accessor((r) => r.setting ?? "", { id: "setting", header: "Setting", cell: (c) => c.getValue() || "—" }),
            column.accessor((r) => (r.flags ?? []).join(", "), { id: "flags", header: "Flags", cell: (c) => c.getValue() || "—" }),
          ]
        : []),
      column.accessor("value", {
        header: `Value (${analyte.unit})`,
        cell: (c) => <span className="tabular-nums">{formatDonorValue(c.row.original, analyte.decimals)}</span>,
      }),
      column.display({
        id: "original",
        header: "As uploaded",
        cell: (c) => {
          const r = c.row.original;
          if (r.originalUnit === null || r.originalValue === null) return <span className="text-ink-500">same</span>;
          return (
            <span className="whitespace-nowrap text-ink-600">
              {formatDonorValue({ ...r, value: r.originalValue }, null)} {r.originalUnit}
            </span>
          );
        },
      }),
      column.display({
        id: "excluded",
        header: "Exclusion",
        cell: (c) => {
          const r = c.row.original;
          if (r.exclusion) return <Badge tone="warn">Excluded: {r.exclusion.reason}</Badge>;
          if (r.excluded) return <Badge tone="warn">Excluded</Badge>;
          return <span className="text-ink-500">—</span>;
        },
      }),
    ],
    [analyte, routine],
  );
  const sortable = new Set(["rowNumber", "donorCode", "sex", "ageYears", "collectedOn", "value"]);

  const table = useReactTable({
    data: data?.items ?? [],
    columns,
    state: { pagination, sorting },
    manualPagination: true,
    manualSorting: true,
    manualFiltering: true,
    rowCount: data?.total ?? 0,
    enableSortingRemoval: false,
    // A first click sorts ascending for every column (TanStack's default starts numbers descending).
    sortDescFirst: false,
    onPaginationChange: setPagination,
    onSortingChange: (updater) => {
      setSorting(updater);
      setPagination((p) => ({ ...p, pageIndex: 0 }));
    },
    getCoreRowModel: getCoreRowModel(),
    getRowId: (row) => String(row.id),
  });

  const applyFilters = (event: React.FormEvent) => {
    event.preventDefault();
    setFilters(draft);
    setPagination((p) => ({ ...p, pageIndex: 0 }));
  };
  const clearFilters = () => {
    setDraft(NO_FILTERS);
    setFilters(NO_FILTERS);
    setPagination((p) => ({ ...p, pageIndex: 0 }));
  };
  const filtered = filters !== NO_FILTERS && JSON.stringify(filters) !== JSON.stringify(NO_FILTERS);
  const total = data?.total ?? 0;
  const first = total === 0 ? 0 : pagination.pageIndex * pagination.pageSize + 1;
  const last = Math.min(total, (pagination.pageIndex + 1) * pagination.pageSize);

  const nothingStored = data !== undefined && total === 0 && !filtered;
  return (
    <div className="space-y-3" data-testid="donor-results">
      {nothingStored ? null : (
        <form onSubmit={applyFilters} className="flex flex-wrap items-end gap-3 text-sm" aria-label={`Filter the ${routine ? "routine" : "donor"} results`}>
          <div className="space-y-0.5">
            <label htmlFor="filter-sex" className="block text-xs font-medium uppercase tracking-wide text-ink-600">
              Sex
            </label>
            <select id="filter-sex" className={control} value={draft.sex} onChange={(e) => setDraft({ ...draft, sex: e.target.value as DonorFilters["sex"] })}>
              <option value="">Both</option>
              <option value="F">F</option>
              <option value="M">M</option>
            </select>
          </div>
          <div className="space-y-0.5">
            <label htmlFor="filter-age-from" className="block text-xs font-medium uppercase tracking-wide text-ink-600">
              Age from
            </label>
            <input id="filter-age-from" className={`${control} w-20`} inputMode="decimal" value={draft.ageFrom} onChange={(e) => setDraft({ ...draft, ageFrom: e.target.value })} />
          </div>
          <div className="space-y-0.5">
            <label htmlFor="filter-age-to" className="block text-xs font-medium uppercase tracking-wide text-ink-600">
              Age to
            </label>
            <input id="filter-age-to" className={`${control} w-20`} inputMode="decimal" value={draft.ageTo} onChange={(e) => setDraft({ ...draft, ageTo: e.target.value })} />
          </div>
          <div className="space-y-0.5">
            <label htmlFor="filter-excluded" className="block text-xs font-medium uppercase tracking-wide text-ink-600">
              Exclusion
            </label>
            <select
              id="filter-excluded"
              className={control}
              value={draft.excluded}
              onChange={(e) => setDraft({ ...draft, excluded: e.target.value as DonorFilters["excluded"] })}
            >
              <option value="">All</option>
              <option value="false">Not excluded</option>
              <option value="true">Excluded</option>
            </select>
          </div>
          <Button type="submit" variant="secondary">
            Apply filters
          </Button>
          {filtered ? (
            <Button type="button" variant="secondary" onClick={clearFilters}>
              Clear filters
            </Button>
          ) : null}
        </form>
      )}

      {error ? (
        <div role="alert" className="space-y-2 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high" data-testid="donor-results-error">
          <p>The donor results could not be loaded: {error instanceof Error ? error.message : String(error)}</p>
          <p className="text-ink-800">
            Check the filters (ages are numbers of years), then{" "}
            <Button type="button" variant="secondary" className="px-2 py-0.5 text-xs" onClick={() => mutate()}>
              try again
            </Button>
          </p>
        </div>
      ) : null}

      {isLoading && !data ? (
        <div aria-busy="true" aria-label="Loading the donor results" className="animate-pulse space-y-2 rounded-md border border-ink-200 p-3" data-testid="donor-results-loading">
          {Array.from({ length: 8 }, (_, i) => (
            <div key={i} className="h-6 rounded bg-ink-100" />
          ))}
        </div>
      ) : data && total === 0 ? (
        <div className="rounded-md border border-ink-200 px-3 py-6 text-center text-sm text-ink-600" data-testid="donor-results-empty">
          {filtered ? (
            <>No donor result matches these filters. Widen the age range or clear the filters.</>
          ) : (
            <>No {routine ? "routine" : "donor"} results are stored yet. Upload a file above and commit its valid rows; they will be listed here.</>
          )}
        </div>
      ) : data ? (
        <>
          <div className="overflow-x-auto rounded-md border border-ink-200" aria-busy={isValidating}>
            <table className={`min-w-full divide-y divide-ink-200 text-sm ${isValidating ? "opacity-70" : ""}`}>
              <caption className="sr-only">Donor results of the study, page {pagination.pageIndex + 1}</caption>
              <thead className="bg-ink-50">
                {table.getHeaderGroups().map((group) => (
                  <tr key={group.id}>
                    {group.headers.map((header) => {
                      const sorted = header.column.getIsSorted();
                      const canSort = sortable.has(header.column.id);
                      return (
                        <th
                          key={header.id}
                          scope="col"
                          aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : undefined}
                          className="whitespace-nowrap px-3 py-2 text-left text-xs font-semibold uppercase tracking-wide text-ink-600"
                        >
                          {canSort ? (
                            <button type="button" onClick={header.column.getToggleSortingHandler()} className="inline-flex items-center gap-1 uppercase hover:text-ink-900">
                              {flexRender(header.column.columnDef.header, header.getContext())}
                              <span aria-hidden className="text-ink-400">
                                {sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}
                              </span>
                            </button>
                          ) : (
                            flexRender(header.column.columnDef.header, header.getContext())
                          )}
                        </th>
                      );
                    })}
                  </tr>
                ))}
              </thead>
              <tbody className="divide-y divide-ink-100 bg-white">
                {table.getRowModel().rows.map((row) => (
                  <tr key={row.id} className={row.original.excluded ? "bg-amber-50/60" : "hover:bg-ink-50/60"}>
                    {row.getVisibleCells().map((cell) => (
                      <td key={cell.id} className="whitespace-nowrap px-3 py-1.5 align-middle">
                        {flexRender(cell.column.columnDef.cell, cell.getContext())}
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <div className="flex flex-wrap items-center justify-between gap-3 text-sm text-ink-700">
            <span data-testid="donor-results-range">
              {first.toLocaleString("en")}–{last.toLocaleString("en")} of {total.toLocaleString("en")} {routine ? "routine" : "donor"} results
              {filtered ? " matching the filters" : ""}
            </span>
            <span className="flex flex-wrap items-center gap-2">
              <label htmlFor="page-size" className="text-ink-600">
                Rows per page
              </label>
              <select
                id="page-size"
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
                Previous page
              </Button>
              <span>
                Page {pagination.pageIndex + 1} of {Math.max(1, table.getPageCount()).toLocaleString("en")}
              </span>
              <Button type="button" variant="secondary" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
                Next page
              </Button>
            </span>
          </div>
        </>
      ) : null}
    </div>
  );
}
