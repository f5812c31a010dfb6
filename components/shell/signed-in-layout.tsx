import type { ReactNode } from "react";
import { db } from "@/db/client";
import { getLaboratoryName } from "@/db/queries/laboratory";
import { requirePageCaller } from "@/lib/auth/session";
import { AppShell } from "./app-shell";

/** Shared by the route groups' layouts: signed-in users only, inside the app shell. */
export async function SignedInLayout({ children }: { children: ReactNode }) {
  const caller = await requirePageCaller();
  const laboratoryName = await getLaboratoryName(db());
  return (
    <AppShell caller={caller} laboratoryName={laboratoryName}>
      {children}
    </AppShell>
  );
}
