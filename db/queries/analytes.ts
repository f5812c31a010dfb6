import "server-only";
import { asc, eq } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import { crossFieldProblems, type AnalyteChanges, type NewAnalyteInput } from "@/lib/analytes/input";
import { assertUnitAndDecimalsChangeable } from "@/lib/analytes/unit-lock";
import type { Database, Executor } from "../client";
import { uniqueViolationOf } from "../errors";
import { analytes, type Analyte } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { versionStatesOfAnalyte } from "./interval-versions";

export type { Analyte };

/** The fields a person sets; the rest (id, timestamps, who) the database and this file keep. */
const EDITABLE = [
  "name",
  "unit",
  "decimals",
  "loinc",
  "specimen",
  "reviewMonths",
  "criticalLow",
  "criticalHigh",
  "molarMass",
  "molarMassSource",
] as const;

function duplicateCode(code: string): AppError {
  const message = `An analyte with the code ${code} already exists; edit it, or choose another code.`;
  return new AppError("conflict", message, { errors: [{ path: "code", message }] });
}


export async function listAnalytes(executor: Executor): Promise<Analyte[]> {
  return executor.select().from(analytes).orderBy(asc(analytes.code));
}

export async function findAnalyteByCode(executor: Executor, { code }: { code: string }): Promise<Analyte | undefined> {
  const [row] = await executor.select().from(analytes).where(eq(analytes.code, code)).limit(1);
  return row;
}

export async function findAnalyteById(executor: Executor, { id }: { id: string }): Promise<Analyte | undefined> {
  const [row] = await executor.select().from(analytes).where(eq(analytes.id, id)).limit(1);
  return row;
}

export async function createAnalyte(
  database: Database,
  { input, actor }: { input: NewAnalyteInput; actor: Actor },
): Promise<Analyte> {
  try {
    return await database.transaction(async (tx) => {
      if (await findAnalyteByCode(tx, { code: input.code })) throw duplicateCode(input.code);
      const [created] = await tx
        .insert(analytes)
        .values({
          code: input.code,
          name: input.name,
          unit: input.unit,
          decimals: input.decimals,
          loinc: input.loinc ?? null,
          specimen: input.specimen,
          reviewMonths: input.reviewMonths,
          criticalLow: input.criticalLow ?? null,
          criticalHigh: input.criticalHigh ?? null,
          molarMass: input.molarMass ?? null,
          molarMassSource: input.molarMassSource ?? null,
          createdBy: actor.id,
          updatedBy: actor.id,
        })
        .returning();
      await recordAuditEvent(tx, {
        actor,
        action: "analyte.created",
        entityType: "analyte",
        entityId: created.code,
        summary: `Added the analyte ${created.code} (${created.name}, ${created.unit})`,
        details: Object.fromEntries(EDITABLE.map((field) => [field, created[field]])),
      });
      return created;
    });
  } catch (err) {
    // Two people adding the same code at once: the unique index decides, with the same answer.
    if (uniqueViolationOf(err) !== null) throw duplicateCode(input.code);
    throw err;
  }
}

/**
 * Applies a partial change to the analyte with `code`, audited with the before and after of each
 * field that changed; a change that changes nothing writes nothing. The rules between fields
 * (critical low below high, a molar mass with its source) are checked on the analyte as it will
 * be, and the unit and decimals only change while no interval version has left draft.
 */
export async function updateAnalyte(
  database: Database,
  { code, changes, actor }: { code: string; changes: AnalyteChanges; actor: Actor },
): Promise<Analyte> {
  return database.transaction(async (tx) => {
    const [current] = await tx.select().from(analytes).where(eq(analytes.code, code)).for("update");
    if (!current) throw new AppError("not_found", `There is no analyte with the code ${code}.`);

    const next = { ...current };
    const diff: Record<string, { from: unknown; to: unknown }> = {};
    for (const field of EDITABLE) {
      const value = changes[field];
      if (value === undefined || value === current[field]) continue;
      diff[field] = { from: current[field], to: value };
      (next as Record<string, unknown>)[field] = value;
    }
    if (Object.keys(diff).length === 0) return current;

    const problems = crossFieldProblems(next);
    if (problems.length > 0) {
      throw new AppError("invalid", problems.map((p) => p.message).join(" "), { errors: problems });
    }
    // Read in this transaction, under the analyte's row lock taken above.
    const versionStates = await versionStatesOfAnalyte(tx, { analyteId: current.id });
    assertUnitAndDecimalsChangeable({ code, current, next: changes, versionStates });

    const [updated] = await tx
      .update(analytes)
      .set({ ...Object.fromEntries(Object.entries(diff).map(([f, d]) => [f, d.to])), updatedAt: new Date(), updatedBy: actor.id })
      .where(eq(analytes.id, current.id))
      .returning();
    await recordAuditEvent(tx, {
      actor,
      action: "analyte.updated",
      entityType: "analyte",
      entityId: code,
      summary: `Changed ${Object.keys(diff).join(", ")} of the analyte ${code}`,
      details: { changes: diff },
    });
    return updated;
  });
}
