import "server-only";
import { and, asc, desc, eq, inArray, max, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { AppError } from "@/lib/api/errors";
import type { IntervalVersionState } from "@/lib/analytes/unit-lock";
import { scoringModelSchema, scoringPartitionSchema, type ScoringModel } from "@/lib/scoring/model";
import type { ReferenceIntervalEstimate } from "@/lib/stats/estimate";
import { partitionLabel, partitionOut, type PartitionOut } from "@/lib/studies/estimate-input";
import { ageYearsToDays } from "@/lib/versions/age-days";
import type { CreateVersionInput, ListVersionsQuery, UpdateVersionInput, VersionPartitionInput } from "@/lib/versions/input";
import { firstOverlap } from "@/lib/versions/overlap";
import { curveExtremes, lmsPartitionDays, type LmsEstimateDocument } from "@/lib/studies/age-curves";
import type { IndirectEstimateDocument } from "@/lib/studies/indirect-estimates";
import { lmsModelSchema, type LmsModel } from "@/lib/stats/lms-model";
import { adoptedScoringModel, publicModel, scoringModelFor, ScoringModelError, type PartitionMethod } from "@/lib/versions/scoring-model";
import type { Database, Executor } from "../client";
import { SIGNATURE_MEANING_LABELS, VERSION_STATE_LABELS } from "@/lib/versions/state-machine";
import {
  analytes,
  estimates,
  intervalPartitions,
  intervalVersions,
  signatures,
  studies,
  users,
  type AdoptionCheck,
  type Estimate,
  type IntervalVersion,
  type Signature,
} from "../schema";
import { acceptedAdoptionCheckForDraft } from "./adoption-checks";
import { recordAuditEvent, type Actor } from "./audit";
import { isLmsEstimate } from "./age-curve-estimates";
import { isIndirectEstimate } from "./indirect-estimates";
import { valuesOfEstimate } from "./estimates";

/** Attempts at numbering a new version when another took the same number at the same moment. */
const NUMBERING_ATTEMPTS = 5;

function invalid(path: string, message: string): AppError {
  return new AppError("invalid", message, { errors: [{ path, message }] });
}

function isUniqueViolation(err: unknown, constraint: string): boolean {
  for (let e: unknown = err; e && typeof e === "object"; e = (e as { cause?: unknown }).cause) {
    const pg = e as { code?: unknown; constraint?: unknown };
    if (pg.code === "23505" && pg.constraint === constraint) return true;
  }
  return false;
}

/** The states of an analyte's interval versions, for the unit-and-decimals lock. */
export async function versionStatesOfAnalyte(executor: Executor, { analyteId }: { analyteId: string }): Promise<IntervalVersionState[]> {
  const rows = await executor.select({ state: intervalVersions.state }).from(intervalVersions).where(eq(intervalVersions.analyteId, analyteId));
  return rows.map((r) => r.state);
}

/** A partition resolved from its estimate and method, ready to store. */
interface ResolvedPartition {
  scope: PartitionOut;
  sex: "F" | "M" | null;
  ageFromDays: number | null;
  ageToDays: number | null;
  low: number | null;
  high: number | null;
  lowCi: [number, number] | null;
  highCi: [number, number] | null;
  method: PartitionMethod | "adopted" | "lms" | "indirect";
  n: number;
  model: ScoringModel | LmsModel;
  estimateId: string | null;
}

/**
 * The one partition of a version drafted from an accepted adoption check: the check's sex and
 * limits, no CIs (the laboratory verified the limits, it did not estimate them), n the local
 * values the check used, and the adopted scoring model (zlog, or limits only when one-sided).
 */
function adoptedPartition(check: AdoptionCheck): ResolvedPartition {
  const sex = check.sex as "F" | "M" | null;
  return {
    scope: { sex, ageFrom: null, ageTo: null },
    sex,
    ageFromDays: null,
    ageToDays: null,
    low: check.lower,
    high: check.upper,
    lowCi: null,
    highCi: null,
    method: "adopted",
    n: check.firstValues.length + (check.secondValues?.length ?? 0),
    model: adoptedScoringModel({ lower: check.lower, upper: check.upper }),
    estimateId: null,
  };
}

/**
 * A partition holding an age-curve study's LMS curves (the partition contract): the fitted model
 * exactly, no fixed limits or CIs, the days whose age lies in [ageMin, ageMax], n the donors fitted.
 */
function lmsPartition(estimateId: string, sex: "F" | "M" | null, document: LmsEstimateDocument): ResolvedPartition {
  const model = lmsModelSchema.parse(document.model);
  const days = lmsPartitionDays(model);
  return {
    scope: { sex, ageFrom: model.ageMin, ageTo: model.ageMax },
    sex,
    ageFromDays: days.ageFromDays,
    ageToDays: days.ageToDays,
    low: null,
    high: null,
    lowCi: null,
    highCi: null,
    method: "lms",
    n: document.n,
    model,
    estimateId,
  };
}

/**
 * A partition from an indirect estimate: the truncated maximum likelihood limits and their CIs,
 * scored by the fitted power-normal (a Box-Cox gaussian whose 2.5th and 97.5th percentiles are
 * the limits by construction), n the values estimated after cleaning.
 */
function indirectPartition(estimate: Estimate, path: string): ResolvedPartition {
  const document = estimate.document as unknown as IndirectEstimateDocument;
  if (document.lower === null || document.upper === null || document.model === null) {
    throw invalid(`${path}.method`, `${path}.method: the indirect estimate ${estimate.id} could not place both limits; estimate again with other cleaning steps.`);
  }
  const scope = partitionOut(estimate);
  return {
    scope,
    sex: scope.sex,
    ageFromDays: ageYearsToDays(scope.ageFrom),
    ageToDays: ageYearsToDays(scope.ageTo),
    low: document.lower,
    high: document.upper,
    lowCi: document.lowerCi,
    highCi: document.upperCi,
    method: "indirect",
    n: document.n,
    model: document.model as ScoringModel,
    estimateId: estimate.id,
  };
}

/**
 * Each requested partition from its estimate (which must belong to the study) and method (which
 * must have limits there): the limits, their CIs, n and the scoring model, the age band in days.
 * Refuses partitions that overlap.
 */
async function resolvePartitions(
  executor: Executor,
  { studyId, partitions }: { studyId: string; partitions: VersionPartitionInput[] },
): Promise<ResolvedPartition[]> {
  const resolved: ResolvedPartition[] = [];
  for (const [i, request] of partitions.entries()) {
    const path = `partitions.${i}`;
    const [estimate] = await executor
      .select()
      .from(estimates)
      .where(and(eq(estimates.id, request.estimate), eq(estimates.studyId, studyId)))
      .limit(1);
    if (!estimate) throw invalid(`${path}.estimate`, `${path}.estimate: there is no estimate with the id ${request.estimate} in the study ${studyId}.`);
    const indirect = isIndirectEstimate(estimate);
    if (request.method === "indirect" || indirect) {
      if (request.method !== "indirect") {
        throw invalid(`${path}.method`, `${path}.method: the estimate ${estimate.id} is an indirect estimate from routine results; its method is indirect.`);
      }
      if (!indirect) {
        throw invalid(`${path}.method`, `${path}.method: the estimate ${estimate.id} is not an indirect estimate; choose the method it was made with.`);
      }
      resolved.push(indirectPartition(estimate, path));
      continue;
    }
    const lms = isLmsEstimate(estimate);
    if (request.method === "lms" || lms) {
      if (request.method !== "lms") {
        throw invalid(`${path}.method`, `${path}.method: the estimate ${estimate.id} holds LMS age curves; its method is lms.`);
      }
      if (!lms) {
        throw invalid(`${path}.method`, `${path}.method: the estimate ${estimate.id} holds limits, not age curves; choose nonparametric, parametric or robust.`);
      }
      resolved.push(lmsPartition(estimate.id, estimate.sex as "F" | "M" | null, estimate.document as unknown as LmsEstimateDocument));
      continue;
    }
    const document = estimate.document as unknown as ReferenceIntervalEstimate;
    const limits = document[request.method];
    if (limits.lower === null || limits.upper === null) {
      throw invalid(`${path}.method`, `${path}.method: the estimate ${estimate.id} has no ${request.method} limits; choose a method that gave both limits.`);
    }
    let values;
    if (request.method === "nonparametric") {
      values = await valuesOfEstimate(executor, { estimate });
      if (values.length !== estimate.n) {
        throw new AppError(
          "conflict",
          `${path}: the donor results behind the estimate ${estimate.id} no longer match it (${values.length} values found, ${estimate.n} estimated); estimate again.`,
        );
      }
    }
    let model: ScoringModel;
    try {
      model = scoringModelFor({ document, method: request.method as PartitionMethod, values });
    } catch (err) {
      if (err instanceof ScoringModelError) throw invalid(`${path}.method`, `${path}.method: ${err.message}.`);
      throw err;
    }
    const scope = partitionOut(estimate);
    resolved.push({
      scope,
      sex: scope.sex,
      ageFromDays: ageYearsToDays(scope.ageFrom),
      ageToDays: ageYearsToDays(scope.ageTo),
      low: limits.lower,
      high: limits.upper,
      lowCi: limits.lowerCi,
      highCi: limits.upperCi,
      method: request.method,
      n: estimate.n,
      model,
      estimateId: estimate.id,
    });
  }
  const overlap = firstOverlap(resolved);
  if (overlap) {
    const [a, b] = overlap;
    throw invalid(
      "partitions",
      `partitions.${a} (${partitionLabel(resolved[a].scope)}) and partitions.${b} (${partitionLabel(resolved[b].scope)}) overlap: each patient must fall in one partition only.`,
    );
  }
  return resolved;
}

/**
 * The critical limits against each other and against every partition's limits, as scoring will
 * check them (lib/scoring/model.ts's partition schema), with the model validated once more.
 */
function assertScorable(
  partitions: { low: number | null; high: number | null; model: unknown; n: number }[],
  { unit, decimals, criticalLow, criticalHigh }: { unit: string; decimals: number; criticalLow: number | null; criticalHigh: number | null },
): void {
  if (criticalLow !== null && criticalHigh !== null && !(criticalLow < criticalHigh)) {
    throw invalid("criticalLow", `criticalLow (${criticalLow}) must be below criticalHigh (${criticalHigh}).`);
  }
  for (const [i, p] of partitions.entries()) {
    const lms = lmsModelSchema.safeParse(p.model);
    if (lms.success) {
      // The limits of curves move with age: the critical limits must lie outside them at every age.
      const { lowest, highest } = curveExtremes(lms.data);
      if (criticalLow !== null && lowest !== null && criticalLow > lowest) {
        throw invalid("criticalLow", `criticalLow (${criticalLow}) must not exceed the lowest 2.5th centile of the curves of partitions.${i} (${lowest.toPrecision(4)}).`);
      }
      if (criticalHigh !== null && highest !== null && criticalHigh < highest) {
        throw invalid("criticalHigh", `criticalHigh (${criticalHigh}) must not be below the highest 97.5th centile of the curves of partitions.${i} (${highest.toPrecision(4)}).`);
      }
      continue;
    }
    const parsed = scoringPartitionSchema.safeParse({
      low: p.low,
      high: p.high,
      unit,
      decimals,
      criticalLow: criticalLow ?? undefined,
      criticalHigh: criticalHigh ?? undefined,
      model: p.model,
      n: p.n,
    });
    if (!parsed.success) {
      const issue = parsed.error.issues[0];
      const field = issue.path.map(String).join(".");
      const message =
        field === "criticalLow"
          ? `criticalLow (${criticalLow}) must not exceed the low limit of partitions.${i} (${p.low}).`
          : field === "criticalHigh"
            ? `criticalHigh (${criticalHigh}) must not be below the high limit of partitions.${i} (${p.high}).`
            : `partitions.${i}: ${field ? `${field}: ` : ""}${issue.message}.`;
      throw invalid(field === "criticalLow" || field === "criticalHigh" ? field : `partitions.${i}`, message);
    }
  }
}

function partitionRows(versionId: string, partitions: ResolvedPartition[]) {
  return partitions.map((p, i) => ({
    versionId,
    position: i + 1,
    sex: p.sex,
    ageFromDays: p.ageFromDays,
    ageToDays: p.ageToDays,
    low: p.low,
    high: p.high,
    lowCiLower: p.lowCi?.[0] ?? null,
    lowCiUpper: p.lowCi?.[1] ?? null,
    highCiLower: p.highCi?.[0] ?? null,
    highCiUpper: p.highCi?.[1] ?? null,
    method: p.method,
    n: p.n,
    model: p.model as unknown as Record<string, unknown>,
    estimateId: p.estimateId,
  }));
}

/** What the audit trail keeps of a partition: enough to see what was drafted, without donor values. */
function auditPartitions(partitions: ResolvedPartition[]) {
  return partitions.map((p) => ({ ...p.scope, method: p.method, low: p.low, high: p.high, n: p.n, estimateId: p.estimateId }));
}

/**
 * Drafts an interval version of the analyte from the study's estimates, or from an accepted
 * adoption check of the analyte (one partition, method "adopted"), numbered next for the
 * analyte in the same transaction. Two drafts numbered at the same moment meet the unique index
 * on (analyte, number): the loser tries again with the next number, and after a few attempts
 * answers 409.
 */
export async function createIntervalVersion(
  database: Database,
  { input, actor }: { input: CreateVersionInput; actor: Actor },
): Promise<VersionOut> {
  for (let attempt = 1; ; attempt++) {
    try {
      const id = await database.transaction(async (tx) => {
        const [analyte] = await tx.select().from(analytes).where(eq(analytes.code, input.analyte)).limit(1);
        if (!analyte) throw invalid("analyte", `There is no analyte with the code ${input.analyte}.`);
        let partitions: ResolvedPartition[];
        let studyId: string | null = null;
        let adoptionCheckId: string | null = null;
        if (input.adoptionCheck !== undefined) {
          const check = await acceptedAdoptionCheckForDraft(tx, { id: input.adoptionCheck, analyteId: analyte.id, analyteCode: analyte.code });
          adoptionCheckId = check.id;
          partitions = [adoptedPartition(check)];
        } else {
          // The body's schema guarantees study and partitions when there is no adoption check.
          const [study] = await tx.select().from(studies).where(eq(studies.id, input.study!)).limit(1);
          if (!study) throw invalid("study", `There is no study with the id ${input.study}.`);
          if (study.analyteId !== analyte.id) {
            throw invalid("study", `The study "${study.title}" is not a study of ${analyte.code}.`);
          }
          studyId = study.id;
          partitions = await resolvePartitions(tx, { studyId: study.id, partitions: input.partitions! });
        }
        const criticalLow = input.criticalLow === undefined ? analyte.criticalLow : input.criticalLow;
        const criticalHigh = input.criticalHigh === undefined ? analyte.criticalHigh : input.criticalHigh;
        assertScorable(partitions, { unit: analyte.unit, decimals: analyte.decimals, criticalLow, criticalHigh });
        const [{ last }] = await tx.select({ last: max(intervalVersions.number) }).from(intervalVersions).where(eq(intervalVersions.analyteId, analyte.id));
        const number = (last ?? 0) + 1;
        const [version] = await tx
          .insert(intervalVersions)
          .values({
            analyteId: analyte.id,
            number,
            studyId,
            adoptionCheckId,
            unit: analyte.unit,
            decimals: analyte.decimals,
            criticalLow,
            criticalHigh,
            note: input.note || null,
            createdBy: actor.id,
            updatedBy: actor.id,
          })
          .returning();
        await tx.insert(intervalPartitions).values(partitionRows(version.id, partitions));
        await recordAuditEvent(tx, {
          actor,
          action: "interval_version.created",
          entityType: "interval_version",
          entityId: version.id,
          summary: `Drafted version ${number} of ${analyte.code} with ${partitions.length} partition${partitions.length === 1 ? "" : "s"}`,
          details: { analyte: analyte.code, number, studyId, ...(adoptionCheckId ? { adoptionCheckId } : {}), criticalLow, criticalHigh, note: version.note, partitions: auditPartitions(partitions) },
        });
        return version.id;
      });
      return await findIntervalVersion(database, { id });
    } catch (err) {
      if (!isUniqueViolation(err, "interval_versions_number_unique")) throw err;
      if (attempt >= NUMBERING_ATTEMPTS) {
        throw new AppError("conflict", `Other versions of ${input.analyte} were numbered at the same moment; try again.`);
      }
    }
  }
}

/**
 * Revises a draft: what the body gives replaces what the draft holds (partitions as a whole;
 * null clears a critical limit or the note). 409 unless the version is a draft.
 */
export async function updateIntervalVersion(
  database: Database,
  { id, changes, actor }: { id: string; changes: UpdateVersionInput; actor: Actor },
): Promise<VersionOut> {
  await database.transaction(async (tx) => {
    const [version] = await tx.select().from(intervalVersions).where(eq(intervalVersions.id, id)).for("update");
    if (!version) throw new AppError("not_found", `There is no interval version with the id ${id}.`);
    const [analyte] = await tx.select().from(analytes).where(eq(analytes.id, version.analyteId)).limit(1);
    if (version.state !== "draft") {
      throw new AppError(
        "conflict",
        `Version ${version.number} of ${analyte.code} is ${VERSION_STATE_LABELS[version.state].toLowerCase()}: only a draft can be changed.`,
      );
    }
    let partitions: ResolvedPartition[] | null = null;
    if (changes.partitions) {
      if (!version.studyId) throw invalid("partitions", "This version has no study to take estimates from.");
      partitions = await resolvePartitions(tx, { studyId: version.studyId, partitions: changes.partitions });
    }
    const criticalLow = changes.criticalLow === undefined ? version.criticalLow : changes.criticalLow;
    const criticalHigh = changes.criticalHigh === undefined ? version.criticalHigh : changes.criticalHigh;
    const note = changes.note === undefined ? version.note : changes.note === "" ? null : changes.note;
    const kept = partitions ?? (await tx.select().from(intervalPartitions).where(eq(intervalPartitions.versionId, id)));
    assertScorable(kept, { unit: version.unit, decimals: version.decimals, criticalLow, criticalHigh });

    const diff: Record<string, { from: unknown; to: unknown }> = {};
    if (criticalLow !== version.criticalLow) diff.criticalLow = { from: version.criticalLow, to: criticalLow };
    if (criticalHigh !== version.criticalHigh) diff.criticalHigh = { from: version.criticalHigh, to: criticalHigh };
    if (note !== version.note) diff.note = { from: version.note, to: note };
    if (partitions) {
      const before = await tx
        .select({ estimateId: intervalPartitions.estimateId, method: intervalPartitions.method, low: intervalPartitions.low, high: intervalPartitions.high })
        .from(intervalPartitions)
        .where(eq(intervalPartitions.versionId, id))
        .orderBy(asc(intervalPartitions.position));
      diff.partitions = { from: before, to: auditPartitions(partitions) };
      // The draft's partitions are replaced as a whole, in this transaction.
      await tx.delete(intervalPartitions).where(eq(intervalPartitions.versionId, id));
      await tx.insert(intervalPartitions).values(partitionRows(id, partitions));
    }
    await tx
      .update(intervalVersions)
      .set({ criticalLow, criticalHigh, note, updatedAt: new Date(), updatedBy: actor.id })
      .where(eq(intervalVersions.id, id));
    await recordAuditEvent(tx, {
      actor,
      action: "interval_version.updated",
      entityType: "interval_version",
      entityId: id,
      summary: `Revised the draft version ${version.number} of ${analyte.code}${Object.keys(diff).length ? ` (${Object.keys(diff).join(", ")})` : " (nothing changed)"}`,
      details: { analyte: analyte.code, number: version.number, changes: diff },
    });
  });
  return findIntervalVersion(database, { id });
}

/** A partition as the API answers it; an empirical model shows its kind and n only. */
export interface VersionPartitionOut {
  id: string;
  position: number;
  sex: "F" | "M" | null;
  ageFrom: number | null;
  ageTo: number | null;
  ageFromDays: number | null;
  ageToDays: number | null;
  low: number | null;
  high: number | null;
  lowCi: [number, number] | null;
  highCi: [number, number] | null;
  method: string;
  n: number;
  model: Record<string, unknown>;
  estimateId: string | null;
}

/** A signature as every answer shows it: who, when, what it means, and the hash it covers. */
export interface SignatureOut {
  id: string;
  signer: { id: string; name: string };
  at: Date;
  meaning: Signature["meaning"];
  meaningLabel: string;
  contentSha256: string;
  comment: string | null;
}

export interface VersionOut {
  id: string;
  number: number;
  state: IntervalVersion["state"];
  analyte: { code: string; name: string };
  studyId: string | null;
  /** The accepted adoption check the version was drafted from, if any. */
  adoptionCheckId: string | null;
  unit: string;
  decimals: number;
  criticalLow: number | null;
  criticalHigh: number | null;
  note: string | null;
  returnComment: string | null;
  createdAt: Date;
  createdBy: { id: string; name: string } | null;
  updatedAt: Date;
  submittedAt: Date | null;
  submittedBy: { id: string; name: string } | null;
  returnedAt: Date | null;
  returnedBy: { id: string; name: string } | null;
  effectiveFrom: Date | null;
  effectiveTo: Date | null;
  reviewBy: Date | null;
  withdrawnAt: Date | null;
  withdrawnBy: { id: string; name: string } | null;
  withdrawnReason: string | null;
  partitions: VersionPartitionOut[];
  signatures: SignatureOut[];
}

const pair = (a: number | null, b: number | null): [number, number] | null => (a === null || b === null ? null : [a, b]);

async function versionsWhere(executor: Executor, where: SQL | undefined): Promise<VersionOut[]> {
  const creator = alias(users, "creator");
  const submitter = alias(users, "submitter");
  const returner = alias(users, "returner");
  const withdrawer = alias(users, "withdrawer");
  const rows = await executor
    .select({
      version: intervalVersions,
      analyte: { code: analytes.code, name: analytes.name },
      creator: { id: creator.id, name: creator.name },
      submitter: { id: submitter.id, name: submitter.name },
      returner: { id: returner.id, name: returner.name },
      withdrawer: { id: withdrawer.id, name: withdrawer.name },
    })
    .from(intervalVersions)
    .innerJoin(analytes, eq(analytes.id, intervalVersions.analyteId))
    .leftJoin(creator, eq(creator.id, intervalVersions.createdBy))
    .leftJoin(submitter, eq(submitter.id, intervalVersions.submittedBy))
    .leftJoin(returner, eq(returner.id, intervalVersions.returnedBy))
    .leftJoin(withdrawer, eq(withdrawer.id, intervalVersions.withdrawnBy))
    .where(where)
    .orderBy(asc(analytes.code), desc(intervalVersions.number));
  if (rows.length === 0) return [];
  const parts = await executor
    .select({ partition: intervalPartitions, ageFrom: estimates.ageFrom, ageTo: estimates.ageTo })
    .from(intervalPartitions)
    .leftJoin(estimates, eq(estimates.id, intervalPartitions.estimateId))
    .where(inArray(intervalPartitions.versionId, rows.map((r) => r.version.id)))
    .orderBy(asc(intervalPartitions.versionId), asc(intervalPartitions.position));
  const byVersion = new Map<string, VersionPartitionOut[]>();
  for (const { partition: p, ageFrom, ageTo } of parts) {
    const list = byVersion.get(p.versionId) ?? [];
    const lms = p.method === "lms" ? lmsModelSchema.parse(p.model) : null;
    list.push({
      id: p.id,
      position: p.position,
      sex: p.sex as "F" | "M" | null,
      ageFrom: lms ? lms.ageMin : ageFrom,
      ageTo: lms ? lms.ageMax : ageTo,
      ageFromDays: p.ageFromDays,
      ageToDays: p.ageToDays,
      low: p.low,
      high: p.high,
      lowCi: pair(p.lowCiLower, p.lowCiUpper),
      highCi: pair(p.highCiLower, p.highCiUpper),
      method: p.method,
      n: p.n,
      // LMS curves are public as they are: they are the model, not donor values.
      model: lms ?? publicModel(scoringModelSchema.parse(p.model)),
      estimateId: p.estimateId,
    });
    byVersion.set(p.versionId, list);
  }
  const signed = await executor
    .select()
    .from(signatures)
    .where(inArray(signatures.versionId, rows.map((r) => r.version.id)))
    .orderBy(asc(signatures.signedAt), asc(signatures.id));
  const signaturesOf = new Map<string, SignatureOut[]>();
  for (const s of signed) {
    const list = signaturesOf.get(s.versionId) ?? [];
    list.push({
      id: s.id,
      signer: { id: s.signerId, name: s.signerName },
      at: s.signedAt,
      meaning: s.meaning,
      meaningLabel: SIGNATURE_MEANING_LABELS[s.meaning],
      contentSha256: s.contentSha256,
      comment: s.comment,
    });
    signaturesOf.set(s.versionId, list);
  }
  const person = (p: { id: string | null; name: string | null } | null) => (p && p.id !== null && p.name !== null ? { id: p.id, name: p.name } : null);
  return rows.map(({ version: v, analyte, creator: c, submitter, returner, withdrawer }) => ({
    id: v.id,
    number: v.number,
    state: v.state,
    analyte,
    studyId: v.studyId,
    adoptionCheckId: v.adoptionCheckId,
    unit: v.unit,
    decimals: v.decimals,
    criticalLow: v.criticalLow,
    criticalHigh: v.criticalHigh,
    note: v.note,
    returnComment: v.returnComment,
    createdAt: v.createdAt,
    createdBy: person(c),
    updatedAt: v.updatedAt,
    submittedAt: v.submittedAt,
    submittedBy: person(submitter),
    returnedAt: v.returnedAt,
    returnedBy: person(returner),
    effectiveFrom: v.effectiveFrom,
    effectiveTo: v.effectiveTo,
    reviewBy: v.reviewBy,
    withdrawnAt: v.withdrawnAt,
    withdrawnBy: person(withdrawer),
    withdrawnReason: v.withdrawnReason,
    partitions: byVersion.get(v.id) ?? [],
    signatures: signaturesOf.get(v.id) ?? [],
  }));
}

/** One interval version with its partitions; 404 when unknown. */
export async function findIntervalVersion(executor: Executor, { id }: { id: string }): Promise<VersionOut> {
  const [version] = await versionsWhere(executor, eq(intervalVersions.id, id));
  if (!version) throw new AppError("not_found", `There is no interval version with the id ${id}.`);
  return version;
}

/** Interval versions, by analyte code and newest number first, filtered by analyte and state. */
export async function listIntervalVersions(executor: Executor, { query }: { query: ListVersionsQuery }): Promise<VersionOut[]> {
  const parts: SQL[] = [];
  if (query.analyte) parts.push(eq(analytes.code, query.analyte));
  if (query.state) parts.push(eq(intervalVersions.state, query.state));
  return versionsWhere(executor, parts.length ? and(...parts) : undefined);
}

