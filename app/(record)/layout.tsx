import type { ReactNode } from "react";
import { requirePageCaller } from "@/lib/auth/session";

export const dynamic = "force-dynamic";

/** Records meant for printing and filing: signed-in users only, without the app's sidebar. */
export default async function RecordLayout({ children }: { children: ReactNode }) {
  await requirePageCaller();
  return <main className="record mx-auto w-full max-w-4xl bg-white px-6 py-6 print:max-w-none print:px-0 print:py-0">{children}</main>;
}
