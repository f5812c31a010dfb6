"use client";

import useSWR from "swr";
import { useState } from "react";
import { fetchJson } from "@/components/studies/api";
import { Button } from "@/components/ui/button";
import { Panel } from "@/components/ui/panel";
import type { LisConnectionOut, LisUsageOut } from "@/lib/lis/input";
import { CONNECTIONS_URL, USAGE_URL, utcMinute } from "./api";
import { ConnectionsTable } from "./connections-table";
import { CreateConnectionForm } from "./create-connection-form";
import { NewKeyNotice } from "./new-key-notice";
import { UsageTable } from "./usage-table";

/**
 * The LIS connections page's interactive part: the list (from GET /api/v1/lis-connections through
 * SWR, first drawn from what the server loaded), the form for a new connection, the new key shown
 * once, and the usage view.
 */
export function LisConnectionsManager({ connections, usage }: { connections: LisConnectionOut[]; usage: LisUsageOut }) {
  const list = useSWR<{ connections: LisConnectionOut[] }>(CONNECTIONS_URL, fetchJson, { fallbackData: { connections } });
  const used = useSWR<LisUsageOut>(USAGE_URL, fetchJson, { fallbackData: usage, refreshInterval: 60_000 });
  const [fresh, setFresh] = useState<{ name: string; key: string } | null>(null);
  const rows = list.data?.connections ?? connections;
  const active = rows.filter((r) => r.status === "active").length;
  const refresh = () => {
    void list.mutate();
    void used.mutate();
  };

  return (
    <div className="space-y-5">
      {fresh ? <NewKeyNotice name={fresh.name} keyText={fresh.key} onDone={() => setFresh(null)} /> : null}
      <div className="grid items-start gap-5 2xl:grid-cols-[1fr_20rem]">
        <Panel title={`${active} active ${active === 1 ? "connection" : "connections"}${rows.length > active ? `, ${rows.length - active} revoked` : ""}`}>
          {list.error ? (
            <p role="alert" className="mb-3 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high">
              The list could not be refreshed: {list.error instanceof Error ? list.error.message : String(list.error)} What is shown may be out of date.
            </p>
          ) : null}
          <ConnectionsTable rows={rows} onChanged={refresh} />
        </Panel>
        <Panel title="New connection">
          <CreateConnectionForm
            onCreated={(created) => {
              setFresh({ name: created.name, key: created.key });
              refresh();
            }}
          />
        </Panel>
      </div>
      <Panel
        title="Usage"
        actions={
          <Button type="button" variant="secondary" className="px-2 py-0.5 text-xs" onClick={() => void used.mutate()}>
            Refresh
          </Button>
        }
      >
        <p className="mb-3 text-sm text-ink-600">
          Values scored with each key, as of {utcMinute(used.data?.generatedAt ?? usage.generatedAt)}. Flags: L below the reference interval, N
          within it, H above it; LL and HH beyond the critical limits. The score log holds no patient identifiers.
        </p>
        {used.error ? (
          <p role="alert" className="mb-3 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high">
            The usage could not be refreshed: {used.error instanceof Error ? used.error.message : String(used.error)}
          </p>
        ) : null}
        <UsageTable usage={used.data ?? usage} />
      </Panel>
    </div>
  );
}
