"use client";

import { createColumnHelper } from "@tanstack/react-table";
import { createContext, useContext, useMemo, useState, type FormEvent } from "react";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import type { LisConnectionOut } from "@/lib/lis/input";
import { CONNECTIONS_URL, sendJson, utcMinute } from "./api";

/** What a row's controls call after a change: the page reloads the list (and the usage). */
const ChangedContext = createContext<() => void>(() => undefined);

function RateCell({ row }: { row: LisConnectionOut }) {
  const changed = useContext(ChangedContext);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  if (row.status === "revoked") return <span className="tabular-nums text-ink-500">{row.ratePerMinute.toLocaleString("en")}</span>;
  const submit = async (event: FormEvent<HTMLFormElement>) => {
    event.preventDefault();
    const value = String(new FormData(event.currentTarget).get("ratePerMinute") ?? "").trim();
    setPending(true);
    setError(null);
    setSaved(false);
    try {
      await sendJson("PATCH", `${CONNECTIONS_URL}/${row.id}`, { ratePerMinute: value });
      setSaved(true);
      changed();
    } catch (err) {
      setError(err instanceof Error ? err.message : String(err));
    } finally {
      setPending(false);
    }
  };
  return (
    <form onSubmit={submit} className="space-y-1" aria-label={`Rate limit of ${row.name}`}>
      <span className="flex items-center gap-1.5">
        <input
          name="ratePerMinute"
          type="number"
          min={1}
          step={1}
          defaultValue={row.ratePerMinute}
          aria-label={`Requests a minute for ${row.name}`}
          className="w-28 rounded border border-ink-300 bg-white px-1.5 py-1 text-right text-sm tabular-nums"
        />
        <Button type="submit" variant="secondary" disabled={pending} className="px-2 py-1 text-xs">
          Save
        </Button>
      </span>
      {error ? (
        <span role="alert" className="block max-w-xs whitespace-normal text-xs text-signal-high">
          {error}
        </span>
      ) : saved ? (
        <span role="status" className="block text-xs text-tide-700">
          Saved; in force at once.
        </span>
      ) : null}
    </form>
  );
}

function RevokeCell({ row }: { row: LisConnectionOut }) {
  const changed = useContext(ChangedContext);
  const [confirming, setConfirming] = useState(false);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<string | null>(null);
  if (row.status === "revoked") {
    return (
      <span className="text-xs text-ink-600">
        Revoked {utcMinute(row.revokedAt)}
        {row.revokedBy ? ` by ${row.revokedBy.name}` : ""}
      </span>
    );
  }
  const revoke = async () => {
    setPending(true);
    setError(null);
    try {
      await sendJson("POST", `${CONNECTIONS_URL}/${row.id}/revoke`);
      setConfirming(false);
      changed();
    } catch (err) {
      setError(err instanceof Error ? err.message : String(err));
    } finally {
      setPending(false);
    }
  };
  return confirming ? (
    <div role="group" aria-label={`Confirm revoking ${row.name}`} className="max-w-xs space-y-1.5 whitespace-normal rounded-md border border-signal-high/30 bg-red-50 p-2">
      <p className="text-xs text-ink-900">
        Revoke the key of <strong>{row.name}</strong>? Its next request is refused, on every server. This cannot be undone: the LIS
        will need a new connection and key.
      </p>
      <span className="flex gap-1.5">
        <Button type="button" variant="danger" disabled={pending} onClick={revoke} className="px-2 py-1 text-xs">
          Revoke the key
        </Button>
        <Button type="button" variant="secondary" disabled={pending} onClick={() => setConfirming(false)} className="px-2 py-1 text-xs">
          Cancel
        </Button>
      </span>
      {error ? <span role="alert" className="block text-xs text-signal-high">{error}</span> : null}
    </div>
  ) : (
    <Button type="button" variant="danger" onClick={() => setConfirming(true)} className="px-2 py-1 text-xs" aria-label={`Revoke ${row.name}`}>
      Revoke…
    </Button>
  );
}

const column = createColumnHelper<LisConnectionOut>();

/** Every LIS connection: key prefix, rate limit (editable), last use, status and revocation. */
export function ConnectionsTable({ rows, onChanged }: { rows: LisConnectionOut[]; onChanged: () => void }) {
  const columns = useMemo(
    () => [
      column.accessor("name", {
        header: "Connection",
        cell: (c) => (
          <span className="whitespace-normal">
            <span className="font-medium">{c.getValue()}</span>
            <span className="block text-xs text-ink-500">{c.row.original.contactEmail}</span>
          </span>
        ),
      }),
      column.accessor("keyPrefix", { header: "Key", cell: (c) => <code className="whitespace-nowrap text-xs">{c.getValue()}…</code> }),
      column.accessor("ratePerMinute", {
        header: "Requests a minute",
        cell: (c) => <RateCell key={`${c.row.original.id}-${c.row.original.status}`} row={c.row.original} />,
      }),
      column.accessor("lastUsedAt", {
        header: "Last used",
        cell: (c) => <span className="whitespace-nowrap tabular-nums">{c.getValue() ? utcMinute(c.getValue()) : "Never"}</span>,
      }),
      column.accessor("createdAt", {
        header: "Created",
        cell: (c) => (
          <span className="whitespace-nowrap tabular-nums">
            {c.getValue().slice(0, 10)}
            {c.row.original.createdBy ? <span className="block text-xs text-ink-500">{c.row.original.createdBy.name}</span> : null}
          </span>
        ),
      }),
      column.accessor("status", {
        header: "Status",
        cell: (c) => (c.getValue() === "active" ? <Badge tone="ok">Active</Badge> : <Badge tone="off">Revoked</Badge>),
      }),
      column.display({ id: "revoke", header: "", cell: (c) => <RevokeCell key={`${c.row.original.id}-${c.row.original.status}`} row={c.row.original} /> }),
    ],
    [],
  );
  return (
    <ChangedContext.Provider value={onChanged}>
      <div data-testid="lis-connections">
        <DataTable
          columns={columns}
          data={rows}
          caption="LIS connections, active ones first"
          emptyText="No LIS connection yet. Create one beside this list and give its key to the people who configure the LIS."
        />
      </div>
    </ChangedContext.Provider>
  );
}
