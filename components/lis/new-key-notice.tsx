"use client";

import { useRef, useState } from "react";
import { Button } from "@/components/ui/button";

/**
 * The key of a connection just created: shown this once, with a copy button and a plain warning.
 * Dismissing it forgets the key in the browser too.
 */
export function NewKeyNotice({ name, keyText, onDone }: { name: string; keyText: string; onDone: () => void }) {
  const [copied, setCopied] = useState<"no" | "yes" | "failed">("no");
  const field = useRef<HTMLInputElement>(null);
  const copy = async () => {
    try {
      await navigator.clipboard.writeText(keyText);
      setCopied("yes");
    } catch {
      // Without clipboard access (an insecure origin), select the key so Ctrl+C copies it.
      field.current?.select();
      setCopied("failed");
    }
  };
  return (
    <section aria-labelledby="new-key-title" className="space-y-3 rounded-lg border-2 border-amber-300 bg-amber-50 p-4" data-testid="new-key">
      <h2 id="new-key-title">The key for {name}</h2>
      <p className="text-sm font-medium text-ink-900" role="alert">
        Copy this key now and give it to the people who configure the LIS. It will not be shown again: Bellwether keeps only a
        fingerprint of it. If it is lost, revoke this connection and create a new one.
      </p>
      <div className="flex flex-wrap items-center gap-2">
        <label htmlFor="new-key-value" className="sr-only">
          API key
        </label>
        <input
          id="new-key-value"
          ref={field}
          readOnly
          value={keyText}
          onFocus={(e) => e.currentTarget.select()}
          className="min-w-0 flex-1 rounded-md border border-ink-300 bg-white px-2.5 py-1.5 font-mono text-sm text-ink-900"
          data-testid="new-key-value"
        />
        <Button type="button" onClick={copy}>
          Copy key
        </Button>
        <Button type="button" variant="secondary" onClick={onDone}>
          I have stored the key
        </Button>
      </div>
      <p className="text-xs text-ink-600" aria-live="polite">
        {copied === "yes"
          ? "Copied to the clipboard."
          : copied === "failed"
            ? "The browser did not allow copying: the key is selected, press Ctrl+C (⌘C on a Mac)."
            : "The LIS sends it with every request as: Authorization: Bearer <key>."}
      </p>
    </section>
  );
}
