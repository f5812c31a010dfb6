"use client";

import { createColumnHelper } from "@tanstack/react-table";
import { DataTable } from "@/components/ui/data-table";

export interface AuditRow {
  id: number;
  at: string;
  actor: string;
  action: string;
  entity: string;
  summary: string;
}

const column = createColumnHelper<AuditRow>();

const columns = [
  column.accessor("at", { header: "When", cell: (c) => <span className="whitespace-nowrap text-ink-600">{c.getValue()}</span> }),
  column.accessor("actor", { header: "Who" }),
  column.accessor("action", { header: "Action", cell: (c) => <code className="text-xs text-ink-700">{c.getValue()}</code> }),
  column.accessor("entity", { header: "Record", cell: (c) => <span className="whitespace-nowrap text-ink-600">{c.getValue()}</span> }),
  column.accessor("summary", { header: "What happened", enableSorting: false }),
];

export function AuditTable({ rows }: { rows: AuditRow[] }) {
  return <DataTable columns={columns} data={rows} emptyText="No events match these filters." caption="Audit events" />;
}
