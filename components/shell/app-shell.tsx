import Link from "next/link";
import type { ReactNode } from "react";
import type { Caller } from "@/lib/auth/authorize";
import { navigationFor } from "@/lib/auth/navigation";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { NavLinks } from "./nav-links";
import { SignOutButton } from "./sign-out-button";
import { Wordmark } from "./wordmark";

/** The signed-in frame: navigation for the caller's role, who is signed in, the laboratory. */
export function AppShell({ caller, laboratoryName, children }: {
  caller: Caller;
  laboratoryName: string;
  children: ReactNode;
}) {
  return (
    <div className="flex min-h-0 flex-1 flex-col lg:flex-row">
      <aside className="flex shrink-0 flex-col gap-4 bg-ink-900 px-3 py-3 lg:w-56 lg:py-5">
        <div className="flex items-center justify-between gap-3 lg:block">
          <Wordmark inverted />
          <p className="mt-1 hidden text-xs text-ink-300 lg:block">{laboratoryName}</p>
        </div>
        <NavLinks items={navigationFor(caller.role)} />
        <div className="mt-auto hidden space-y-2 border-t border-ink-700 pt-3 lg:block" data-testid="signed-in-as">
          <p className="text-sm text-white">{caller.name}</p>
          <p className="text-xs text-ink-300">{ROLE_LABELS[caller.role]}</p>
          <Link href="/api-docs" className="block text-xs text-ink-300 hover:text-white">
            API for laboratory systems
          </Link>
          <SignOutButton />
        </div>
      </aside>
      <div className="flex min-w-0 flex-1 flex-col">
        <div className="flex items-center justify-between border-b border-ink-200 bg-white px-4 py-2 lg:hidden">
          <span className="text-sm text-ink-700">
            {caller.name} · {ROLE_LABELS[caller.role]}
          </span>
          <SignOutButton tone="light" />
        </div>
        <main className="flex-1 px-4 py-5 lg:px-8 lg:py-7">{children}</main>
      </div>
    </div>
  );
}
