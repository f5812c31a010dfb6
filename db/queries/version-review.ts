import "server-only";
import { eq } from "drizzle-orm";
import type { ReferenceIntervalEstimate } from "@/lib/stats/estimate";
import type { Database } from "../client";
import { analytes, studies } from "../schema";
import { findEstimateRow } from "./estimates";
import { listExclusions, type ExclusionItem } from "./exclusions";
import { findIntervalVersion, type SignatureOut, type VersionOut } from "./interval-versions";
import { studyUploadRows } from "./study-export";
import { listPartitionAssessments, type PartitionAssessmentItem } from "./partition-assessments";
import { comparisonOf, type VersionComparisonOut } from "./version-comparison";


/** Who moved the version through its states, and its review date. */
export type VersionPeople = Pick<VersionOut, "submittedBy" | "returnedBy" | "returnedAt" | "withdrawnBy" | "withdrawnAt" | "withdrawnReason" | "reviewBy">;

export interface VersionReview {
  version: VersionOut;
  people: VersionPeople;
  signatures: SignatureOut[];
  comparison: VersionComparisonOut;
  analyte: { code: string; name: string; unit: string; decimals: number; reviewMonths: number };
  study: {
    id: string;
    title: string;
    status: string;
    method: string | null;
    specimen: string | null;
    criteria: string | null;
    collectedFrom: string | null;
    collectedTo: string | null;
  } | null;
  /** The study's uploads (file, SHA-256, status, rows), oldest first. */
  uploads: { fileName: string; sha256: string; status: string; rowsTotal: number }[];
  /** The exclusions in effect in the study, oldest first; null when the caller may not read donor-level data. */
  exclusions: ExclusionItem[] | null;
  assessments: PartitionAssessmentItem[];
  /** Each partition's estimate document (by partition position), or null. */
  estimates: ({ id: string; n: number; document: ReferenceIntervalEstimate } | null)[];
}

/** Everything the review page and the sign-off record show of one version, in one snapshot. */
export async function versionReview(database: Database, { id, donorLevel }: { id: string; donorLevel: boolean }): Promise<VersionReview> {
  return database.transaction(
    async (tx) => {
      const version = await findIntervalVersion(tx, { id });
      const { submittedBy, returnedBy, returnedAt, withdrawnBy, withdrawnAt, withdrawnReason, reviewBy, signatures } = version;
      const people = { submittedBy, returnedBy, returnedAt, withdrawnBy, withdrawnAt, withdrawnReason, reviewBy };
      const comparison = await comparisonOf(tx, { version });
      const [analyte] = await tx.select().from(analytes).where(eq(analytes.code, version.analyte.code)).limit(1);
      const [study] = version.studyId ? await tx.select().from(studies).where(eq(studies.id, version.studyId)).limit(1) : [];
      const exclusions = donorLevel && study ? (await listExclusions(tx, { studyId: study.id })).reverse() : donorLevel ? [] : null;
      const uploads = study ? await studyUploadRows(tx, { studyId: study.id }) : [];
      const assessments = study ? (await listPartitionAssessments(tx, { studyId: study.id })).reverse() : [];
      const estimates = [];
      for (const p of version.partitions) {
        const row = p.estimateId ? await findEstimateRow(tx, { id: p.estimateId }) : undefined;
        estimates.push(row ? { id: row.id, n: row.n, document: row.document as unknown as ReferenceIntervalEstimate } : null);
      }
      return {
        version,
        people,
        signatures,
        comparison,
        analyte: { code: analyte.code, name: analyte.name, unit: version.unit, decimals: version.decimals, reviewMonths: analyte.reviewMonths },
        study: study
          ? {
              id: study.id,
              title: study.title,
              status: study.status,
              method: study.method,
              specimen: study.specimen,
              criteria: study.criteria,
              collectedFrom: study.collectedFrom,
              collectedTo: study.collectedTo,
            }
          : null,
        uploads: uploads.map((u) => ({ fileName: u.fileName, sha256: u.sha256, status: u.status, rowsTotal: u.rowsTotal })),
        exclusions,
        assessments,
        estimates,
      };
    },
    { isolationLevel: "repeatable read", accessMode: "read only" },
  );
}
