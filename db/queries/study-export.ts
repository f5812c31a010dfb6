import "server-only";
import { and, asc, eq, isNull } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import type { StudyExportData } from "@/lib/studies/export-workbook";
import type { Database } from "../client";
import { analytes, donorResults, exclusions, partitionAssessments, studies, uploads, users } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { estimatesOfStudy } from "./estimates";

/**
 * Everything the study's workbook holds, read in one snapshot (repeatable read), with an audit
 * event recording that donor-level data left the application.
 */
export async function studyExportData(database: Database, { studyId, actor }: { studyId: string; actor: Actor }): Promise<StudyExportData> {
  return database.transaction(
    async (tx) => {
      const [row] = await tx
        .select({ study: studies, analyte: analytes })
        .from(studies)
        .innerJoin(analytes, eq(analytes.id, studies.analyteId))
        .where(eq(studies.id, studyId))
        .limit(1);
      if (!row) throw new AppError("not_found", `There is no study with the id ${studyId}.`);
      const uploadRows = await tx.select().from(uploads).where(eq(uploads.studyId, studyId)).orderBy(asc(uploads.uploadedAt), asc(uploads.id));
      const fileOf = new Map(uploadRows.map((u) => [u.id, u.fileName]));
      const donors = await tx
        .select({ donor: donorResults, exclusion: exclusions, by: users.email })
        .from(donorResults)
        .leftJoin(exclusions, and(eq(exclusions.donorResultId, donorResults.id), isNull(exclusions.undoneAt)))
        .leftJoin(users, eq(users.id, exclusions.createdBy))
        .where(eq(donorResults.studyId, studyId))
        .orderBy(asc(donorResults.id));
      const assessments = await tx
        .select()
        .from(partitionAssessments)
        .where(eq(partitionAssessments.studyId, studyId))
        .orderBy(asc(partitionAssessments.createdAt), asc(partitionAssessments.id));
      const estimateRows = await estimatesOfStudy(tx, { studyId });
      await recordAuditEvent(tx, {
        actor,
        action: "study.exported",
        entityType: "study",
        entityId: studyId,
        summary: `Exported the study "${row.study.title}" as a workbook (${donors.length} donor results, ${estimateRows.length} estimates)`,
        details: { donorResults: donors.length, estimates: estimateRows.length, assessments: assessments.length },
      });
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
        uploads: uploadRows.map((u) => ({
          fileName: u.fileName,
          sha256: u.sha256,
          status: u.status,
          rowsTotal: u.rowsTotal,
          rowsValid: u.rowsValid,
          rowsInvalid: u.rowsInvalid,
          storedRows: u.storedRows,
          uploadedAt: u.uploadedAt,
        })),
        donorResults: donors.map(({ donor: d, exclusion: x, by }) => ({
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
          exclusion: x ? { source: x.source, rule: x.rule, reason: x.reason, createdAt: x.createdAt, by } : null,
        })),
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
        exportedAt: new Date(),
        exportedBy: actor.label,
      };
    },
    { isolationLevel: "repeatable read" },
  );
}
