"use client";

import { createColumnHelper } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { Button } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import { Panel } from "@/components/ui/panel";
import type { FormServerAction } from "@/lib/auth/action-state";
import { AnalyteForm } from "./analyte-form";
import type { AnalyteRow } from "./analyte-row";

/** The server actions of the page; absent for roles that only read the catalogue. */
export interface AnalyteActions {
  create: FormServerAction;
  update: FormServerAction;
}

const column = createColumnHelper<AnalyteRow>();

export function AnalyteCatalogue({ rows, actions }: { rows: AnalyteRow[]; actions?: AnalyteActions }) {
  const [editing, setEditing] = useState<string | null>(null);
  const editedRow = rows.find((r) => r.code === editing);
  const columns = useMemo(
    () => [
      column.accessor("code", { header: "Code", cell: (c) => <span className="font-mono font-semibold">{c.getValue()}</span> }),
      column.accessor("name", { header: "Name" }),
      column.accessor("unit", { header: "Unit", cell: (c) => <span className="font-mono">{c.getValue()}</span> }),
      column.accessor("decimals", { header: "Decimals" }),
      column.accessor("loinc", { header: "LOINC", cell: (c) => <span className="whitespace-nowrap">{c.getValue() || "—"}</span> }),
      column.accessor("specimen", { header: "Specimen" }),
      column.accessor("criticalLimits", {
        header: "Critical limits",
        enableSorting: false,
        cell: (c) => <span className="whitespace-nowrap">{c.getValue()}</span>,
      }),
      column.accessor("reviewMonths", { header: "Review", cell: (c) => <span className="whitespace-nowrap">every {c.getValue()} months</span> }),
      ...(actions
        ? [
            column.display({
              id: "edit",
              header: "",
              cell: (c) => (
                <Button
                  type="button"
                  variant="secondary"
                  className="px-2 py-1 text-xs"
                  aria-label={`Edit ${c.row.original.code}`}
                  onClick={() => setEditing(c.row.original.code)}
                >
                  Edit
                </Button>
              ),
            }),
          ]
        : []),
    ],
    [actions],
  );

  const table =
    rows.length === 0 ? (
      <div className="space-y-2 py-4 text-sm text-ink-600" data-testid="analytes-empty">
        <p className="font-medium text-ink-900">The catalogue is empty.</p>
        {actions ? (
          <p>
            Start with the analytes you will study first: give each our code, its name and the UCUM unit it is reported in, with
            its LOINC code if you have it. Studies and interval versions are then made for an analyte of this catalogue.
          </p>
        ) : (
          <p>Laboratory scientists and the director add the analytes; ask them if you expected one here.</p>
        )}
      </div>
    ) : (
      <DataTable
        columns={columns}
        data={rows}
        filterPlaceholder="Filter by code, name, unit or LOINC"
        initialSorting={[{ id: "code", desc: false }]}
        caption="Analyte catalogue"
      />
    );

  if (!actions) return <Panel title={`${rows.length} analytes`}>{table}</Panel>;
  return (
    <div className="grid items-start gap-5 2xl:grid-cols-[1fr_26rem]">
      <Panel title={`${rows.length} analytes`}>{table}</Panel>
      {editedRow ? (
        <Panel title={`Edit ${editedRow.code}`}>
          <AnalyteForm key={editedRow.code} action={actions.update} initial={editedRow.values} onCancel={() => setEditing(null)} />
        </Panel>
      ) : (
        <Panel title="New analyte">
          <AnalyteForm action={actions.create} />
        </Panel>
      )}
    </div>
  );
}
