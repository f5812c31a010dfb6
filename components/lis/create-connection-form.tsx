"use client";

import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { StatusMessage } from "@/components/ui/status-message";
import { DEFAULT_RATE_PER_MINUTE, type LisConnectionOut } from "@/lib/lis/input";
import { CONNECTIONS_URL, sendJson } from "./api";

/** Creates a connection; what was typed stays in the fields when the server refuses it. */
export function CreateConnectionForm({ onCreated }: { onCreated: (created: LisConnectionOut & { key: string }) => void }) {
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const submit = async (event: FormEvent<HTMLFormElement>) => {
    event.preventDefault();
    const form = event.currentTarget;
    const data = new FormData(form);
    const rate = String(data.get("ratePerMinute") ?? "").trim();
    setPending(true);
    setError(null);
    try {
      const created = await sendJson<LisConnectionOut & { key: string }>("POST", CONNECTIONS_URL, {
        name: String(data.get("name") ?? ""),
        contactEmail: String(data.get("contactEmail") ?? ""),
        ...(rate === "" ? {} : { ratePerMinute: rate }),
      });
      form.reset();
      onCreated(created);
    } catch (err) {
      setError(err instanceof Error ? err.message : String(err));
    } finally {
      setPending(false);
    }
  };
  return (
    <form onSubmit={submit} className="space-y-3" aria-label="New LIS connection">
      <TextField label="Name" name="name" required maxLength={120} placeholder="Main LIS, production" />
      <TextField label="Contact e-mail" name="contactEmail" type="email" required placeholder="lis-team@hospital.example" hint="Told when an interval version goes in force." />
      <TextField
        label="Rate limit (requests a minute)"
        name="ratePerMinute"
        type="number"
        min={1}
        step={1}
        defaultValue={DEFAULT_RATE_PER_MINUTE}
        hint="All instances together. One request may carry up to 10,000 values."
      />
      {error ? <StatusMessage state={{ status: "error", message: error }} /> : null}
      <Button type="submit" disabled={pending}>
        {pending ? "Creating…" : "Create connection and key"}
      </Button>
    </form>
  );
}
