/**
 * Method advice about where routine results came from.
 */
import type { RoutineResult } from "./cleaning";

/** Above this share one setting dominates the results (Bellwether's stated threshold). */
export const DOMINANT_SETTING_SHARE = 0.8;

export interface SettingShare {
  /** The setting as written first in the data ("(none)" for results without one). */
  setting: string;
  count: number;
  share: number;
}

/**
 * Results per setting (compared without regard to case), largest first, and a warning when one
 * setting other than a low-prevalence one holds more than {@link DOMINANT_SETTING_SHARE} of the
 * results: the estimate then describes that population (Jones et al. 2019 prefer outpatients,
 * primary care and health checks; a warning names the setting so the scientist can judge).
 * @see Jones GRD et al. Clin Chem Lab Med 2019;57:20–29 (low-prevalence sources).
 * Complexity O(n). Throws nothing.
 * @example settingShares(rows).warning
 */
export function settingShares(
  rows: readonly RoutineResult[],
  lowPrevalence: readonly string[] = ["outpatient", "primary care", "health check"],
): { shares: SettingShare[]; warning: string | null } {
  const counts = new Map<string, SettingShare>();
  for (const r of rows) {
    const name = r.setting == null || r.setting.trim() === "" ? "(none)" : r.setting.trim();
    const key = name.toLowerCase();
    const s = counts.get(key) ?? { setting: name, count: 0, share: 0 };
    s.count++;
    counts.set(key, s);
  }
  const shares = [...counts.values()]
    .map((s) => ({ ...s, share: rows.length === 0 ? 0 : s.count / rows.length }))
    .sort((a, b) => b.count - a.count || a.setting.localeCompare(b.setting));
  const top = shares[0];
  const low = new Set(lowPrevalence.map((s) => s.toLowerCase()));
  const warning =
    top && top.share > DOMINANT_SETTING_SHARE && top.setting !== "(none)" && !low.has(top.setting.toLowerCase())
      ? `${(top.share * 100).toFixed(0)}% of the results come from the setting "${top.setting}": the estimate describes that population, which may hold more disease than the laboratory's reference population.`
      : null;
  return { shares, warning };
}
