import type { Metadata } from "next";
import Link from "next/link";
import { PageHeader } from "@/components/ui/panel";
import { SimpleTable } from "@/components/ui/simple-table";
import { db } from "@/db/client";
import { listIntervalVersions } from "@/db/queries/interval-versions";
import { requirePageCaller } from "@/lib/auth/session";
import { formatDateTime } from "@/lib/format";

export const metadata: Metadata = { title: "Sign-off queue" };

/** The director's queue: versions awaiting sign-off, the longest waiting first. */
export default async function SignoffQueuePage() {
  await requirePageCaller("versions:sign");
  const waiting = await listIntervalVersions(db(), { query: { state: "awaiting_signoff" } });
  const rows = waiting.map((v) => ({ v })).sort((a, b) => (a.v.submittedAt?.getTime() ?? 0) - (b.v.submittedAt?.getTime() ?? 0));
  return (
    <>
      <PageHeader
        title="Sign-off queue"
        lead="Interval versions submitted for your signature, the longest waiting first. Open one to review its evidence, then sign it off or return it to draft with a comment."
      />
      <SimpleTable
        caption="Interval versions awaiting sign-off, oldest first"
        testId="signoff-queue"
        empty={
          <>
            Nothing awaits your signature. Versions appear here when a scientist submits a draft; the <Link href="/studies">studies</Link> show
            work in progress.
          </>
        }
        head={["Analyte", "Version", "Drafted by", "Submitted by", "Submitted at", ""]}
        rows={rows.map(({ v }) => [
          <span key="a">
            <span className="font-mono font-semibold">{v.analyte.code}</span> · {v.analyte.name}
          </span>,
          String(v.number),
          v.createdBy?.name ?? "—",
          v.submittedBy?.name ?? "—",
          formatDateTime(v.submittedAt),
          <Link key="r" href={`/versions/${v.id}`} className="font-medium">
            Review version {v.number} of {v.analyte.code}
          </Link>,
        ])}
      />
    </>
  );
}
