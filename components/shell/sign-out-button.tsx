"use client";

import { signOut } from "next-auth/react";

export function SignOutButton({ tone = "dark" }: { tone?: "dark" | "light" }) {
  return (
    <button
      type="button"
      onClick={() => signOut({ callbackUrl: "/sign-in" })}
      className={`whitespace-nowrap rounded-md border px-2.5 py-1 text-xs font-medium ${
        tone === "dark" ? "border-ink-600 text-ink-100 hover:bg-ink-800" : "border-ink-300 text-ink-700 hover:bg-ink-100"
      }`}
    >
      Sign out
    </button>
  );
}
