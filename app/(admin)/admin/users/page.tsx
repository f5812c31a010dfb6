import type { Metadata } from "next";
import { CreateUserForm } from "@/components/admin/create-user-form";
import { UsersTable, type UserRow } from "@/components/admin/users-table";
import { PageHeader, Panel } from "@/components/ui/panel";
import { db } from "@/db/client";
import { listUsers } from "@/db/queries/users";
import { formatDateTime } from "@/lib/format";
import { requirePageCaller } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Users" };

export default async function UsersPage() {
  const caller = await requirePageCaller("users:manage");
  const users = await listUsers(db());
  const rows: UserRow[] = users.map((u) => ({
    id: u.id,
    name: u.name,
    email: u.email,
    role: u.role,
    active: u.active,
    lastSignIn: formatDateTime(u.lastSignInAt),
    created: formatDateTime(u.createdAt),
    isSelf: u.id === caller.id,
  }));
  return (
    <>
      <PageHeader
        title="Users"
        lead="Who may use Bellwether and in which role. Deactivating an account ends its sessions at once; accounts are never deleted, so the audit trail keeps its names."
      />
      <div className="grid items-start gap-5 2xl:grid-cols-[1fr_20rem]">
        <Panel title={`${rows.length} users`}>
          <UsersTable rows={rows} />
        </Panel>
        <Panel title="New user">
          <CreateUserForm />
        </Panel>
      </div>
    </>
  );
}
