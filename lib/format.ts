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
