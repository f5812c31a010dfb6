/**
 * The one rule for turning a partition's age band in years (as the scientist gives it) into the
 * days an interval version stores: days = Math.round(years × 365.25), the mean Julian year
 * (common practice, no source; the uploads use the same rule for an `age_years` column). It is
 * monotone, so bands that meet in years ([0, 18) and [18, 120)) still meet in days.
 */
export const DAYS_PER_YEAR = 365.25;

/**
 * Age in years → whole days by the rule above; null stays null (no bound).
 * @example ageYearsToDays(18) // 6575
 */
export function ageYearsToDays(years: number | null): number | null {
  return years === null ? null : Math.round(years * DAYS_PER_YEAR);
}
