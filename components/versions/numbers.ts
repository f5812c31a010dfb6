/** A value with the analyte's display decimals (UX.md, "Numbers and words"); a dash for none. */
export function fixed(value: number | null | undefined, decimals: number): string {
  return value === null || value === undefined || !Number.isFinite(value) ? "—" : value.toFixed(decimals);
}

/** Limits as a range: "3.50–5.10", or one side only ("≤ 5.10", "≥ 3.50"). */
export function limitsText(limits: { low: number | null; high: number | null } | null, decimals: number): string {
  if (!limits) return "—";
  // Only LMS age curves have neither limit: theirs are read at each exact age.
  if (limits.low === null && limits.high === null) return "by age (LMS curves)";
  if (limits.low === null) return `≤ ${fixed(limits.high, decimals)}`;
  if (limits.high === null) return `≥ ${fixed(limits.low, decimals)}`;
  return `${fixed(limits.low, decimals)}–${fixed(limits.high, decimals)}`;
}

/** A 90% CI as "(3.41–3.58)", or an empty string when there is none. */
export function ciText(ci: readonly [number, number] | null | undefined, decimals: number): string {
  return ci ? `(${fixed(ci[0], decimals)}–${fixed(ci[1], decimals)})` : "";
}

export const METHOD_WORDS: Record<string, string> = {
  nonparametric: "Nonparametric",
  parametric: "Parametric",
  robust: "Robust (Horn, Pesce and Copeland)",
  adopted: "Adopted (verified external interval)",
  lms: "LMS age curves (Cole and Green)",
  indirect: "Indirect: truncated maximum likelihood on routine results",
};
