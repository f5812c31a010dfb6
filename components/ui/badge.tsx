import type { ReactNode } from "react";

const TONES = {
  neutral: "bg-ink-100 text-ink-700",
  brand: "bg-bronze-100 text-bronze-700",
  ok: "bg-green-50 text-signal-ok",
  // amber-800 on amber-50: signal-warn itself is below 4.5:1 there (axe color-contrast).
  warn: "bg-amber-50 text-amber-800",
  off: "bg-ink-100 text-ink-500 line-through",
} as const;

export function Badge({ tone = "neutral", children }: { tone?: keyof typeof TONES; children: ReactNode }) {
  return (
    <span className={`inline-flex items-center rounded px-1.5 py-0.5 text-xs font-medium ${TONES[tone]}`}>{children}</span>
  );
}
