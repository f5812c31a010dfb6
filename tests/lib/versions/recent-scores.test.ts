import { describe, expect, it } from "vitest";
import { containsScope, recentScoreChanges, recentScoresSentences } from "@/lib/versions/recent-scores";

// Every expected count below is worked out by hand from the values beside it. The flag rule is
// DESIGN.md's: L below the lower limit, H above the upper, N within (limits inclusive); LL/HH
// strictly beyond the version's critical limits; a censored "<c" is L when c is at or below the
// lower limit, else "<" (HL7 Table 0078's off-scale code).

const adults = { sex: null, ageFromDays: 6575, ageToDays: null } as const;
const women = { sex: "F", ageFromDays: null, ageToDays: null } as const;
const men = { sex: "M", ageFromDays: null, ageToDays: null } as const;
const everyone = { sex: null, ageFromDays: null, ageToDays: null } as const;
const noCritical = { low: null, high: null };

describe("containsScope", () => {
  it("holds a partition inside one without a sex restriction and with a wider age range", () => {
    expect(containsScope(everyone, { sex: "F", ageFromDays: 0, ageToDays: 6575 })).toBe(true);
    expect(containsScope({ sex: null, ageFromDays: 0, ageToDays: 6575 }, { sex: "M", ageFromDays: 730, ageToDays: 6575 })).toBe(true);
  });
  it("does not hold a combined partition inside a sex-restricted one, nor an open age range inside a bounded one", () => {
    expect(containsScope(women, everyone)).toBe(false);
    expect(containsScope(men, women)).toBe(false);
    expect(containsScope(adults, everyone)).toBe(false);
    expect(containsScope({ sex: null, ageFromDays: 0, ageToDays: 6575 }, { sex: null, ageFromDays: 0, ageToDays: 7000 })).toBe(false);
  });
});

describe("recentScoreChanges", () => {
  it("re-flags each logged score against the covering new partition and counts the transitions", () => {
    // Logged under an "everyone" partition [3.5, 5.1]; the new version splits by sex:
    // women [3.4, 5.2], men [3.6, 5.0].
    // F: 3.45 L→N (×3), 5.15 H→N (×2), 4.0 N→N (×10)
    // M: 3.55 N→L (×4), 5.05 N→H (×1), 5.3 H→H (×2)
    const groups = [
      { partition: everyone, value: 3.45, censored: null, flag: "L", count: 3 },
      { partition: everyone, value: 5.15, censored: null, flag: "H", count: 2 },
      { partition: everyone, value: 4.0, censored: null, flag: "N", count: 10 },
    ];
    // Logged scores carry the partition that applied, so scores logged by sex are needed for a
    // split to map: re-log the same values under sex partitions.
    const byFemale = groups.map((g) => ({ ...g, partition: women }));
    const byMale = [
      { partition: men, value: 3.55, censored: null, flag: "N", count: 4 },
      { partition: men, value: 5.05, censored: null, flag: "N", count: 1 },
      { partition: men, value: 5.3, censored: null, flag: "H", count: 2 },
    ];
    const result = recentScoreChanges({
      next: [
        { ...women, low: 3.4, high: 5.2 },
        { ...men, low: 3.6, high: 5.0 },
      ],
      critical: noCritical,
      groups: [...byFemale, ...byMale, ...groups],
    });
    expect(result).toEqual({
      days: 90,
      total: 15 + 7 + 15,
      changed: 5 + 5,
      // The "everyone" scores map to neither sex partition alone.
      unmapped: 15,
      transitions: { "L→N": 3, "N→L": 4, "N→H": 1, "H→N": 2 },
      byPartition: [
        { partition: women, total: 15, changed: 5, transitions: { "L→N": 3, "H→N": 2 } },
        { partition: men, total: 7, changed: 5, transitions: { "N→L": 4, "N→H": 1 } },
      ],
      unmappedPartitions: [{ partition: everyone, count: 15 }],
    });
  });

  it("maps a narrower logged partition into a wider new one, and uses the new version's critical limits", () => {
    // Logged F adults and M adults; the new version has one adults partition [3.5, 5.1] with
    // critical limits 2.5 and 6.5. 2.4 was "L" → LL; 6.6 was "HH" → HH (unchanged); 5.0 "H" → N.
    const result = recentScoreChanges({
      next: [{ ...adults, low: 3.5, high: 5.1 }],
      critical: { low: 2.5, high: 6.5 },
      groups: [
        { partition: { sex: "F", ageFromDays: 6575, ageToDays: null }, value: 2.4, censored: null, flag: "L", count: 2 },
        { partition: { sex: "M", ageFromDays: 6575, ageToDays: 29220 }, value: 6.6, censored: null, flag: "HH", count: 1 },
        { partition: { sex: "M", ageFromDays: 6575, ageToDays: 29220 }, value: 5.0, censored: null, flag: "H", count: 4 },
      ],
    });
    expect(result).toMatchObject({ total: 7, changed: 6, unmapped: 0, transitions: { "L→LL": 2, "H→N": 4 } });
  });

  it("re-flags censored values by the censored rule, and counts scores of an unknown partition as unmapped", () => {
    // "<3.6" against [3.4, 5.2]: 3.6 is above the lower limit, so the true value may be either
    // side: "<". Against the logged [3.7, …] it was L. ">5.3" against high 5.2: H (unchanged).
    const result = recentScoreChanges({
      next: [{ ...everyone, low: 3.4, high: 5.2 }],
      critical: noCritical,
      groups: [
        { partition: everyone, value: 3.6, censored: "<", flag: "L", count: 3 },
        { partition: everyone, value: 5.3, censored: ">", flag: "H", count: 1 },
        { partition: null, value: 4, censored: null, flag: "N", count: 5 },
      ],
    });
    expect(result).toMatchObject({ total: 9, changed: 3, unmapped: 5, transitions: { "L→<": 3 }, unmappedPartitions: [{ partition: null, count: 5 }] });
  });

  it("counts nothing when nothing was logged", () => {
    const result = recentScoreChanges({ next: [{ ...everyone, low: 1, high: 2 }], critical: noCritical, groups: [] });
    expect(result).toEqual({
      days: 90,
      total: 0,
      changed: 0,
      unmapped: 0,
      transitions: {},
      byPartition: [{ partition: everyone, total: 0, changed: 0, transitions: {} }],
      unmappedPartitions: [],
    });
  });
});

describe("recentScoresSentences", () => {
  it("says how many scores would change flag, and how, in words", () => {
    expect(
      recentScoresSentences({ days: 90, total: 412, changed: 37, unmapped: 0, transitions: { "L→N": 7, "N→H": 30 } }),
    ).toEqual(["Of 412 scores in the last 90 days, 37 would change flag: 7 low → normal, 30 normal → high."]);
  });
  it("adds the unmapped scores, and says so when nothing changes or nothing was logged", () => {
    expect(recentScoresSentences({ days: 90, total: 1200, changed: 0, unmapped: 1, transitions: {} })).toEqual([
      "Of 1,200 scores in the last 90 days, none would change flag.",
      "1 score was made in partitions that no single partition of this version covers and is not re-flagged.",
    ]);
    expect(recentScoresSentences({ days: 90, total: 0, changed: 0, unmapped: 0, transitions: {} })).toEqual([
      "No patient scores were logged in the last 90 days: there is nothing to re-flag.",
    ]);
  });
});
