/** Dates are shown in ISO order (unambiguous across locales), in the server's time zone, to the minute. */
export function formatDateTime(d: Date | null | undefined): string {
  if (!d) return "—";
  const pad = (n: number) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())} ${pad(d.getHours())}:${pad(d.getMinutes())}`;
}
