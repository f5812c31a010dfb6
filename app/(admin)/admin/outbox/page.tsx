import type { Metadata } from "next";
import { OutboxTable } from "@/components/outbox/outbox-table";
import { PageHeader, Panel } from "@/components/ui/panel";
import { requirePageCaller } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Outbox" };

export default async function OutboxPage() {
  await requirePageCaller("users:manage");
  return (
    <>
      <PageHeader
        title="Outbox"
        lead="Every e-mail Bellwether has queued, newest first: submissions, returns, sign-offs and reviews coming due. Messages are delivered in the background and retried when the provider fails; one that keeps failing is marked failed and stays here."
      />
      <Panel>
        <OutboxTable />
      </Panel>
    </>
  );
}
