import { describe, expect, it } from "vitest";
import { loincCheckDigit, loincProblem } from "@/lib/analytes/loinc";

describe("loincCheckDigit", () => {
  it("gives 5 for 12345, the worked example of the LOINC Users' Guide", () => {
    // LOINC Users' Guide, section 12 C "Calculating Mod 10 Check Digits" (2023): 531 × 2 = 1062,
    // 42 prepended, digits add to 15, 20 − 15 = 5.
    expect(loincCheckDigit("12345")).toBe(5);
  });

  // Codes as LOINC publishes them (METHODS.md §11's LOINC table, READ-2nd / MEM, and the LOINC
  // database for the enzymes): the digit after the hyphen is the published check digit.
  for (const code of ["2345-7", "14749-6", "2160-0", "14682-9", "2951-2", "2823-3", "1742-6", "6768-6", "3016-3", "718-7", "22664-7", "2000-8", "3094-0"]) {
    it(`matches the published check digit of ${code}`, () => {
      const [digits, check] = code.split("-");
      expect(loincCheckDigit(digits)).toBe(Number(check));
    });
  }

  it("refuses anything but digits", () => {
    expect(() => loincCheckDigit("23a5")).toThrow('A LOINC number is made of digits; got "23a5".');
  });
});

describe("loincProblem", () => {
  it("accepts a well-formed code with the right check digit", () => {
    expect(loincProblem("2345-7")).toBeNull();
  });

  it("names the right check digit when it is wrong", () => {
    expect(loincProblem("2345-8")).toBe(
      "The check digit of LOINC code 2345-8 is wrong: for 2345 it is 7. Check the code against the LOINC database.",
    );
  });

  it("refuses one of the deprecated codes that LOINC lists with invalid check digits", () => {
    // LOINC Users' Guide 12 C lists 11491-6 among 14 terms whose check digit is known to be wrong.
    expect(loincProblem("11491-6")).toBe(
      "The check digit of LOINC code 11491-6 is wrong: for 11491 it is 8. Check the code against the LOINC database.",
    );
  });

  for (const bad of ["2345", "2345-", "23457", "LP1234-5", "12345678-9", " 2345-7"]) {
    it(`says how a LOINC code is written when given "${bad}"`, () => {
      expect(loincProblem(bad)).toBe(`"${bad}" is not a LOINC code: write the number, a hyphen and the check digit, e.g. 2345-7.`);
    });
  }
});
