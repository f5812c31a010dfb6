import "server-only";
import { and, asc, desc, eq, inArray, type SQL } from "drizzle-orm";
import { evaluateAdoption, type AdoptionDecision, type SetResult } from "@/lib/adoption/evaluate";
import type { CreateAdoptionCheckInput, ListAdoptionChecksQuery } from "@/lib/adoption/input";
import { ADOPTION_POLICY, type AdoptionPolicy } from "@/lib/adoption/policy";
import { AppError } from "@/lib/api/errors";
import type { Database, Executor } from "../client";
import { adoptionChecks, analytes, intervalVersions, users, type AdoptionCheck } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";

/** One set of an adoption check as answered: the counts, the binomial reasoning and the values. */
export type SetOut = SetResult & { values: number[] };

export interface AdoptionCheckOut {
  id: string;
  analyte: { code: string; name: string; unit: string; decimals: number };
  sex: "F" | "M" | null;
  lower: number | null;
  upper: number | null;
  source: string;
  decision: AdoptionDecision;
  first: SetOut;
  second: SetOut | null;
  policy: AdoptionPolicy;
  createdAt: Date;
  createdBy: { id: string; name: string } | null;
  updatedAt: Date;
  /** Interval versions drafted from this check. */
  versions: { id: string; number: number; state: string }[];
}

interface Reasoning {
  first: SetResult;
  second: SetResult | null;
}

const DECISION_WORDS: Record<AdoptionDecision, string> = {
  accepted: "accepted",
  second_set_needed: "a second set of 20 is needed",
  not_verified: "not verified",
};

/** A check's state in a sentence: "The adoption check … is waiting for its second set". */
const STATE_WORDS: Record<AdoptionDecision, string> = {
  accepted: "accepted",
  second_set_needed: "waiting for its second set",
  not_verified: "not verified",
};

function describeInterval(lower: number | null, upper: number | null, unit: string): string {
  if (lower !== null && upper !== null) return `${lower}–${upper} ${unit}`;
  return lower !== null ? `≥ ${lower} ${unit}` : `≤ ${upper} ${unit}`;
}

async function checksWhere(executor: Executor, where: SQL | undefined): Promise<AdoptionCheckOut[]> {
  const rows = await executor
    .select({
      check: adoptionChecks,
      analyte: { code: analytes.code, name: analytes.name, unit: analytes.unit, decimals: analytes.decimals },
      creator: { id: users.id, name: users.name },
    })
    .from(adoptionChecks)
    .innerJoin(analytes, eq(analytes.id, adoptionChecks.analyteId))
    .leftJoin(users, eq(users.id, adoptionChecks.createdBy))
    .where(where)
    .orderBy(desc(adoptionChecks.createdAt), desc(adoptionChecks.id));
  if (rows.length === 0) return [];
  const drafted = await executor
    .select({ id: intervalVersions.id, number: intervalVersions.number, state: intervalVersions.state, checkId: intervalVersions.adoptionCheckId })
    .from(intervalVersions)
    .where(inArray(intervalVersions.adoptionCheckId, rows.map((r) => r.check.id)))
    .orderBy(asc(intervalVersions.number));
  return rows.map(({ check: c, analyte, creator }) => {
    const reasoning = c.reasoning as unknown as Reasoning;
    return {
      id: c.id,
      analyte,
      sex: c.sex as "F" | "M" | null,
      lower: c.lower,
      upper: c.upper,
      source: c.source,
      decision: c.decision,
      first: { ...reasoning.first, values: c.firstValues },
      second: reasoning.second && c.secondValues ? { ...reasoning.second, values: c.secondValues } : null,
      policy: c.policy as unknown as AdoptionPolicy,
      createdAt: c.createdAt,
      createdBy: creator && creator.id !== null ? { id: creator.id, name: creator.name } : null,
      updatedAt: c.updatedAt,
      versions: drafted.filter((v) => v.checkId === c.id).map(({ id, number, state }) => ({ id, number, state })),
    };
  });
}

/** One adoption check; 404 when unknown. */
export async function findAdoptionCheck(executor: Executor, { id }: { id: string }): Promise<AdoptionCheckOut> {
  const [check] = await checksWhere(executor, eq(adoptionChecks.id, id));
  if (!check) throw new AppError("not_found", `There is no adoption check with the id ${id}.`);
  return check;
}

/** Adoption checks, newest first, filtered by analyte code and decision. */
export async function listAdoptionChecks(executor: Executor, { query }: { query: ListAdoptionChecksQuery }): Promise<AdoptionCheckOut[]> {
  const parts: SQL[] = [];
  if (query.analyte) parts.push(eq(analytes.code, query.analyte));
  if (query.decision) parts.push(eq(adoptionChecks.decision, query.decision));
  return checksWhere(executor, parts.length ? and(...parts) : undefined);
}

/**
 * Records an adoption check: the interval, its source, the first 20 values and the decision by
 * the laboratory's current policy, a copy of which is stored with the check. Audited.
 */
export async function createAdoptionCheck(
  database: Database,
  { input, actor }: { input: CreateAdoptionCheckInput; actor: Actor },
): Promise<AdoptionCheckOut> {
  const id = await database.transaction(async (tx) => {
    const [analyte] = await tx.select().from(analytes).where(eq(analytes.code, input.analyte)).limit(1);
    if (!analyte) {
      throw new AppError("invalid", `There is no analyte with the code ${input.analyte}.`, {
        errors: [{ path: "analyte", message: `There is no analyte with the code ${input.analyte}.` }],
      });
    }
    const policy = ADOPTION_POLICY;
    const evaluation = evaluateAdoption({ policy, lower: input.lower, upper: input.upper, first: input.values });
    const [row] = await tx
      .insert(adoptionChecks)
      .values({
        analyteId: analyte.id,
        sex: input.sex,
        lower: input.lower,
        upper: input.upper,
        source: input.source,
        firstValues: input.values,
        policy: policy as unknown as Record<string, unknown>,
        decision: evaluation.decision,
        reasoning: { first: evaluation.first, second: null } as unknown as Record<string, unknown>,
        createdBy: actor.id,
      })
      .returning({ id: adoptionChecks.id });
    await recordAuditEvent(tx, {
      actor,
      action: "adoption_check.created",
      entityType: "adoption_check",
      entityId: row.id,
      summary:
        `Checked ${analyte.code} ${describeInterval(input.lower, input.upper, analyte.unit)}${input.sex ? ` (${input.sex})` : ""}: ` +
        `${evaluation.first.outside} of ${evaluation.first.n} outside, ${DECISION_WORDS[evaluation.decision]}`,
      details: {
        analyte: analyte.code,
        sex: input.sex,
        lower: input.lower,
        upper: input.upper,
        source: input.source,
        values: input.values,
        outside: evaluation.first.outside,
        decision: evaluation.decision,
        policy: { name: policy.name, version: policy.version },
      },
    });
    return row.id;
  });
  return findAdoptionCheck(database, { id });
}

/**
 * Adds the second set of 20 to a check whose first set called for it, decided by the policy
 * stored with the check. 409 for a check in any other state. Audited.
 */
export async function recordSecondSet(
  database: Database,
  { id, values, actor }: { id: string; values: number[]; actor: Actor },
): Promise<AdoptionCheckOut> {
  await database.transaction(async (tx) => {
    const [check] = await tx.select().from(adoptionChecks).where(eq(adoptionChecks.id, id)).for("update");
    if (!check) throw new AppError("not_found", `There is no adoption check with the id ${id}.`);
    const [analyte] = await tx.select({ code: analytes.code }).from(analytes).where(eq(analytes.id, check.analyteId));
    if (check.decision !== "second_set_needed") {
      throw new AppError(
        "conflict",
        check.secondValues
          ? `This adoption check already has its second set and is ${STATE_WORDS[check.decision]}; enter a new check to test the interval again.`
          : `This adoption check is ${STATE_WORDS[check.decision]} on its first set: a second set is taken only when the first set calls for it.`,
      );
    }
    const policy = check.policy as unknown as AdoptionPolicy;
    const evaluation = evaluateAdoption({ policy, lower: check.lower, upper: check.upper, first: check.firstValues, second: values });
    await tx
      .update(adoptionChecks)
      .set({
        secondValues: values,
        decision: evaluation.decision,
        reasoning: { first: evaluation.first, second: evaluation.second } as unknown as Record<string, unknown>,
        updatedAt: new Date(),
      })
      .where(eq(adoptionChecks.id, id));
    await recordAuditEvent(tx, {
      actor,
      action: "adoption_check.second_set",
      entityType: "adoption_check",
      entityId: id,
      summary: `Second set for the ${analyte.code} adoption check: ${evaluation.second?.outside} of ${evaluation.second?.n} outside, ${DECISION_WORDS[evaluation.decision]}`,
      details: { analyte: analyte.code, values, outside: evaluation.second?.outside, decision: evaluation.decision },
    });
  });
  return findAdoptionCheck(database, { id });
}

/**
 * The check a version is drafted from, locked for the drafting transaction: it must exist, be
 * of the analyte (422 otherwise), and be accepted (409 otherwise: a state rule), with the reason.
 */
export async function acceptedAdoptionCheckForDraft(
  executor: Executor,
  { id, analyteId, analyteCode }: { id: string; analyteId: string; analyteCode: string },
): Promise<AdoptionCheck> {
  const [check] = await executor.select().from(adoptionChecks).where(eq(adoptionChecks.id, id)).for("share");
  const refuse = (message: string) => new AppError("invalid", message, { errors: [{ path: "adoptionCheck", message }] });
  if (!check) throw refuse(`There is no adoption check with the id ${id}.`);
  if (check.analyteId !== analyteId) throw refuse(`The adoption check ${id} is not a check of ${analyteCode}.`);
  if (check.decision !== "accepted") {
    throw new AppError(
      "conflict",
      `The adoption check ${id} is ${STATE_WORDS[check.decision]}: only an accepted check can become a version.`,
    );
  }
  return check;
}
