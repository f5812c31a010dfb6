import { formatDateTime } from "@/lib/format";

export interface SignatureView {
  id: string;
  signer: { name: string };
  at: Date;
  meaningLabel: string;
  contentSha256: string;
  comment: string | null;
}

/**
 * A version's electronic signatures: the signer's printed name, the time and the meaning in words,
 * with the SHA-256 of the signed content (so that anyone can recompute it).
 */
export function SignatureList({ signatures, full = false }: { signatures: SignatureView[]; full?: boolean }) {
  if (signatures.length === 0) {
    return <p className="text-sm text-ink-600" data-testid="no-signatures">No electronic signature on this version yet.</p>;
  }
  return (
    <ul className="space-y-2" data-testid="signatures">
      {signatures.map((s) => (
        <li key={s.id} className="rounded-md border border-ink-200 bg-white px-3 py-2 text-sm break-inside-avoid">
          <p>
            <span className="font-semibold text-ink-900">{s.signer.name}</span>
            <span className="text-ink-600"> · signed {formatDateTime(s.at)} · </span>
            <span className="font-medium text-ink-900">{s.meaningLabel}</span>
          </p>
          {s.comment ? <p className="mt-0.5 text-ink-700">Comment: {s.comment}</p> : null}
          <p className={`mt-0.5 font-mono text-xs text-ink-500 ${full ? "break-all" : "truncate"}`}>Content SHA-256 {s.contentSha256}</p>
        </li>
      ))}
    </ul>
  );
}
