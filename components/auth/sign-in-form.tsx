"use client";

import { signIn } from "next-auth/react";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";

export function SignInForm({ callbackUrl }: { callbackUrl: string }) {
  const [error, setError] = useState<string | null>(null);
  const [pending, setPending] = useState(false);

  async function onSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    setPending(true);
    setError(null);
    const result = await signIn("credentials", {
      email: String(form.get("email") ?? ""),
      password: String(form.get("password") ?? ""),
      callbackUrl,
      redirect: false,
    });
    if (!result || result.error) {
      setPending(false);
      setError(result?.error && result.error !== "CredentialsSignin" ? result.error : "The e-mail or password is not right.");
      return;
    }
    // A full navigation, so the next page is rendered on the server with the new session.
    window.location.assign(callbackUrl);
  }

  return (
    <form onSubmit={onSubmit} className="space-y-4" noValidate>
      <TextField label="E-mail" name="email" type="email" autoComplete="username" required autoFocus />
      <TextField label="Password" name="password" type="password" autoComplete="current-password" required />
      {error ? (
        <p role="alert" data-testid="sign-in-error" className="rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high">
          {error}
        </p>
      ) : null}
      <Button type="submit" className="w-full" disabled={pending}>
        {pending ? "Signing in…" : "Sign in"}
      </Button>
    </form>
  );
}
