"use client";

import { createColumnHelper } from "@tanstack/react-table";
import Link from "next/link";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { STUDY_KIND_WORDS, STUDY_STATUS_WORDS, type StudyRow } from "./types";

const column = createColumnHelper<StudyRow>();

const columns = [
  column.accessor("analyte", {
    header: "Analyte",
    cell: (c) => (
      <span className="whitespace-nowrap">
        <span className="font-mono font-semibold">{c.getValue()}</span> <span className="text-ink-600">{c.row.original.analyteName}</span>
      </span>
    ),
  }),
  column.accessor("title", {
    header: "Title",
    cell: (c) => (
      <Link href={`/studies/${c.row.original.id}`} className="font-medium">
        {c.getValue()}
      </Link>
    ),
  }),
  column.accessor("kind", { header: "Kind", cell: (c) => <span className="whitespace-nowrap">{STUDY_KIND_WORDS[c.getValue()]}</span> }),
  column.accessor("status", {
    header: "Status",
    cell: (c) => (
      <span className="whitespace-nowrap">
        <Badge tone={c.getValue() === "open" ? "ok" : "neutral"}>{STUDY_STATUS_WORDS[c.getValue()]}</Badge>
      </span>
    ),
  }),
  column.accessor("donorResults", { header: "Donor results", cell: (c) => c.getValue().toLocaleString("en") }),
  column.accessor("uploads", { header: "Uploads committed" }),
  column.accessor("openedOn", { header: "Opened on", cell: (c) => <span className="whitespace-nowrap">{c.getValue()}</span> }),
];

export function StudiesTable({ rows }: { rows: StudyRow[] }) {
  return (
    <DataTable
      columns={columns}
      data={rows}
      filterPlaceholder="Filter by analyte, title or status"
      initialSorting={[{ id: "openedOn", desc: true }]}
      caption="Reference studies"
    />
  );
}
