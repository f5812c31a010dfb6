/** Bellwether's mark: a bell curve with its central 95% shaded, beside the name. */
export function Wordmark({ inverted = false }: { inverted?: boolean }) {
  return (
    <span className="inline-flex items-center gap-2">
      <svg viewBox="0 0 32 20" width="32" height="20" aria-hidden="true">
        <path d="M6 17 C10 17 11 3 16 3 C21 3 22 17 26 17 Z" className="fill-bronze-300/60" />
        <path d="M1 17 C7 17 10 3 16 3 C22 3 25 17 31 17" fill="none" strokeWidth="2" className="stroke-bronze-500" />
        <line x1="1" y1="18.5" x2="31" y2="18.5" strokeWidth="1" className={inverted ? "stroke-ink-300" : "stroke-ink-400"} />
      </svg>
      <span className={`text-lg font-semibold tracking-tight ${inverted ? "text-white" : "text-ink-900"}`}>Bellwether</span>
    </span>
  );
}
