import type { Flag } from "./flag";

/**
 * HL7 v2 OBX-7 reference-range string: "low-high" with both limits, ">low" with only a low
 * limit, "<high" with only a high limit, "" with neither; limits printed with the analyte's
 * decimals.
 *
 * @see HL7 v2.5 Chapter 7, OBX-7 References Range.
 * Complexity: O(1).
 * @example
 * obx7(3.5, 5.1, 1); // → "3.5-5.1"
 */
export function obx7(low: number | null, high: number | null, decimals: number): string {
  const f = (v: number) => v.toFixed(decimals);
  if (low !== null && high !== null) return `${f(low)}-${f(high)}`;
  if (low !== null) return `>${f(low)}`;
  if (high !== null) return `<${f(high)}`;
  return "";
}

/**
 * HL7 v2 OBX-8 abnormal-flag string: the Table 0078 code of the flag, or "" when no reference
 * range applies (the table's "null: no range defined").
 *
 * @see HL7 v2.5 Chapter 7, OBX-8 Abnormal Flags, Table 0078.
 * Complexity: O(1).
 * @example
 * obx8("H"); // → "H"
 */
export function obx8(flag: Flag | null): string {
  return flag ?? "";
}
