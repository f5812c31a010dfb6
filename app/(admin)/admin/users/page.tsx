import type { Metadata } from "next";
import { CreateUserForm } from "@/components/admin/create-user-form";
import { UsersTable, type UserRow } from "@/components/admin/users-table";
import { PageHeader, Panel } from "@/components/ui/panel";
import { db } from "@/db/client";
import { listUsers } from "@/db/queries/users";
import { formatDateTime } from "@/lib/format";
import { requirePageCaller } from "@/lib/auth/session";
import { changeRoleAction, createUserAction, setActiveAction, setPasswordAction } from "./actions";

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
        lead="Who may use Bellwether and in which role. Changing a role, deactivating an account or setting a password ends the person's sessions at once; accounts are never deleted, so the audit trail keeps its names."
      />
      <div className="grid items-start gap-5 2xl:grid-cols-[1fr_20rem]">
        <Panel title={`${rows.length} users`}>
          <UsersTable rows={rows} actions={{ changeRole: changeRoleAction, setActive: setActiveAction, setPassword: setPasswordAction }} />
        </Panel>
        <Panel title="New user">
          <CreateUserForm action={createUserAction} />
        </Panel>
      </div>
    </>
  );
}
