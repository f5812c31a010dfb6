"use client";

import { useRouter } from "next/navigation";
import { useState, type FormEvent, type ReactNode } from "react";
import { readProblem } from "@/components/studies/api";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";

export interface VersionActionsProps {
  versionId: string;
  label: string;
  state: "draft" | "awaiting_signoff" | "in_force" | "superseded" | "withdrawn";
  /** A lab user on a draft. */
  canSubmit: boolean;
  /** A director who never drafted, revised or submitted the version, on one awaiting sign-off. */
  canDecide: boolean;
  /** Why a director may not sign or return this version (segregation of duties), or null. */
  dutyRule: string | null;
  /** A director who never drafted, revised or submitted the version, on one in force. */
  canKeepOrWithdraw: boolean;
  /** The first signing of this session asks for the e-mail too. */
  emailNeeded: boolean;
}

type Status = { kind: "idle" } | { kind: "busy" } | { kind: "error"; message: string };

/** One move: POSTs the body to the version's route and reloads the page on success; the typed input stays on a refusal. */
function useMove(versionId: string) {
  const router = useRouter();
  const [status, setStatus] = useState<Status>({ kind: "idle" });
  async function post(move: string, body?: unknown): Promise<boolean> {
    setStatus({ kind: "busy" });
    const res = await fetch(`/api/v1/interval-versions/${versionId}/${move}`, {
      method: "POST",
      headers: body === undefined ? undefined : { "content-type": "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
    }).catch(() => null);
    if (res?.ok) {
      setStatus({ kind: "idle" });
      router.refresh();
      return true;
    }
    setStatus({ kind: "error", message: res ? await readProblem(res) : "The server could not be reached; check the connection and try again." });
    return false;
  }
  return { status, post };
}

function Problem({ status }: { status: Status }) {
  return status.kind === "error" ? (
    <p role="alert" className="rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high">
      {status.message}
    </p>
  ) : null;
}

function ActionPanel({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section aria-labelledby={`${id}-title`} className="space-y-3 rounded-lg border border-ink-200 bg-white p-4" data-testid={id}>
      <h2 id={`${id}-title`}>{title}</h2>
      {children}
    </section>
  );
}

function TextArea({ name, label, value, onChange, hint }: { name: string; label: string; value: string; onChange: (v: string) => void; hint?: string }) {
  return (
    <div className="space-y-1">
      <label htmlFor={name} className="block text-xs font-medium uppercase tracking-wide text-ink-600">
        {label}
      </label>
      <textarea
        id={name}
        name={name}
        required
        rows={3}
        value={value}
        onChange={(e) => onChange(e.target.value)}
        className="block w-full rounded-md border border-ink-300 bg-white px-2.5 py-1.5 text-sm text-ink-900 focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500"
      />
      {hint ? <p className="text-xs text-ink-500">{hint}</p> : null}
    </div>
  );
}

function SubmitPanel({ versionId, label }: { versionId: string; label: string }) {
  const { status, post } = useMove(versionId);
  return (
    <ActionPanel id="submit-panel" title="Submit for sign-off">
      <p className="text-sm text-ink-700">
        Submitting sends {label} to the directors. It can no longer be edited unless a director returns it to draft.
      </p>
      <Problem status={status} />
      <Button type="button" onClick={() => post("submit")} disabled={status.kind === "busy"}>
        {status.kind === "busy" ? "Submitting…" : "Submit for sign-off"}
      </Button>
    </ActionPanel>
  );
}

function ReturnPanel({ versionId }: { versionId: string }) {
  const { status, post } = useMove(versionId);
  const [comment, setComment] = useState("");
  async function submit(e: FormEvent) {
    e.preventDefault();
    if (await post("return", { comment })) setComment("");
  }
  return (
    <ActionPanel id="return-panel" title="Return to draft">
      <form onSubmit={submit} className="space-y-3">
        <TextArea name="return-comment" label="Comment for the author (required)" value={comment} onChange={setComment} hint="Say what must change before you can sign it off." />
        <Problem status={status} />
        <Button type="submit" variant="secondary" disabled={status.kind === "busy" || comment.trim() === ""}>
          {status.kind === "busy" ? "Returning…" : "Return to draft"}
        </Button>
      </form>
    </ActionPanel>
  );
}

function SignPanel({ versionId, label, emailNeeded }: { versionId: string; label: string; emailNeeded: boolean }) {
  const { status, post } = useMove(versionId);
  const [email, setEmail] = useState("");
  const [password, setPassword] = useState("");
  async function submit(e: FormEvent) {
    e.preventDefault();
    const body = { password, meaning: "approved_for_clinical_use", ...(emailNeeded ? { email } : {}) };
    if (!(await post("sign", body))) setPassword("");
  }
  return (
    <ActionPanel id="signature-panel" title="Electronic signature">
      <div className="rounded-md border border-tide-600/30 bg-tide-50 px-3 py-2 text-sm text-ink-800">
        <p>
          Meaning of this signature: <strong data-testid="signature-meaning">Approved for clinical use</strong>.
        </p>
        <p className="mt-1">
          By signing you approve {label} for clinical use. It goes in force at the moment of signing and supersedes the version
          in force of the analyte. Your name, the time, this meaning and the SHA-256 of the version&apos;s content are kept with
          the signature and shown wherever the version is shown.
        </p>
      </div>
      <form onSubmit={submit} className="grid gap-3 sm:max-w-md">
        {emailNeeded ? (
          <TextField
            label="E-mail"
            name="sign-email"
            type="email"
            autoComplete="username"
            required
            value={email}
            onChange={(e) => setEmail(e.target.value)}
            hint="Asked at your first signature in this session; later ones ask the password only."
          />
        ) : null}
        <TextField label="Password" name="sign-password" type="password" autoComplete="current-password" required value={password} onChange={(e) => setPassword(e.target.value)} />
        <Problem status={status} />
        <div>
          <Button type="submit" disabled={status.kind === "busy" || password === "" || (emailNeeded && email === "")}>
            {status.kind === "busy" ? "Signing…" : "Sign: approved for clinical use"}
          </Button>
        </div>
      </form>
    </ActionPanel>
  );
}

function ReviewPanel({ versionId }: { versionId: string }) {
  const { status, post } = useMove(versionId);
  const [comment, setComment] = useState("");
  const [password, setPassword] = useState("");
  async function submit(e: FormEvent) {
    e.preventDefault();
    const ok = await post("review", { password, comment });
    setPassword("");
    if (ok) setComment("");
  }
  return (
    <ActionPanel id="review-panel" title="Confirm still valid">
      <p className="text-sm text-ink-700">
        A signature with the meaning <strong>Reviewed: still valid</strong> sets the next review date. Changing the limits needs a new version.
      </p>
      <form onSubmit={submit} className="grid gap-3 sm:max-w-md">
        <TextArea name="review-comment" label="Review comment (required)" value={comment} onChange={setComment} />
        <TextField label="Password" name="review-password" type="password" autoComplete="current-password" required value={password} onChange={(e) => setPassword(e.target.value)} />
        <Problem status={status} />
        <div>
          <Button type="submit" variant="secondary" disabled={status.kind === "busy" || comment.trim() === "" || password === ""}>
            {status.kind === "busy" ? "Signing…" : "Confirm still valid"}
          </Button>
        </div>
      </form>
    </ActionPanel>
  );
}

function WithdrawPanel({ versionId }: { versionId: string }) {
  const { status, post } = useMove(versionId);
  const [reason, setReason] = useState("");
  const [password, setPassword] = useState("");
  const [reinstate, setReinstate] = useState(false);
  async function submit(e: FormEvent) {
    e.preventDefault();
    await post("withdraw", { password, reason, reinstatePrevious: reinstate });
    setPassword("");
  }
  return (
    <ActionPanel id="withdraw-panel" title="Withdraw">
      <p className="text-sm text-ink-700">
        Withdrawing (meaning <strong>Withdrawn from use</strong>) leaves no interval in force for the analyte unless you reinstate
        the previous version in the same act, with a new signature. Until then scoring answers that no interval is in force.
      </p>
      <form onSubmit={submit} className="grid gap-3 sm:max-w-md">
        <TextArea name="withdraw-reason" label="Reason (required)" value={reason} onChange={setReason} />
        <label className="flex items-center gap-2 text-sm text-ink-800">
          <input type="checkbox" checked={reinstate} onChange={(e) => setReinstate(e.target.checked)} />
          Reinstate the previous version (signed again as approved for clinical use)
        </label>
        <TextField label="Password" name="withdraw-password" type="password" autoComplete="current-password" required value={password} onChange={(e) => setPassword(e.target.value)} />
        <Problem status={status} />
        <div>
          <Button type="submit" variant="danger" disabled={status.kind === "busy" || reason.trim() === "" || password === ""}>
            {status.kind === "busy" ? "Withdrawing…" : "Withdraw"}
          </Button>
        </div>
      </form>
    </ActionPanel>
  );
}

/** The moves open to the caller on this version, the signature panel last. */
export function VersionActions(props: VersionActionsProps) {
  const { versionId, label, state } = props;
  const panels: ReactNode[] = [];
  if (state === "draft" && props.canSubmit) panels.push(<SubmitPanel key="submit" versionId={versionId} label={label} />);
  if (state === "awaiting_signoff" && props.dutyRule) {
    panels.push(
      <p key="duty" role="note" className="rounded-md border border-ink-300 bg-ink-100 px-3 py-2 text-sm text-ink-800" data-testid="duty-rule">
        {props.dutyRule}
      </p>,
    );
  }
  if (state === "awaiting_signoff" && props.canDecide) {
    panels.push(<ReturnPanel key="return" versionId={versionId} />);
    panels.push(<SignPanel key="sign" versionId={versionId} label={label} emailNeeded={props.emailNeeded} />);
  }
  if (state === "in_force" && props.canKeepOrWithdraw) {
    panels.push(<ReviewPanel key="review" versionId={versionId} />);
    panels.push(<WithdrawPanel key="withdraw" versionId={versionId} />);
  }
  if (panels.length === 0) return null;
  return (
    <div className="space-y-4 print:hidden" id="actions">
      {panels}
    </div>
  );
}
