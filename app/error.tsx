"use client";

import Link from "next/link";
import { Button } from "@/components/ui/button";

/**
 * What a page shows when rendering it failed on the server, most often because the database was
 * out of reach for a moment (the API answers 503 with Retry-After then; a page cannot). No detail
 * of the failure reaches the browser: the server log has it under the digest shown here.
 */
export default function PageError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="mx-auto max-w-lg px-6 py-16" data-testid="page-error">
      <h1>This page could not be shown just now</h1>
      <p className="mt-2 text-sm text-ink-600">
        Bellwether could not finish reading what this page needs, usually because its database was out of reach for a
        moment. Opening a page changes nothing. Try again in a few seconds; if it keeps happening, tell your administrator
        {error.digest ? ` and quote reference ${error.digest}` : ""}.
      </p>
      <div className="mt-4 flex items-center gap-4 text-sm">
        <Button type="button" onClick={reset}>
          Try again
        </Button>
        <Link href="/">Back to the overview</Link>
      </div>
    </div>
  );
}
