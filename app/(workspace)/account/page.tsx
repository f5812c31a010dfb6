import type { Metadata } from "next";
import { redirect } from "next/navigation";
import Link from "next/link";
import { ChangePasswordForm } from "@/components/account/change-password-form";
import { PageHeader, Panel } from "@/components/ui/panel";
import { nextAuthSession, requirePageCaller } from "@/lib/auth/session";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { changeOwnPasswordAction } from "./actions";

export const metadata: Metadata = { title: "Account" };

export default async function AccountPage() {
  const caller = await requirePageCaller();
  const session = await nextAuthSession();
  if (!session) redirect("/sign-in");
  return (
    <>
      <PageHeader title="Account" />
      <div className="grid gap-5 lg:grid-cols-2">
        <Panel title="You">
          <dl className="grid grid-cols-[8rem_1fr] gap-y-2 text-sm">
            <dt className="text-ink-500">Name</dt>
            <dd>{caller.name}</dd>
            <dt className="text-ink-500">E-mail</dt>
            <dd>{caller.email}</dd>
            <dt className="text-ink-500">Role</dt>
            <dd>{ROLE_LABELS[caller.role]}</dd>
          </dl>
          <p className="mt-4 text-xs text-ink-500">Your name, e-mail and role are managed by an administrator.</p>
          <p className="mt-2 text-xs text-ink-500">
            Connecting a laboratory system? Read the <Link href="/api-docs">API guide</Link>.
          </p>
        </Panel>
        <Panel title="Change password">
          <ChangePasswordForm session={session} action={changeOwnPasswordAction} />
        </Panel>
      </div>
    </>
  );
}
