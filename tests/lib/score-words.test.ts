import { describe, expect, it } from "vitest";
import { percentileText, scoreItemsOf, zText } from "@/components/score/words";

// UX.md, "Numbers and words": z with 2 decimals; percentiles with 1 decimal, "< 0.1" or "> 99.9"
// at the extremes; the issue: a percentile that is only a bound is said as one ("below …").
describe("numbers on the score page", () => {
  it("writes percentiles with one decimal and the extremes in words", () => {
    expect(percentileText(83.64)).toBe("83.6");
    expect(percentileText(0.03)).toBe("< 0.1");
    expect(percentileText(99.97)).toBe("> 99.9");
    expect(percentileText(null)).toBe("—");
  });
  it("says a bound as a bound, never as '< 0.1' inside it", () => {
    expect(percentileText(0.41, "below")).toBe("below 0.4");
    expect(percentileText(0.01, "below")).toBe("below 0.1");
    expect(percentileText(99.6, "above")).toBe("above 99.6");
    expect(percentileText(99.99, "above")).toBe("above 99.9");
    expect(zText(-2.6449, "below")).toBe("below -2.64");
    expect(zText(0.981)).toBe("0.98");
    expect(zText(null)).toBe("—");
  });
});

describe("the request the score page sends", () => {
  const units = { K: "mmol/L", CREA: "umol/L" };
  it("sends the patient once per item, the birth date winning over years, and a unit only where it differs", () => {
    const items = scoreItemsOf(
      { sex: "F", ageYears: "54", birthDate: "1971-06-14", collectedOn: "2026-03-02" },
      [
        { key: "row1", analyte: "K", value: "4,9", unit: "mmol/L" },
        { key: "row2", analyte: "CREA", value: "<20", unit: "mg/dL" },
      ],
      units,
    );
    expect(items).toEqual([
      { analyte: "K", value: 4.9, ref: "row1", sex: "F", birthDate: "1971-06-14", collectedAt: "2026-03-02" },
      { analyte: "CREA", value: "<20", unit: "mg/dL", ref: "row2", sex: "F", birthDate: "1971-06-14", collectedAt: "2026-03-02" },
    ]);
  });
  it("sends the age in years without a birth date, and nothing for a sex or age not given", () => {
    expect(scoreItemsOf({ sex: "", ageYears: "2.5", birthDate: "", collectedOn: "" }, [{ key: "row1", analyte: "K", value: "3.9", unit: "" }], units)).toEqual([
      { analyte: "K", value: 3.9, ref: "row1", ageYears: 2.5 },
    ]);
    expect(scoreItemsOf({ sex: "M", ageYears: "", birthDate: "", collectedOn: "" }, [{ key: "row1", analyte: "K", value: " 1e1 ", unit: "mmol/L" }], units)).toEqual([
      { analyte: "K", value: 10, ref: "row1", sex: "M" },
    ]);
  });
});
