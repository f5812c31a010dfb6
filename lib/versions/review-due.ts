/** Versions due for review within this many days (or overdue) are listed and announced. */
export const REVIEW_WINDOW_DAYS = 60;

const DAY_MS = 24 * 60 * 60_000;

/**
 * A review-by date in words against `now`: "overdue by 3 days", "due today", "due in 12 days".
 * Whole calendar days in UTC.
 */
export function reviewDueWording(reviewBy: Date, now: Date): { overdue: boolean; short: string; long: string } {
  const day = (d: Date) => Math.floor(d.getTime() / DAY_MS);
  const days = day(reviewBy) - day(now);
  const plural = (n: number) => `${n} day${n === 1 ? "" : "s"}`;
  if (days < 0) return { overdue: true, short: "overdue", long: `overdue by ${plural(-days)}` };
  if (days === 0) return { overdue: false, short: "due today", long: "due today" };
  return { overdue: false, short: `due in ${plural(days)}`, long: `due in ${plural(days)}` };
}
