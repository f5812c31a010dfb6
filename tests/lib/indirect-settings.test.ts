import { describe, expect, it } from "vitest";
import type { RoutineResult } from "@/lib/indirect/cleaning";
import { settingShares } from "@/lib/indirect/settings";

const row = (setting: string | null): RoutineResult => ({
  patient: "P",
  sex: "F",
  ageYears: 40,
  collectedAt: "2025-01-01T08:00",
  value: 4,
  setting,
});

describe("settingShares", () => {
  it("counts results per setting without regard to case, largest first", () => {
    const rows = [row("Outpatient"), row("outpatient"), row("inpatient"), row(null)];
    expect(settingShares(rows)).toEqual({
      shares: [
        { setting: "Outpatient", count: 2, share: 0.5 },
        { setting: "(none)", count: 1, share: 0.25 },
        { setting: "inpatient", count: 1, share: 0.25 },
      ],
      warning: null,
    });
  });

  it("warns when one setting other than a low-prevalence one holds more than 80%", () => {
    // 9 of 10 (90%) inpatient: above the stated 80%.
    const rows = [...Array.from({ length: 9 }, () => row("inpatient")), row("outpatient")];
    expect(settingShares(rows).warning).toBe(
      '90% of the results come from the setting "inpatient": the estimate describes that population, which may hold more disease than the laboratory\'s reference population.',
    );
    // 8 of 10 is not above 80%; 10 of 10 outpatients is what the IFCC recommends.
    expect(settingShares([...Array.from({ length: 8 }, () => row("emergency")), row("a"), row("b")]).warning).toBeNull();
    expect(settingShares(Array.from({ length: 10 }, () => row("outpatient"))).warning).toBeNull();
  });
});
