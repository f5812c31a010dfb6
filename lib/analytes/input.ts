import { z } from "zod";
import { checkUcumUnit } from "@/lib/units/ucum";
import { loincProblem } from "./loinc";

/**
 * What a new or changed analyte must satisfy, in one place for the API (JSON bodies) and the
 * page's forms (FormData, turned into the same shape by `analyteBodyFromForm`).
 */

const DECIMALS = "Display decimals must be a whole number from 0 to 6.";
const REVIEW = "The review period must be a whole number of months from 1 to 120.";

export const analyteCodeSchema = z
  .string("Enter a code.")
  .trim()
  .toUpperCase()
  .regex(/^[A-Z0-9]{1,16}$/, "The code is 1 to 16 capital letters or digits, e.g. GLU, K or ALP.");

/** The path parameters of /api/v1/analytes/{code}. */
export const analyteCodeParams = z.object({ code: analyteCodeSchema });

const fields = {
  name: z.string("Enter the analyte's name.").trim().min(1, "Enter the analyte's name.").max(120, "Keep the name within 120 characters."),
  unit: z.string("Enter a UCUM unit.").superRefine((unit, ctx) => {
    const check = checkUcumUnit(unit);
    if (!check.valid) ctx.addIssue({ code: "custom", message: check.message });
  }),
  decimals: z.number(DECIMALS).int(DECIMALS).min(0, DECIMALS).max(6, DECIMALS),
  loinc: z
    .string("Enter a LOINC code such as 2345-7, or leave it empty.")
    .trim()
    .superRefine((code, ctx) => {
      const problem = loincProblem(code);
      if (problem) ctx.addIssue({ code: "custom", message: problem });
    }),
  specimen: z
    .string("Enter the specimen type, e.g. serum.")
    .trim()
    .toLowerCase()
    .min(1, "Enter the specimen type, e.g. serum, plasma, whole blood or urine.")
    .max(60, "Keep the specimen type within 60 characters."),
  reviewMonths: z.number(REVIEW).int(REVIEW).min(1, REVIEW).max(120, REVIEW),
  criticalLow: z.number("The critical low limit must be a number in the analyte's unit."),
  criticalHigh: z.number("The critical high limit must be a number in the analyte's unit."),
  molarMass: z.number("The molar mass must be a number of g/mol.").positive("The molar mass must be a positive number of g/mol."),
  molarMassSource: z
    .string("Name the published source of the molar mass.")
    .trim()
    .min(1, "Name the published source of the molar mass.")
    .max(300, "Keep the source within 300 characters."),
};

/** The rules between fields, checked on a whole analyte (for a change: the analyte after it). */
export interface AnalyteCrossFields {
  criticalLow: number | null;
  criticalHigh: number | null;
  molarMass: number | null;
  molarMassSource: string | null;
}

export function crossFieldProblems(a: AnalyteCrossFields): { path: string; message: string }[] {
  const problems: { path: string; message: string }[] = [];
  if (a.criticalLow !== null && a.criticalHigh !== null && !(a.criticalLow < a.criticalHigh)) {
    problems.push({
      path: "criticalHigh",
      message: `The critical low limit (${a.criticalLow}) must be below the critical high limit (${a.criticalHigh}).`,
    });
  }
  if (a.molarMass !== null && a.molarMassSource === null) {
    problems.push({ path: "molarMassSource", message: "Name the published source of the molar mass." });
  }
  if (a.molarMass === null && a.molarMassSource !== null) {
    problems.push({ path: "molarMass", message: "Give the molar mass (g/mol) that the source states, or leave both empty." });
  }
  return problems;
}

export const createAnalyteBody = z
  .strictObject({
    code: analyteCodeSchema,
    name: fields.name,
    unit: fields.unit,
    decimals: fields.decimals,
    loinc: fields.loinc.nullish(),
    specimen: fields.specimen.optional().default("serum"),
    reviewMonths: fields.reviewMonths.optional().default(24),
    criticalLow: fields.criticalLow.nullish(),
    criticalHigh: fields.criticalHigh.nullish(),
    molarMass: fields.molarMass.nullish(),
    molarMassSource: fields.molarMassSource.nullish(),
  })
  .superRefine((a, ctx) => {
    for (const p of crossFieldProblems({
      criticalLow: a.criticalLow ?? null,
      criticalHigh: a.criticalHigh ?? null,
      molarMass: a.molarMass ?? null,
      molarMassSource: a.molarMassSource ?? null,
    })) {
      ctx.addIssue({ code: "custom", path: [p.path], message: p.message });
    }
  });

export type NewAnalyteInput = z.output<typeof createAnalyteBody>;

/**
 * A partial change: a field left out stays as it is; `null` clears an optional field. The code
 * is the analyte's identity and never changes.
 */
export const updateAnalyteBody = z
  .strictObject({
    code: z.unknown().optional(),
    name: fields.name.optional(),
    unit: fields.unit.optional(),
    decimals: fields.decimals.optional(),
    loinc: fields.loinc.nullish(),
    specimen: fields.specimen.optional(),
    reviewMonths: fields.reviewMonths.optional(),
    criticalLow: fields.criticalLow.nullish(),
    criticalHigh: fields.criticalHigh.nullish(),
    molarMass: fields.molarMass.nullish(),
    molarMassSource: fields.molarMassSource.nullish(),
  })
  .superRefine((a, ctx) => {
    if (a.code !== undefined) {
      ctx.addIssue({
        code: "custom",
        path: ["code"],
        message: "An analyte's code cannot change; add a new analyte under the new code instead.",
      });
    }
    if (Object.values(a).every((v) => v === undefined)) {
      ctx.addIssue({ code: "custom", message: "Send at least one field to change." });
    }
  })
  .transform((body) => {
    const changes = { ...body };
    delete changes.code;
    return changes as Omit<typeof body, "code">;
  });

export type AnalyteChanges = z.output<typeof updateAnalyteBody>;

const NUMERIC_FIELDS = new Set(["decimals", "reviewMonths", "criticalLow", "criticalHigh", "molarMass"]);
const OPTIONAL_FIELDS = new Set(["loinc", "criticalLow", "criticalHigh", "molarMass", "molarMassSource"]);

/**
 * A form's fields in the shape of the API's body, so that forms and the API share one set of
 * rules. Numbers are parsed (a field that is not a number stays text, and the schema says so);
 * an empty optional field is left out of a new analyte and cleared (null) in a change; an empty
 * required field stays empty so that the schema names it. `mode: "update"` drops the code, which
 * identifies the analyte rather than changing it.
 */
export function analyteBodyFromForm(form: FormData, mode: "create" | "update"): Record<string, unknown> {
  const body: Record<string, unknown> = {};
  for (const [key, raw] of form.entries()) {
    if (typeof raw !== "string" || key.startsWith("$")) continue;
    if (mode === "update" && key === "code") continue;
    const text = raw.trim();
    if (text === "" && OPTIONAL_FIELDS.has(key)) {
      if (mode === "update") body[key] = null;
      continue;
    }
    if (text === "" && mode === "create" && (key === "specimen" || key === "reviewMonths")) continue;
    if (NUMERIC_FIELDS.has(key) && text !== "") {
      const n = Number(text);
      body[key] = Number.isFinite(n) ? n : text;
    } else {
      body[key] = text;
    }
  }
  return body;
}
