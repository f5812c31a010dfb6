/** A labelled progress bar: the share done (0–1) and, beside it, what that share means in words. */
export function ProgressBar({ label, value, detail }: { label: string; value: number; detail?: string }) {
  const percent = Math.round(Math.min(1, Math.max(0, value)) * 100);
  return (
    <div className="space-y-1">
      <div className="flex justify-between gap-3 text-xs text-ink-600">
        <span className="font-medium">{label}</span>
        <span>{detail ?? `${percent}%`}</span>
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent}
        aria-valuetext={detail ?? `${percent}%`}
        className="h-2 overflow-hidden rounded-full bg-ink-100"
      >
        <div className="h-full rounded-full bg-tide-500 transition-[width] duration-150" style={{ width: `${percent}%` }} />
      </div>
    </div>
  );
}
