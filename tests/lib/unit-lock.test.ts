import { describe, expect, it } from "vitest";
import { AppError } from "@/lib/api/errors";
import { assertUnitAndDecimalsChangeable, unitAndDecimalsLocked } from "@/lib/analytes/unit-lock";

// The rule, from the catalogue's design: the unit and decimals lock once the analyte has an
// interval version beyond draft (awaiting sign-off, in force, superseded or withdrawn; DESIGN.md's
// version states).
describe("unitAndDecimalsLocked", () => {
  it("is open with no versions, and with drafts only", () => {
    expect(unitAndDecimalsLocked([])).toBe(false);
    expect(unitAndDecimalsLocked(["draft", "draft"])).toBe(false);
  });

  for (const state of ["awaiting_signoff", "in_force", "superseded", "withdrawn"] as const) {
    it(`locks once a version is ${state}`, () => {
      expect(unitAndDecimalsLocked(["draft", state])).toBe(true);
    });
  }
});

describe("assertUnitAndDecimalsChangeable", () => {
  const current = { unit: "mmol/L", decimals: 1 };

  it("lets a locked analyte keep its unit and decimals (other fields may change)", () => {
    expect(() => assertUnitAndDecimalsChangeable({ code: "GLU", current, next: { unit: "mmol/L", decimals: 1 }, versionStates: ["in_force"] })).not.toThrow();
    expect(() => assertUnitAndDecimalsChangeable({ code: "GLU", current, next: {}, versionStates: ["in_force"] })).not.toThrow();
  });

  it("lets the unit change while every version is a draft", () => {
    expect(() => assertUnitAndDecimalsChangeable({ code: "GLU", current, next: { unit: "mg/dL" }, versionStates: ["draft"] })).not.toThrow();
  });

  it("refuses a new unit once a version is in force, saying why and what to do", () => {
    let error: unknown;
    try {
      assertUnitAndDecimalsChangeable({ code: "GLU", current, next: { unit: "mg/dL" }, versionStates: ["in_force"] });
    } catch (err) {
      error = err;
    }
    expect(error).toBeInstanceOf(AppError);
    expect((error as AppError).code).toBe("conflict");
    expect((error as AppError).message).toBe(
      "The unit of GLU cannot change: an interval version of GLU has left draft and states its limits in mmol/L with 1 decimals. Create a new analyte code for the new unit instead.",
    );
  });

  it("refuses new decimals once a version awaits sign-off", () => {
    expect(() => assertUnitAndDecimalsChangeable({ code: "GLU", current, next: { decimals: 2 }, versionStates: ["awaiting_signoff"] })).toThrow(
      /^The display decimals of GLU cannot change/,
    );
  });
});
