import { describe, expect, it } from "vitest";
import { AppError } from "@/lib/api/errors";
import { checkUcumUnit, convertUnit } from "@/lib/units/ucum";

function errorOf(fn: () => unknown): string {
  try {
    fn();
  } catch (err) {
    if (err instanceof AppError) return `${err.code}: ${err.message}`;
    throw err;
  }
  throw new Error("expected an AppError");
}

describe("convertUnit, against METHODS.md §11's published factors", () => {
  // Tolerance: the published factors have 3-4 significant figures; METHODS.md's check value is
  // given to 3 decimals, so agreement to ±0.0005 is what the source supports.
  it("glucose 100 mg/dL is 5.551 mmol/L with M = 180.156 g/mol", () => {
    // Young DS, Ann Intern Med 1987;106:114-129 and the AMA/JAMA SI table: factor 0.05551
    // (METHODS.md §11 and §13 row 16, READ-2nd + COMPUTED).
    expect(convertUnit({ value: 100, from: "mg/dL", to: "mmol/L", molarMass: 180.156 })).toBeCloseTo(5.551, 3);
  });

  it("glucose gives STACK.md's measured 5.5507 from the library itself", () => {
    // STACK.md: convertUnitTo("mg/dL", 100, "mmol/L", {molecularWeight: 180.156}) → 5.5507.
    expect(convertUnit({ value: 100, from: "mg/dL", to: "mmol/L", molarMass: 180.156 })).toBeCloseTo(5.5507, 4);
  });

  it("creatinine 1.0 mg/dL is 88.4 µmol/L with M = 113.12 g/mol", () => {
    // AMA/JAMA SI table (METHODS.md §11, READ-2nd): factor 88.4. ±0.05 for a factor given to 0.1.
    expect(convertUnit({ value: 1.0, from: "mg/dL", to: "umol/L", molarMass: 113.12 })).toBeCloseTo(88.4, 1);
  });

  it("albumin and haemoglobin g/dL to g/L is ×10 without a molar mass", () => {
    // METHODS.md §11: albumin and haemoglobin factor 10 (READ-2nd); UCUM: dL = 0.1 L.
    expect(convertUnit({ value: 4.2, from: "g/dL", to: "g/L" })).toBeCloseTo(42, 10);
  });

  it("goes back again: 5.551 mmol/L of glucose is 100 mg/dL", () => {
    expect(convertUnit({ value: 5.551, from: "mmol/L", to: "mg/dL", molarMass: 180.156 })).toBeCloseTo(100, 1);
  });

  it("asks for the molar mass when mass meets substance", () => {
    expect(errorOf(() => convertUnit({ value: 100, from: "mg/dL", to: "mmol/L" }))).toBe(
      "invalid: Converting mg/dL to mmol/L goes between mass and amount of substance: it needs the analyte's molar mass (g/mol).",
    );
  });

  it("refuses units that measure different things", () => {
    expect(errorOf(() => convertUnit({ value: 30, from: "U/L", to: "mmol/L" }))).toBe(
      "invalid: U/L cannot be converted to mmol/L: they measure different kinds of quantity.",
    );
  });

  it("refuses a unit that is not UCUM before converting", () => {
    expect(errorOf(() => convertUnit({ value: 1, from: "mg/dL", to: "mmol/litre", molarMass: 180.156 }))).toMatch(
      /^invalid: "mmol\/litre" is not a UCUM unit\./,
    );
  });
});

describe("checkUcumUnit", () => {
  // UCUM codes used in HL7 FHIR value sets (METHODS.md §11, READ) and UCUM's own examples.
  for (const unit of ["mg/dL", "g/dL", "g/L", "ug/dL", "mmol/L", "umol/L", "meq/L", "10*9/L", "10*12/L", "fL", "pg", "%", "U/L", "[IU]/L", "m[IU]/L"]) {
    it(`accepts ${unit}`, () => {
      expect(checkUcumUnit(unit)).toMatchObject({ valid: true, unit });
    });
  }

  it("names the unit it accepted", () => {
    expect(checkUcumUnit("mmol/L")).toEqual({ valid: true, unit: "mmol/L", name: "millimole per liter" });
  });

  it("refuses a made-up unit in plain words, with examples", () => {
    expect(checkUcumUnit("bananas")).toEqual({
      valid: false,
      message: '"bananas" is not a UCUM unit. UCUM codes are case-sensitive, for example mg/dL, mmol/L, umol/L, U/L, 10*9/L or m[IU]/L.',
    });
  });

  it("explains a malformed expression without the library's arrow marks", () => {
    const check = checkUcumUnit("mg//dL");
    expect(check.valid).toBe(false);
    const message = check.valid ? "" : check.message;
    expect(message).toContain('"mg//dL" is not a UCUM unit.');
    expect(message).toContain('A unit code is missing between "/" and "/" in "//".');
    expect(message).not.toMatch(/->|<-/);
  });

  it("passes on the library's suggestion, in plain words", () => {
    // UCUM writes the international unit as the arbitrary unit [IU] (UCUM specification; from memory,
    // and the library says the same).
    expect(checkUcumUnit("IU/L")).toEqual({
      valid: false,
      message:
        '"IU/L" is not a UCUM unit. IU is not a valid unit expression, but [IU] is. Did you mean [IU] (international unit - arbitrary)? UCUM codes are case-sensitive, for example mg/dL, mmol/L, umol/L, U/L, 10*9/L or m[IU]/L.',
    });
  });

  it("refuses upper-case MMOL/L: UCUM is case-sensitive", () => {
    expect(checkUcumUnit("MMOL/L")).toMatchObject({ valid: false, message: expect.stringMatching(/^"MMOL\/L" is not a UCUM unit\./) });
  });

  it("asks for a unit when none is given", () => {
    expect(checkUcumUnit("")).toEqual({
      valid: false,
      message: "Enter a unit. UCUM codes are case-sensitive, for example mg/dL, mmol/L, umol/L, U/L, 10*9/L or m[IU]/L.",
    });
  });

  it("refuses spaces around a unit rather than guessing", () => {
    expect(checkUcumUnit(" mmol/L")).toMatchObject({ valid: false, message: expect.stringMatching(/^Remove the spaces around "mmol\/L"\./) });
  });
});
