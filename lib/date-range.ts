/**
 * Calendar days typed as YYYY-MM-DD (the audit trail's "from" and "to"), read strictly: a day
 * that is not in the calendar is an error with a message, never rolled over into the next month
 * the way `new Date("2024-02-31")` rolls into March.
 */
export interface CalendarDay {
  year: number;
  month: number;
  day: number;
}

export type DayParse = { ok: true; day: CalendarDay } | { ok: false; message: string };

const MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October", "November", "December"];

function isLeapYear(year: number): boolean {
  return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
}

export function daysInMonth(year: number, month: number): number {
  return month === 2 ? (isLeapYear(year) ? 29 : 28) : [4, 6, 9, 11].includes(month) ? 30 : 31;
}

export function parseCalendarDay(text: string): DayParse {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text);
  if (!match) return { ok: false, message: `"${text}" is not a date; write it as YYYY-MM-DD, e.g. 2026-03-02.` };
  const [year, month, day] = match.slice(1).map(Number);
  if (year < 1) return { ok: false, message: `${text} is not a date: there is no year 0000.` };
  if (month < 1 || month > 12) return { ok: false, message: `${text} is not a date: there is no month ${match[2]}.` };
  const last = daysInMonth(year, month);
  if (day < 1 || day > last) {
    return { ok: false, message: `${text} is not a date: ${MONTHS[month - 1]} ${year} has ${last} days.` };
  }
  return { ok: true, day: { year, month, day } };
}

function compareDays(a: CalendarDay, b: CalendarDay): number {
  return a.year - b.year || a.month - b.month || a.day - b.day;
}

export interface DayRange {
  from?: CalendarDay;
  /** The last day included. */
  to?: CalendarDay;
  errors: { from?: string; to?: string };
}

/** Reads an optional from-to pair of days; `from` after `to` is an error on `to`. */
export function parseDayRange({ from, to }: { from?: string; to?: string }): DayRange {
  const range: DayRange = { errors: {} };
  if (from) {
    const parsed = parseCalendarDay(from);
    if (parsed.ok) range.from = parsed.day;
    else range.errors.from = parsed.message;
  }
  if (to) {
    const parsed = parseCalendarDay(to);
    if (parsed.ok) range.to = parsed.day;
    else range.errors.to = parsed.message;
  }
  if (range.from && range.to && compareDays(range.from, range.to) > 0) {
    range.errors.to = `The end date ${to} is before the start date ${from}; choose an end on or after the start.`;
  }
  return range;
}

/** Midnight at the start of a day, in the server's time zone (as the audit table shows times). */
export function startOfDay({ year, month, day }: CalendarDay): Date {
  const date = new Date(year, month - 1, day);
  // Years 1-99 would otherwise be read as 1901-1999.
  date.setFullYear(year);
  return date;
}

/** Midnight at the start of the following day: the exclusive end of a range that includes `day`. */
export function startOfNextDay({ year, month, day }: CalendarDay): Date {
  const date = new Date(year, month - 1, day + 1);
  date.setFullYear(year, month - 1, day + 1);
  return date;
}
