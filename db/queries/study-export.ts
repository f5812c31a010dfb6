import "server-only";
import { and, asc, eq, isNull } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import type { StudyExportData } from "@/lib/studies/export-workbook";
import type { Database, Executor } from "../client";
import { analytes, donorResults, exclusions, partitionAssessments, studies, uploads, users } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { estimatesOfStudy } from "./estimates";

/** The study's part of a workbook, without who exported it or when. */
export type StudyExportContent = Omit<StudyExportData, "exportedAt" | "exportedBy">;

/**
 * What a workbook holds of a study, read with the caller's executor (run it inside a repeatable
 * read transaction for one snapshot). `donors: false` leaves the donor results out (an empty list)
 * for callers that may not read donor-level data.
 */
export async function readStudyExport(executor: Executor, { studyId, donors }: { studyId: string; donors: boolean }): Promise<StudyExportContent> {
  const [row] = await executor
    .select({ study: studies, analyte: analytes })
    .from(studies)
    .innerJoin(analytes, eq(analytes.id, studies.analyteId))
    .where(eq(studies.id, studyId))
    .limit(1);
  if (!row) throw new AppError("not_found", `There is no study with the id ${studyId}.`);
  const uploadRows = await studyUploadRows(executor, { studyId });
  const donorRows = donors ? await studyDonorRows(executor, { studyId, uploadRows }) : [];
  const assessments = await executor
    .select()
    .from(partitionAssessments)
    .where(eq(partitionAssessments.studyId, studyId))
    .orderBy(asc(partitionAssessments.createdAt), asc(partitionAssessments.id));
  const estimateRows = await estimatesOfStudy(executor, { studyId });
  const { study, analyte } = row;
  return {
    study: {
      id: study.id,
      title: study.title,
      status: study.status,
      method: study.method,
      specimen: study.specimen,
      criteria: study.criteria,
      collectedFrom: study.collectedFrom,
      collectedTo: study.collectedTo,
      createdAt: study.createdAt,
      partitionPlan: study.partitionPlan,
    },
    analyte: { code: analyte.code, name: analyte.name, unit: analyte.unit, decimals: analyte.decimals },
    uploads: uploadRows,
    donorResults: donorRows,
    assessments: assessments.map((a) => ({ id: a.id, createdAt: a.createdAt, request: a.request, result: a.result })),
    estimates: estimateRows.map((e) => ({
      id: e.id,
      createdAt: e.createdAt,
      sex: e.sex,
      ageFrom: e.ageFrom,
      ageTo: e.ageTo,
      options: e.options,
      seed: e.seed,
      n: e.n,
      document: e.document,
      exclusionIds: e.exclusionIds,
      uploadHashes: e.uploadHashes,
    })),
  };
}

/**
 * Everything the study's workbook holds, read in one snapshot (repeatable read), with an audit
 * event recording that donor-level data left the application.
 */
export async function studyExportData(database: Database, { studyId, actor }: { studyId: string; actor: Actor }): Promise<StudyExportData> {
  return database.transaction(
    async (tx) => {
      const content = await readStudyExport(tx, { studyId, donors: true });
      await recordAuditEvent(tx, {
        actor,
        action: "study.exported",
        entityType: "study",
        entityId: studyId,
        summary: `Exported the study "${content.study.title}" as a workbook (${content.donorResults.length} donor results, ${content.estimates.length} estimates)`,
        details: { donorResults: content.donorResults.length, estimates: content.estimates.length, assessments: content.assessments.length },
      });
      return { ...content, exportedAt: new Date(), exportedBy: actor.label };
    },
    { isolationLevel: "repeatable read" },
  );
}

/** A study's uploads as its workbooks list them, oldest first. */
export async function studyUploadRows(executor: Executor, { studyId }: { studyId: string }): Promise<(StudyExportData["uploads"][number] & { id: string })[]> {
  const rows = await executor.select().from(uploads).where(eq(uploads.studyId, studyId)).orderBy(asc(uploads.uploadedAt), asc(uploads.id));
  return rows.map((u) => ({
    id: u.id,
    fileName: u.fileName,
    sha256: u.sha256,
    status: u.status,
    rowsTotal: u.rowsTotal,
    rowsValid: u.rowsValid,
    rowsInvalid: u.rowsInvalid,
    storedRows: u.storedRows,
    uploadedAt: u.uploadedAt,
  }));
}

/** Every donor result of a study in id order, with its exclusion in effect (or null): donor-level data. */
export async function studyDonorRows(
  executor: Executor,
  { studyId, uploadRows }: { studyId: string; uploadRows: { id: string; fileName: string }[] },
): Promise<StudyExportData["donorResults"]> {
  const fileOf = new Map(uploadRows.map((u) => [u.id, u.fileName]));
  const rows = await executor
    .select({ donor: donorResults, exclusion: exclusions, by: users.email })
    .from(donorResults)
    .leftJoin(exclusions, and(eq(exclusions.donorResultId, donorResults.id), isNull(exclusions.undoneAt)))
    .leftJoin(users, eq(users.id, exclusions.createdBy))
    .where(eq(donorResults.studyId, studyId))
    .orderBy(asc(donorResults.id));
  return rows.map(({ donor: d, exclusion: x, by }) => ({
    id: d.id,
    uploadFile: fileOf.get(d.uploadId) ?? d.uploadId,
    rowNumber: d.rowNumber,
    donorCode: d.donorCode,
    sex: d.sex,
    ageYears: d.ageYears,
    ageDays: d.ageDays,
    birthDate: d.birthDate,
    collectedOn: d.collectedOn,
    value: d.value,
    censoringSide: d.censoringSide,
    originalValue: d.originalValue,
    originalUnit: d.originalUnit,
    collectedAt: d.collectedAt,
    setting: d.setting,
    flags: d.flags,
    exclusion: x ? { source: x.source, rule: x.rule, reason: x.reason, createdAt: x.createdAt, by } : null,
  }));
}
