import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { changeOwnPasswordAction } from "@/app/(workspace)/account/actions";
import { ChangePasswordForm } from "@/components/account/change-password-form";
import { SignOutButton } from "@/components/shell/sign-out-button";
import { Wordmark } from "@/components/shell/wordmark";
import { nextAuthSession, requirePasswordChangeCaller } from "@/lib/auth/session";

export const metadata: Metadata = { title: "Choose your password" };
export const dynamic = "force-dynamic";

/**
 * Where a person lands while a password an administrator set awaits replacement: nothing else
 * in Bellwether opens until they have chosen their own (or they sign out).
 */
export default async function ChangePasswordPage() {
  const caller = await requirePasswordChangeCaller();
  const session = await nextAuthSession();
  if (!session) redirect("/sign-in");
  return (
    <div className="flex flex-1 items-center justify-center bg-ink-900 px-4 py-12">
      <div className="w-full max-w-md">
        <div className="mb-6 text-center">
          <Wordmark inverted />
        </div>
        <div className="rounded-lg bg-white p-6 shadow-lg">
          <h1 className="mb-2 text-lg">Choose your own password</h1>
          <p className="mb-4 text-sm text-ink-600" data-testid="password-change-required">
            {caller.name}, an administrator set the password you signed in with. Choose your own before you go on: until
            then Bellwether opens nothing else.
          </p>
          <ChangePasswordForm session={session} action={changeOwnPasswordAction} afterChange="overview" currentLabel="Password you were given" />
          <div className="mt-5 flex items-center justify-between border-t border-ink-100 pt-3 text-xs text-ink-500">
            <span>Signed in as {caller.email}</span>
            <SignOutButton tone="light" />
          </div>
        </div>
      </div>
    </div>
  );
}
