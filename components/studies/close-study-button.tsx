"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { readProblem } from "./api";

/**
 * Closes the study after saying in words what closing means. A refusal (already closed, a role
 * that may not) is shown with the next step.
 */
export function CloseStudyButton({ studyId, pendingUploads }: { studyId: string; pendingUploads: number }) {
  const router = useRouter();
  const [confirming, setConfirming] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  async function close() {
    setBusy(true);
    setError(null);
    const res = await fetch(`/api/v1/studies/${studyId}/close`, { method: "POST" }).catch(() => null);
    setBusy(false);
    if (res?.ok) {
      setConfirming(false);
      router.refresh();
      return;
    }
    setError(res ? `${await readProblem(res)} Reload the page to see the study as it is now.` : "The server could not be reached; check the connection and try again.");
  }

  if (!confirming) {
    return (
      <Button type="button" variant="secondary" onClick={() => setConfirming(true)}>
        Close the study…
      </Button>
    );
  }
  return (
    <div role="dialog" aria-labelledby="close-study-title" className="w-full max-w-md space-y-2 rounded-md border border-signal-high/40 bg-white p-3 text-sm">
      <p id="close-study-title" className="font-semibold text-ink-900">
        Close this study?
      </p>
      <p className="text-ink-700">
        A closed study takes no more uploads, exclusions, estimates or drafts; its data stays readable. It cannot be reopened.
        {pendingUploads > 0
          ? ` ${pendingUploads === 1 ? "The upload that awaits commit is" : `The ${pendingUploads} uploads that await commit are`} cancelled with it.`
          : ""}
      </p>
      {error ? (
        <p role="alert" className="rounded-md bg-red-50 px-3 py-2 text-signal-high">
          {error}
        </p>
      ) : null}
      <div className="flex gap-2">
        <Button type="button" variant="danger" onClick={close} disabled={busy}>
          {busy ? "Closing…" : "Close the study"}
        </Button>
        <Button type="button" variant="secondary" onClick={() => setConfirming(false)} disabled={busy}>
          Keep it open
        </Button>
      </div>
    </div>
  );
}
