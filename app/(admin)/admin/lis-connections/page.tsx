import type { Metadata } from "next";
import { LisConnectionsManager } from "@/components/lis/lis-connections-manager";
import { PageHeader } from "@/components/ui/panel";
import { db } from "@/db/client";
import { lisUsage, listLisConnections } from "@/db/queries/lis-connections";
import { requirePageCaller } from "@/lib/auth/session";

export const metadata: Metadata = { title: "LIS connections" };

export default async function LisConnectionsPage() {
  await requirePageCaller("users:manage");
  const [connections, usage] = await Promise.all([listLisConnections(db()), lisUsage(db(), { now: new Date() })]);
  return (
    <>
      <PageHeader
        title="LIS connections"
        lead="The laboratory information systems that score values and read the intervals in force over the API, each with its own key and rate limit. A key is shown once, when the connection is created; revoking it refuses the key from its next request."
      />
      <LisConnectionsManager connections={connections} usage={usage} />
    </>
  );
}
