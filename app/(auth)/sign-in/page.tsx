import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { SignInForm } from "@/components/auth/sign-in-form";
import { Wordmark } from "@/components/shell/wordmark";
import { currentCaller } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Sign in" };
export const dynamic = "force-dynamic";

/** Only same-site paths are followed after sign-in, never another origin. */
function safeCallback(raw: string | string[] | undefined): string {
  const value = Array.isArray(raw) ? raw[0] : raw;
  return value && value.startsWith("/") && !value.startsWith("//") ? value : "/";
}

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const params = await searchParams;
  const caller = await currentCaller();
  if (caller?.active) redirect(safeCallback(params.callbackUrl));
  return (
    <div className="flex flex-1 items-center justify-center bg-ink-900 px-4 py-12">
      <div className="w-full max-w-sm">
        <div className="mb-6 text-center">
          <Wordmark inverted />
          <p className="mt-2 text-sm text-ink-300">Reference intervals, signed off and served.</p>
        </div>
        <div className="rounded-lg bg-white p-6 shadow-lg">
          <h1 className="mb-4 text-lg">Sign in</h1>
          <SignInForm callbackUrl={safeCallback(params.callbackUrl)} />
        </div>
      </div>
    </div>
  );
}
