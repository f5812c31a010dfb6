/** The parts of @lhncbc/ucum-lhc (7.1.x) that Bellwether uses; the package ships no types. */
declare module "@lhncbc/ucum-lhc" {
  interface UcumValidation {
    status: "valid" | "invalid" | "error";
    ucumCode: string | null;
    unit?: { code: string; name: string; guidance: string | null };
    msg: string[];
  }
  interface UcumConversion {
    status: "succeeded" | "failed" | "error";
    toVal: number | null;
    msg: string[];
  }
  interface UcumLhcUtils {
    validateUnitString(unit: string, suggest?: boolean): UcumValidation;
    convertUnitTo(
      fromUnit: string,
      value: number,
      toUnit: string,
      options?: { molecularWeight?: number; charge?: number },
    ): UcumConversion;
  }
  export const UcumLhcUtils: { getInstance(): UcumLhcUtils };
}
