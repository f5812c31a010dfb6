"use client";

import { createColumnHelper } from "@tanstack/react-table";
import Link from "next/link";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { DECISION_LABELS, DECISION_TONES, type CheckRow } from "./types";

const column = createColumnHelper<CheckRow>();

const columns = [
  column.accessor("analyte", {
    header: "Analyte",
    cell: (c) => (
      <span className="whitespace-nowrap">
        <span className="font-mono font-semibold">{c.getValue()}</span> <span className="text-ink-600">{c.row.original.analyteName}</span>
      </span>
    ),
  }),
  column.accessor("interval", {
    header: "Interval checked",
    cell: (c) => (
      <Link href={`/adoption-checks/${c.row.original.id}`} className="whitespace-nowrap font-medium">
        {c.getValue()}
      </Link>
    ),
  }),
  column.accessor("sex", { header: "Sex" }),
  column.accessor("source", { header: "Source", cell: (c) => <span className="line-clamp-2 max-w-xs">{c.getValue()}</span> }),
  column.accessor("outside", { header: "Outside", cell: (c) => <span className="whitespace-nowrap tabular-nums">{c.getValue()}</span> }),
  column.accessor("decision", {
    header: "Decision",
    cell: (c) => (
      <span className="whitespace-nowrap">
        <Badge tone={DECISION_TONES[c.getValue()]}>{DECISION_LABELS[c.getValue()]}</Badge>
      </span>
    ),
  }),
  column.accessor("checkedOn", { header: "Checked on", cell: (c) => <span className="whitespace-nowrap">{c.getValue()}</span> }),
];

export function ChecksTable({ rows }: { rows: CheckRow[] }) {
  return (
    <DataTable
      columns={columns}
      data={rows}
      filterPlaceholder="Filter by analyte, source or decision"
      initialSorting={[{ id: "checkedOn", desc: true }]}
      caption="Adoption checks"
    />
  );
}
