import type { ReactNode } from "react";
import { SignedInLayout } from "@/components/shell/signed-in-layout";

export const dynamic = "force-dynamic";

export default function Layout({ children }: { children: ReactNode }) {
  return <SignedInLayout>{children}</SignedInLayout>;
}
