import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { SignInForm } from "@/components/auth/sign-in-form";
import { Wordmark } from "@/components/shell/wordmark";
import { safeCallbackPath } from "@/lib/auth/callback-url";
import { currentCaller } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Sign in" };
export const dynamic = "force-dynamic";

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const params = await searchParams;
  const caller = await currentCaller();
  // Only same-site paths are followed after sign-in, never another origin.
  const callbackUrl = safeCallbackPath(params.callbackUrl);
  if (caller?.active) redirect(callbackUrl);
  return (
    <div className="flex flex-1 items-center justify-center bg-ink-900 px-4 py-12">
      <div className="w-full max-w-sm">
        <div className="mb-6 text-center">
          <Wordmark inverted />
          <p className="mt-2 text-sm text-ink-300">Reference intervals, signed off and served.</p>
        </div>
        <div className="rounded-lg bg-white p-6 shadow-lg">
          <h1 className="mb-4 text-lg">Sign in</h1>
          <SignInForm callbackUrl={callbackUrl} />
        </div>
      </div>
    </div>
  );
}
