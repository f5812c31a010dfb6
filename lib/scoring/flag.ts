import type { Limits } from "./model";

/** HL7 v2 Table 0078 / FHIR ObservationInterpretation codes that Bellwether assigns. */
export type Flag = "LL" | "L" | "N" | "H" | "HH" | "<" | ">";

/**
 * Interpretation flag of a numeric value against inclusive reference limits: L below the low
 * limit, H above the high limit, N within (a value equal to a limit is N). LL and HH come only
 * from critical limits configured by the laboratory, strictly beyond them (a value equal to a
 * critical limit is L or H); they are never derived from the reference interval.
 *
 * @see HL7 v2.5 Chapter 7, OBX-8 and Table 0078; HL7 FHIR R4 ObservationInterpretation.
 * Complexity: O(1).
 * @example
 * flagValue(3.4, { low: 3.5, high: 5.1 }); // → "L"
 */
export function flagValue(x: number, limits: Limits): Flag {
  if (limits.criticalLow !== undefined && x < limits.criticalLow) return "LL";
  if (limits.criticalHigh !== undefined && x > limits.criticalHigh) return "HH";
  if (limits.low !== null && x < limits.low) return "L";
  if (limits.high !== null && x > limits.high) return "H";
  return "N";
}

/**
 * Flag of a censored result "<c" or ">c" (outside the measuring range). When the censoring
 * point already settles the side (e.g. "<c" with c at or below the low limit: the true value is
 * below c, so below the limit) the usual L/LL or H/HH is given; otherwise the true value could
 * be on either side of a limit, and the off-scale code "<" or ">" of Table 0078 is given.
 *
 * @see HL7 v2.5 Chapter 7, Table 0078 ("<" below absolute low-off instrument scale, ">" above).
 * Complexity: O(1).
 * @example
 * flagCensored("<", 0.2, { low: 0.5, high: 2 }); // → "L"
 */
export function flagCensored(censored: "<" | ">", c: number, limits: Limits): Flag {
  if (censored === "<") {
    if (limits.criticalLow !== undefined && c <= limits.criticalLow) return "LL";
    if (limits.low !== null && c <= limits.low) return "L";
    return "<";
  }
  if (limits.criticalHigh !== undefined && c >= limits.criticalHigh) return "HH";
  if (limits.high !== null && c >= limits.high) return "H";
  return ">";
}
