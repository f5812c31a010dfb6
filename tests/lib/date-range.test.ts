import { describe, expect, it } from "vitest";
import { parseCalendarDay, parseDayRange, startOfDay, startOfNextDay } from "@/lib/date-range";

// The Gregorian calendar's rules (month lengths; leap years divisible by 4, not by 100 unless
// by 400): common knowledge, no source needed.
describe("parseCalendarDay", () => {
  it("accepts real days, leap days included", () => {
    expect(parseCalendarDay("2024-02-29")).toEqual({ ok: true, day: { year: 2024, month: 2, day: 29 } });
    expect(parseCalendarDay("2000-02-29")).toEqual({ ok: true, day: { year: 2000, month: 2, day: 29 } });
    expect(parseCalendarDay("2026-12-31")).toEqual({ ok: true, day: { year: 2026, month: 12, day: 31 } });
  });

  it("refuses a month that does not exist", () => {
    expect(parseCalendarDay("2024-13-01")).toEqual({ ok: false, message: "2024-13-01 is not a date: there is no month 13." });
    expect(parseCalendarDay("2024-00-10")).toEqual({ ok: false, message: "2024-00-10 is not a date: there is no month 00." });
  });

  it("refuses days past the end of the month instead of rolling into the next", () => {
    expect(parseCalendarDay("2024-02-31")).toEqual({ ok: false, message: "2024-02-31 is not a date: February 2024 has 29 days." });
    expect(parseCalendarDay("2023-02-29")).toEqual({ ok: false, message: "2023-02-29 is not a date: February 2023 has 28 days." });
    expect(parseCalendarDay("1900-02-29")).toEqual({ ok: false, message: "1900-02-29 is not a date: February 1900 has 28 days." });
    expect(parseCalendarDay("2024-04-31")).toEqual({ ok: false, message: "2024-04-31 is not a date: April 2024 has 30 days." });
    expect(parseCalendarDay("2024-05-00")).toEqual({ ok: false, message: "2024-05-00 is not a date: May 2024 has 31 days." });
  });

  it("refuses other shapes with the format to use", () => {
    for (const text of ["2024-1-01", "01/02/2024", "2024-02-03T00:00", " 2024-02-03", "yesterday", "２０２４-01-01"]) {
      expect(parseCalendarDay(text)).toEqual({ ok: false, message: `"${text}" is not a date; write it as YYYY-MM-DD, e.g. 2026-03-02.` });
    }
    expect(parseCalendarDay("0000-01-01")).toEqual({ ok: false, message: "0000-01-01 is not a date: there is no year 0000." });
  });
});

describe("parseDayRange", () => {
  it("reads both ends and leaves absent ones out", () => {
    expect(parseDayRange({ from: "2024-01-31", to: "2024-02-01" })).toEqual({
      from: { year: 2024, month: 1, day: 31 },
      to: { year: 2024, month: 2, day: 1 },
      errors: {},
    });
    expect(parseDayRange({})).toEqual({ errors: {} });
    expect(parseDayRange({ from: "2024-03-01", to: "2024-03-01" }).errors).toEqual({});
  });

  it("says when the start is after the end", () => {
    expect(parseDayRange({ from: "2024-03-02", to: "2024-03-01" }).errors).toEqual({
      to: "The end date 2024-03-01 is before the start date 2024-03-02; choose an end on or after the start.",
    });
  });

  it("reports each bad end on its own field", () => {
    expect(parseDayRange({ from: "2024-13-01", to: "2024-02-31" }).errors).toEqual({
      from: "2024-13-01 is not a date: there is no month 13.",
      to: "2024-02-31 is not a date: February 2024 has 29 days.",
    });
  });
});

describe("day boundaries", () => {
  it("run from local midnight to the next local midnight, across month and year ends", () => {
    expect(startOfDay({ year: 2024, month: 2, day: 29 })).toEqual(new Date(2024, 1, 29, 0, 0, 0));
    expect(startOfNextDay({ year: 2024, month: 2, day: 29 })).toEqual(new Date(2024, 2, 1, 0, 0, 0));
    expect(startOfNextDay({ year: 2024, month: 12, day: 31 })).toEqual(new Date(2025, 0, 1, 0, 0, 0));
  });
});
