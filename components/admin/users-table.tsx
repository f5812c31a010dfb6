"use client";

import { createColumnHelper } from "@tanstack/react-table";
import Link from "next/link";
import { createContext, useContext, useMemo, useState } from "react";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import { StatusMessage } from "@/components/ui/status-message";
import { useFormAction } from "@/components/ui/use-form-action";
import type { FormServerAction } from "@/lib/auth/action-state";
import { ROLE_LABELS, type Role } from "@/lib/auth/roles";
import { ROLE_OPTIONS } from "./role-options";

export interface UserRow {
  id: string;
  name: string;
  email: string;
  role: Role;
  active: boolean;
  lastSignIn: string;
  created: string;
  isSelf: boolean;
}

/** The server actions the page passes in; the table never imports them itself. */
export interface UserActions {
  changeRole: FormServerAction;
  setActive: FormServerAction;
  setPassword: FormServerAction;
}

// Cells read the actions from context: the column definitions stay the same objects across
// renders (a new cell function would remount every cell and lose what it shows).
const ActionsContext = createContext<UserActions | null>(null);

function useUserActions(): UserActions {
  const actions = useContext(ActionsContext);
  if (!actions) throw new Error("UsersTable's cells need the actions from UsersTable");
  return actions;
}

function RoleCell({ row }: { row: UserRow }) {
  const [state, onSubmit, pending] = useFormAction(useUserActions().changeRole);
  return (
    <form onSubmit={onSubmit} className="flex items-center gap-1.5" aria-label={`Role of ${row.email}`}>
      <input type="hidden" name="id" value={row.id} />
      <select
        name="role"
        defaultValue={row.role}
        aria-label={`Role for ${row.email}`}
        className="rounded border border-ink-300 bg-white px-1.5 py-1 text-sm"
      >
        {ROLE_OPTIONS.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      <Button type="submit" variant="secondary" disabled={pending} className="px-2 py-1 text-xs">
        Save
      </Button>
      {state.status === "error" ? <span className="text-xs text-signal-high">{state.message}</span> : null}
    </form>
  );
}

function AccountCell({ row }: { row: UserRow }) {
  const actions = useUserActions();
  const [state, onSubmit, pending] = useFormAction(actions.setActive);
  const [pwState, onPasswordSubmit, pwPending] = useFormAction(actions.setPassword, { resetOnSuccess: true });
  const [showPassword, setShowPassword] = useState(false);
  return (
    <div className="space-y-1">
      <div className="flex flex-wrap items-center gap-1.5">
        {row.isSelf ? (
          <span className="text-xs text-ink-500">(you)</span>
        ) : (
          <form onSubmit={onSubmit}>
            <input type="hidden" name="id" value={row.id} />
            <input type="hidden" name="active" value={row.active ? "false" : "true"} />
            <Button
              type="submit"
              variant={row.active ? "danger" : "secondary"}
              disabled={pending}
              className="px-2 py-1 text-xs"
              aria-label={`${row.active ? "Deactivate" : "Reactivate"} ${row.email}`}
            >
              {row.active ? "Deactivate" : "Reactivate"}
            </Button>
          </form>
        )}
        {row.isSelf ? (
          <Link href="/account" className="text-xs">
            Change your password under Account
          </Link>
        ) : (
          <Button
            type="button"
            variant="secondary"
            className="px-2 py-1 text-xs"
            onClick={() => setShowPassword((v) => !v)}
            aria-expanded={showPassword}
            aria-label={`Set password for ${row.email}`}
          >
            Set password
          </Button>
        )}
      </div>
      {showPassword && !row.isSelf ? (
        <form onSubmit={onPasswordSubmit} className="flex items-center gap-1.5">
          <input type="hidden" name="id" value={row.id} />
          <input
            type="password"
            name="password"
            autoComplete="new-password"
            aria-label={`New password for ${row.email}`}
            placeholder="New password"
            className="w-36 rounded border border-ink-300 px-1.5 py-1 text-sm"
          />
          <Button type="submit" disabled={pwPending} className="px-2 py-1 text-xs">
            Set
          </Button>
        </form>
      ) : null}
      {pwState.status !== "idle" ? (
        <StatusMessage
          state={pwState.status === "error" && pwState.fieldErrors?.password ? { ...pwState, message: pwState.fieldErrors.password } : pwState}
        />
      ) : null}
      {state.status === "error" ? <span className="text-xs text-signal-high">{state.message}</span> : null}
    </div>
  );
}

const column = createColumnHelper<UserRow>();

export function UsersTable({ rows, actions }: { rows: UserRow[]; actions: UserActions }) {
  const columns = useMemo(
    () => [
      column.accessor("name", { header: "Name", cell: (c) => <span className="font-medium">{c.getValue()}</span> }),
      column.accessor("email", { header: "E-mail" }),
      column.accessor("role", {
        header: "Role",
        cell: (c) => <RoleCell key={`${c.row.original.id}-${c.getValue()}`} row={c.row.original} />,
        filterFn: (row, _id, value: string) => ROLE_LABELS[row.original.role].toLowerCase().includes(value.toLowerCase()),
      }),
      column.accessor("active", {
        header: "Status",
        cell: (c) => (c.getValue() ? <Badge tone="ok">Active</Badge> : <Badge tone="off">Deactivated</Badge>),
      }),
      column.accessor("lastSignIn", { header: "Last sign-in" }),
      column.display({ id: "account", header: "Account", cell: (c) => <AccountCell row={c.row.original} /> }),
    ],
    [],
  );
  return (
    <ActionsContext.Provider value={actions}>
      <DataTable
        columns={columns}
        data={rows}
        filterPlaceholder="Filter by name, e-mail or role"
        initialSorting={[{ id: "name", desc: false }]}
        caption="Users"
      />
    </ActionsContext.Provider>
  );
}
