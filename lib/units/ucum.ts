import { UcumLhcUtils } from "@lhncbc/ucum-lhc";
import { AppError } from "@/lib/api/errors";

/**
 * UCUM units through @lhncbc/ucum-lhc (the National Library of Medicine's implementation of the
 * Unified Code for Units of Measure): validation with messages in plain words, and conversion of
 * a value between units, with the analyte's molar mass for mass ↔ substance concentration.
 * Units live here rather than in lib/scoring because the catalogue, uploads and scoring all need
 * them, and none of those owns them.
 */

// One instance per process: the library loads its unit tables when first asked.
let utils: ReturnType<typeof UcumLhcUtils.getInstance> | undefined;
function ucumUtils() {
  utils ??= UcumLhcUtils.getInstance();
  return utils;
}

export type UnitCheck = { valid: true; unit: string; name: string } | { valid: false; message: string };

/** The library marks the offending part as `->x<-`; people read quotes more easily. */
function plainWords(message: string): string {
  return message
    .replace(/->\s*/g, '"')
    .replace(/\s*<-/g, '"')
    .replace(/"\s+\./g, '".')
    .replace(/\s{2,}/g, " ")
    .trim();
}

const EXAMPLES = "UCUM codes are case-sensitive, for example mg/dL, mmol/L, umol/L, U/L, 10*9/L or m[IU]/L.";

/**
 * Checks that `unit` is a valid UCUM code, exactly as typed (UCUM is case-sensitive, so `mmol/L`
 * and `MMOL/L` are different things). Returns the unit and its name, or a message that says
 * what is wrong and what to type instead.
 * @example checkUcumUnit("mg/dL") // { valid: true, unit: "mg/dL", name: "milligram per deciliter" }
 */
export function checkUcumUnit(unit: string): UnitCheck {
  const text = unit.trim();
  if (text === "") return { valid: false, message: `Enter a unit. ${EXAMPLES}` };
  if (text !== unit) return { valid: false, message: `Remove the spaces around "${text}". ${EXAMPLES}` };
  const result = ucumUtils().validateUnitString(text, true);
  if (result.status === "valid" && result.ucumCode) {
    return { valid: true, unit: result.ucumCode, name: result.unit?.name ?? "" };
  }
  // The library opens with "x is not a valid UCUM code." (or "unit."), which our own first
  // sentence already says; what follows it (the part at fault, a suggestion) is kept.
  const restated = new RegExp(`^${text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")} is not a valid (UCUM code|unit)\\.\\s*`);
  const detail = result.msg
    .map((m) => plainWords(m.replace(/\s*\n\s*/g, " ").replace(restated, "")))
    .filter((m) => m !== "")
    .join(" ");
  const suggestion = detail.includes("No alternatives were found") ? "" : ` ${detail}`;
  return { valid: false, message: `"${text}" is not a UCUM unit.${suggestion} ${EXAMPLES}`.replace(/\s{2,}/g, " ") };
}

/**
 * Converts `value` from one UCUM unit to another. Mass ↔ substance concentration (mg/dL ↔
 * mmol/L) needs the analyte's molar mass in g/mol; UCUM cannot know it (METHODS.md §11).
 * Throws AppError("invalid") with a readable message when a unit is not UCUM, the units measure
 * different things, or a molar mass is needed and missing.
 * @example convertUnit({ value: 100, from: "mg/dL", to: "mmol/L", molarMass: 180.156 }) // 5.5507…
 */
export function convertUnit({
  value,
  from,
  to,
  molarMass,
}: {
  value: number;
  from: string;
  to: string;
  molarMass?: number | null;
}): number {
  if (!Number.isFinite(value)) throw new AppError("invalid", `The value to convert must be a number; got ${value}.`);
  for (const unit of [from, to]) {
    const check = checkUcumUnit(unit);
    if (!check.valid) throw new AppError("invalid", check.message);
  }
  if (from === to) return value;
  if (molarMass != null && !(Number.isFinite(molarMass) && molarMass > 0)) {
    throw new AppError("invalid", `The molar mass must be a positive number of g/mol; got ${molarMass}.`);
  }
  const result = ucumUtils().convertUnitTo(from, value, to, molarMass != null ? { molecularWeight: molarMass } : {});
  if (result.status === "succeeded" && typeof result.toVal === "number" && Number.isFinite(result.toVal)) {
    return result.toVal;
  }
  const detail = result.msg.join(" ");
  if (/molecular weight/i.test(detail)) {
    throw new AppError(
      "invalid",
      `Converting ${from} to ${to} goes between mass and amount of substance: it needs the analyte's molar mass (g/mol).`,
    );
  }
  if (/charge/i.test(detail)) {
    throw new AppError("invalid", `Converting ${from} to ${to} needs the charge of the ion (equivalents), which Bellwether does not hold.`);
  }
  throw new AppError("invalid", `${from} cannot be converted to ${to}: they measure different kinds of quantity.`);
}
