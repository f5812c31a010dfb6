import { describe, expect, it } from "vitest";
import { reviewDueWording } from "@/lib/versions/review-due";

// Whole UTC calendar days between the two dates (common practice, no source).
describe("reviewDueWording", () => {
  const now = new Date("2031-06-01T23:30:00Z");
  it("says overdue in words, with the days", () => {
    expect(reviewDueWording(new Date("2031-05-22T00:00:00Z"), now)).toEqual({ overdue: true, short: "overdue", long: "overdue by 10 days" });
    expect(reviewDueWording(new Date("2031-05-31T23:59:00Z"), now).long).toBe("overdue by 1 day");
  });
  it("counts calendar days, not 24-hour spans", () => {
    expect(reviewDueWording(new Date("2031-06-01T00:10:00Z"), now)).toEqual({ overdue: false, short: "due today", long: "due today" });
    expect(reviewDueWording(new Date("2031-06-02T00:10:00Z"), now)).toEqual({ overdue: false, short: "due in 1 day", long: "due in 1 day" });
    expect(reviewDueWording(new Date("2031-07-31T12:00:00Z"), now).long).toBe("due in 60 days");
  });
});
