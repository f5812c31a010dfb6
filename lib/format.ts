/** Dates are shown in ISO order (unambiguous across locales), in the server's time zone, to the minute. */
export function formatDateTime(d: Date | null | undefined): string {
  if (!d) return "—";
  const pad = (n: number) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())} ${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** A calendar day in ISO order (2026-03-02), in the server's time zone: for tables. */
export function formatDate(d: Date | null | undefined): string {
  return formatDateTime(d).slice(0, 10);
}

/** A value or limit with the analyte's display decimals; "—" when absent. */
export function formatValue(v: number | null | undefined, decimals: number): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  return v.toFixed(decimals);
}

/** A 90% CI as "a – b" with the analyte's decimals; "—" when absent. */
export function formatCi(ci: readonly [number, number] | null | undefined, decimals: number): string {
  if (!ci) return "—";
  return `${formatValue(ci[0], decimals)} – ${formatValue(ci[1], decimals)}`;
}

/** A z-score (or another standardised statistic) with 2 decimals. */
export function formatZ(z: number | null | undefined): string {
  if (z === null || z === undefined || !Number.isFinite(z)) return "—";
  return z.toFixed(2);
}

/** A percentile with 1 decimal, and "< 0.1" or "> 99.9" at the extremes rather than 0 or 100. */
export function formatPercentile(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "—";
  if (p < 0.05) return "< 0.1";
  if (p >= 99.95) return "> 99.9";
  return p.toFixed(1);
}

/** A p-value: 3 decimals, "< 0.001" below that. */
export function formatP(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "—";
  return p < 0.001 ? "< 0.001" : p.toFixed(3);
}

/** An ISO timestamp as "2026-03-02" (tables) or "2026-03-02 14:05" (events), in the viewer's time zone. */
export function formatIsoDate(iso: string | null | undefined, withTime = false): string {
  if (!iso) return "—";
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return "—";
  return withTime ? formatDateTime(d) : formatDateTime(d).slice(0, 10);
}
