import { describe, expect, it } from "vitest";
import { compareVersions, covers, sameScope, simpleFlag } from "@/lib/versions/comparison";

// Every expected count below is worked out by hand from the values listed beside it; the flag
// rule is DESIGN.md's ("L below the lower limit, H above the upper, N within (limits inclusive)").

const everyone = { sex: null, ageFromDays: null, ageToDays: null } as const;

describe("simpleFlag (inclusive limits)", () => {
  it("gives N on a limit, L below and H above", () => {
    expect([3.4, 3.5, 4, 5.1, 5.2].map((v) => simpleFlag(v, { low: 3.5, high: 5.1 }))).toEqual(["L", "N", "N", "N", "H"]);
  });
  it("has no L for an upper limit only", () => {
    expect([0, 10, 11].map((v) => simpleFlag(v, { low: null, high: 10 }))).toEqual(["N", "N", "H"]);
  });
});

describe("partition scope", () => {
  it("matches by sex and the whole age range", () => {
    expect(sameScope({ sex: "F", ageFromDays: 0, ageToDays: 6575 }, { sex: "F", ageFromDays: 0, ageToDays: 6575 })).toBe(true);
    expect(sameScope({ sex: "F", ageFromDays: 0, ageToDays: 6575 }, { sex: "M", ageFromDays: 0, ageToDays: 6575 })).toBe(false);
    expect(sameScope({ sex: "F", ageFromDays: 0, ageToDays: 6575 }, { sex: "F", ageFromDays: 0, ageToDays: null })).toBe(false);
  });
  it("covers a half-open age range in days", () => {
    const band = { sex: null, ageFromDays: 730, ageToDays: 6575 };
    expect([729, 730, 6574, 6575].map((d) => covers(band, "F", d))).toEqual([false, true, true, false]);
    expect(covers({ sex: "M", ageFromDays: null, ageToDays: null }, "F", 10000)).toBe(false);
  });
});

describe("compareVersions", () => {
  const donors = [
    // values 3.3, 3.45, 3.6, 5.0, 5.15, 5.3 (all adults, both sexes)
    { sex: "F", ageDays: 15000, value: 3.3 },
    { sex: "M", ageDays: 15000, value: 3.45 },
    { sex: "F", ageDays: 15000, value: 3.6 },
    { sex: "M", ageDays: 15000, value: 5.0 },
    { sex: "F", ageDays: 15000, value: 5.15 },
    { sex: "M", ageDays: 15000, value: 5.3 },
  ];

  it("counts donors whose flag changes between the old and the new limits, with the transitions", () => {
    // old [3.5, 5.1]: L L N N H H; new [3.4, 5.2]: L N N N N H → 3.45 L→N, 5.15 H→N: 2 changed.
    const result = compareVersions({
      next: [{ ...everyone, low: 3.4, high: 5.2 }],
      current: [{ ...everyone, low: 3.5, high: 5.1 }],
      donors,
    });
    expect(result.partitions).toEqual([{ partition: everyone, old: { low: 3.5, high: 5.1 }, new: { low: 3.4, high: 5.2 } }]);
    expect(result.removedPartitions).toEqual([]);
    expect(result.donorFlagChanges).toEqual({
      total: 6,
      changed: 2,
      notCovered: 0,
      byPartition: [
        {
          partition: everyone,
          total: 6,
          changed: 2,
          transitions: [
            { from: "L", to: "N", count: 1 },
            { from: "H", to: "N", count: 1 },
          ],
        },
      ],
    });
  });

  it("places each donor in the old partition that covers it when the partitioning changes", () => {
    // Old: one partition [3.5, 5.1]. New: F [3.2, 5.0], M [3.5, 5.4].
    // F: 3.3 old L → new N; 3.6 N → N; 5.15 H → H. M: 3.45 L → L; 5.0 N → N; 5.3 H → N.
    const result = compareVersions({
      next: [
        { sex: "F", ageFromDays: null, ageToDays: null, low: 3.2, high: 5.0 },
        { sex: "M", ageFromDays: null, ageToDays: null, low: 3.5, high: 5.4 },
      ],
      current: [{ ...everyone, low: 3.5, high: 5.1 }],
      donors,
    });
    expect(result.partitions.map((p) => p.old)).toEqual([null, null]);
    expect(result.removedPartitions).toEqual([{ partition: everyone, old: { low: 3.5, high: 5.1 } }]);
    expect(result.donorFlagChanges.total).toBe(6);
    expect(result.donorFlagChanges.changed).toBe(2);
    expect(result.donorFlagChanges.byPartition.map((p) => [p.total, p.changed, p.transitions])).toEqual([
      [3, 1, [{ from: "L", to: "N", count: 1 }]],
      [3, 1, [{ from: "H", to: "N", count: 1 }]],
    ]);
  });

  it("counts a donor no old partition covers as changed from no flag", () => {
    // Old covers adults from 18 years (6575 days) only; the child (2000 days) had no interval.
    const result = compareVersions({
      next: [{ ...everyone, low: 3.4, high: 5.2 }],
      current: [{ sex: null, ageFromDays: 6575, ageToDays: null, low: 3.4, high: 5.2 }],
      donors: [
        { sex: "F", ageDays: 2000, value: 4 },
        { sex: "F", ageDays: 9000, value: 4 },
      ],
    });
    expect(result.donorFlagChanges.changed).toBe(1);
    expect(result.donorFlagChanges.byPartition[0].transitions).toEqual([{ from: null, to: "N", count: 1 }]);
  });

  it("with nothing in force, shows no old limits and counts no change", () => {
    const result = compareVersions({ next: [{ ...everyone, low: 3.4, high: 5.2 }], current: null, donors });
    expect(result.partitions[0].old).toBeNull();
    expect(result.donorFlagChanges).toMatchObject({ total: 6, changed: 0, notCovered: 0 });
  });

  it("leaves donors outside every new partition out of the total and says how many", () => {
    const result = compareVersions({
      next: [{ sex: "F", ageFromDays: null, ageToDays: null, low: 3.4, high: 5.2 }],
      current: [{ ...everyone, low: 3.4, high: 5.2 }],
      donors,
    });
    expect(result.donorFlagChanges).toMatchObject({ total: 3, changed: 0, notCovered: 3 });
  });
});

describe("compareVersions with LMS age curves", () => {
  // Constant curves L = 0 (ln branch), M = 100, S = 0.1 from 0 to 18 years: at every age the
  // limits are 100·exp(∓0.1·qnorm(0.975)); R: 100*exp(c(-1,1)*0.1*qnorm(0.975)) → 82.20 121.65.
  // The second curves have M = 200 (limits 164.4 and 243.3). Cubic B-splines with equal
  // coefficients are that constant (they sum to one; de Boor 1978).
  const curves = (m: number) => ({
    kind: "lms",
    ageTransform: "sqrt",
    ageMin: 0,
    ageMax: 18,
    intervals: 1,
    L: [0, 0, 0, 0],
    logM: Array(4).fill(Math.log(m)),
    logS: Array(4).fill(Math.log(0.1)),
  });
  const lms = (m: number) => ({ sex: null, ageFromDays: 0, ageToDays: 6576, low: null, high: null, model: curves(m) });

  it("flags each donor against the limits at its exact age, and leaves out a donor without an age or outside the curves", () => {
    const donors = [
      { sex: "F", ageDays: 365, ageYears: 1, value: 125 }, // H under M = 100, L under M = 200
      { sex: "M", ageDays: 3652, ageYears: 10, value: 180 }, // H, then N
      { sex: "M", ageDays: 3652, value: 100 }, // no exact age: not placed
    ];
    const result = compareVersions({ next: [lms(200)], current: [lms(100)], donors });
    expect(result.partitions[0].new).toEqual({ low: null, high: null });
    expect(result.donorFlagChanges).toMatchObject({ total: 2, changed: 2, notCovered: 1 });
    expect(result.donorFlagChanges.byPartition[0].transitions).toEqual([
      { from: "H", to: "L", count: 1 },
      { from: "H", to: "N", count: 1 },
    ]);
  });
});
