import type { ReactNode } from "react";
import { AppShell } from "@/components/shell/app-shell";
import { db } from "@/db/client";
import { getLaboratoryName } from "@/db/queries/laboratory";
import { requirePageCaller } from "@/lib/auth/session";

export const dynamic = "force-dynamic";

/** Signed-in users only, inside the app shell. */
export default async function Layout({ children }: { children: ReactNode }) {
  const caller = await requirePageCaller();
  const laboratoryName = await getLaboratoryName(db());
  return (
    <AppShell caller={caller} laboratoryName={laboratoryName}>
      {children}
    </AppShell>
  );
}
