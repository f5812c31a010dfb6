/**
 * An interval version's dossier for accreditation files, as an XLSX workbook: Summary,
 * Signatures, Partitions (limits and CIs), Methods (each partition's estimate, the methods side
 * by side), Partition verdicts, Exclusions and Donor results (only for callers who may read
 * donor-level data), Audit events. Pure: plain data in, bytes out; every cell is written by
 * lib/xlsx/streamed-workbook.ts, so text is never a formula.
 */
import { lmsModelOf, lmsRows, lmsScopeLabel, lmsTableAges } from "@/lib/scoring/lms-curves-view";
import { lmsAt } from "@/lib/stats/lms-model";
import { donorSheet, estimatesSheet, indirectSheet, num, partitionsSheet, str, type StudyExportData } from "@/lib/studies/export-workbook";
import { addRow, streamedWorkbook, tableSheet, type CellValue, type WorkbookWriter } from "@/lib/xlsx/streamed-workbook";
import { scopeLabel } from "./comparison";
import { VERSION_STATE_LABELS } from "./state-machine";
import type { VersionState } from "@/db/schema";
import type { ChainHead } from "@/lib/audit/chain";

export interface DossierPartition {
  position: number;
  sex: "F" | "M" | null;
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

export interface DossierData {
  version: {
    id: string;
    number: number;
    state: VersionState;
    analyte: { code: string; name: string };
    unit: string;
    decimals: number;
    criticalLow: number | null;
    criticalHigh: number | null;
    note: string | null;
    returnComment: string | null;
    createdAt: Date;
    createdBy: string | null;
    submittedAt: Date | null;
    submittedBy: string | null;
    effectiveFrom: Date | null;
    effectiveTo: Date | null;
    reviewBy: Date | null;
    withdrawnAt: Date | null;
    withdrawnReason: string | null;
    partitions: DossierPartition[];
  };
  signatures: { signer: string; at: Date; meaning: string; contentSha256: string; comment: string | null }[];
  /** The version's study; null for a version drafted from an adoption check. */
  study: Omit<StudyExportData, "exportedAt" | "exportedBy"> | null;
  /** Whether donor-level data (donor results, exclusions) is in the workbook. */
  donorLevel: boolean;
  exclusions: {
    donorResultId: number;
    donorCode: string;
    sex: string;
    ageYears: number;
    value: number;
    source: string;
    rule: string | null;
    reason: string;
    createdAt: Date;
    createdBy: string | null;
  }[];
  auditEvents: { at: Date; actorLabel: string; action: string; entityType: string; entityId: string | null; summary: string; details: Record<string, unknown> }[];
  /** The audit chain's newest link when the dossier was made (null: an empty chain). */
  auditChainHead: ChainHead | null;
  exportedAt: Date;
  exportedBy: string;
}

/**
 * The audit chain's head at export: kept with the dossier, it lets anyone check later that the
 * audit trail was not rewritten since (DEVELOPERS.md, "Audit hash chain").
 */
export function auditChainRows(head: ChainHead | null): [string, CellValue][] {
  if (!head) return [["Audit chain head", "The audit chain was empty"]];
  return [
    ["Audit chain head", `Link ${head.position}, audit event ${head.eventId}`],
    ["Audit chain head SHA-256", head.hash],
    ["Check the audit trail against it", `npm run -s bellwether -- verify-audit --head ${head.position}:${head.hash}`],
  ];
}

function summarySheet(workbook: WorkbookWriter, data: DossierData): void {
  const sheet = workbook.addWorksheet("Summary");
  sheet.columns = [{ width: 30 }, { width: 70 }, { width: 12 }, { width: 12 }, { width: 12 }, { width: 12 }, { width: 22 }];
  const { version: v, study } = data;
  const pairs: [string, CellValue][] = [
    ["Interval version", `${v.analyte.code} version ${v.number}`],
    ["Version id", v.id],
    ["State", VERSION_STATE_LABELS[v.state]],
    ["Analyte", `${v.analyte.code} (${v.analyte.name})`],
    ["Unit", v.unit],
    ["Display decimals", v.decimals],
    ["Partitions", v.partitions.length],
    ["Critical low", v.criticalLow],
    ["Critical high", v.criticalHigh],
    ["Note", v.note],
    ["Drafted", v.createdAt],
    ["Drafted by", v.createdBy],
    ["Submitted", v.submittedAt],
    ["Submitted by", v.submittedBy],
    ["Last return comment", v.returnComment],
    ["In force from", v.effectiveFrom],
    ["In force until", v.effectiveTo],
    ["Review by", v.reviewBy],
    ["Withdrawn", v.withdrawnAt],
    ["Withdrawal reason", v.withdrawnReason],
    ["Signatures", data.signatures.length],
    ["Study", study?.study.title ?? "None: drafted from an adoption check"],
    ["Study id", study?.study.id ?? null],
    ["Method / instrument", study?.study.method ?? null],
    ["Specimen", study?.study.specimen ?? null],
    ["Reference individuals and criteria", study?.study.criteria ?? null],
    [
      "Collection period",
      study && (study.study.collectedFrom || study.study.collectedTo) ? `${study.study.collectedFrom ?? "…"} to ${study.study.collectedTo ?? "…"}` : null,
    ],
    [
      "Donor-level data",
      data.donorLevel
        ? "Included: the Exclusions and Donor results sheets"
        : "Left out: the exporting role may not read donor-level data (DESIGN.md, Roles)",
    ],
    ["Exported", data.exportedAt],
    ["Exported by", data.exportedBy],
    ...auditChainRows(data.auditChainHead),
  ];
  for (const pair of pairs) addRow(sheet, pair);
  if (study) {
    addRow(sheet, []);
    addRow(sheet, ["Upload", "SHA-256", "Status", "Rows", "Valid", "Invalid", "Uploaded"], true);
    for (const u of study.uploads) addRow(sheet, [u.fileName, u.sha256, u.status, u.rowsTotal, u.rowsValid, u.rowsInvalid, u.uploadedAt]);
  }
  sheet.commit();
}

function signaturesSheet(workbook: WorkbookWriter, data: DossierData): void {
  const sheet = tableSheet(workbook, "Signatures", ["Signer", "Signed at", "Meaning", "Content SHA-256", "Comment"]);
  if (data.signatures.length === 0) addRow(sheet, ["No electronic signature on this version."]);
  for (const s of data.signatures) addRow(sheet, [s.signer, s.at, s.meaning, s.contentSha256, s.comment]);
  sheet.commit();
}

function versionPartitionsSheet(workbook: WorkbookWriter, data: DossierData): void {
  const unit = data.version.unit;
  const sheet = tableSheet(workbook, "Partitions", [
    "Position", "Partition", "Sex", "Age from (days)", "Age to (days)", `Lower limit (${unit})`, "Lower 90% CI low", "Lower 90% CI high",
    `Upper limit (${unit})`, "Upper 90% CI low", "Upper 90% CI high", "Method", "n", "Scoring model", "Estimate",
  ]);
  for (const p of data.version.partitions) {
    addRow(sheet, [
      p.position, scopeLabel(p), p.sex, p.ageFromDays, p.ageToDays, p.low, p.lowCi?.[0] ?? null, p.lowCi?.[1] ?? null,
      p.high, p.highCi?.[0] ?? null, p.highCi?.[1] ?? null, p.method, p.n, str(p.model), p.estimateId,
    ]);
  }
  sheet.commit();
}

/**
 * LMS age curves: each lms partition's limits (2.5th and 97.5th centiles), median and L, M, S at
 * the table ages that the pages show; the curves themselves are in the Partitions sheet's
 * scoring model, from which every other age can be reproduced.
 */
function ageCurvesSheet(workbook: WorkbookWriter, data: DossierData): void {
  const curves = data.version.partitions.flatMap((p) => {
    const model = lmsModelOf(p.model);
    return model ? [{ p, model }] : [];
  });
  if (curves.length === 0) return;
  const unit = data.version.unit;
  const sheet = tableSheet(workbook, "Age curves", [
    "Position", "Partition", "Age (years)", `Lower limit (${unit})`, `Median (${unit})`, `Upper limit (${unit})`, "L", "M", "S",
  ]);
  for (const { p, model } of curves) {
    const label = lmsScopeLabel(p);
    for (const row of lmsRows(model, lmsTableAges(model))) {
      const at = lmsAt(model, row.ageYears);
      addRow(sheet, [p.position, label, row.ageYears, num(row.low), row.median, num(row.high), at.L, at.M, at.S]);
    }
  }
  sheet.commit();
}

function exclusionsSheet(workbook: WorkbookWriter, data: DossierData): void {
  const sheet = tableSheet(workbook, "Exclusions", [
    "Donor result", "Donor code", "Sex", "Age (years)", `Value (${data.version.unit})`, "Source", "Rule", "Reason", "Excluded at", "Excluded by",
  ]);
  for (const x of data.exclusions) {
    addRow(sheet, [x.donorResultId, x.donorCode, x.sex, num(x.ageYears), num(x.value), x.source, x.rule, x.reason, x.createdAt, x.createdBy]);
  }
  sheet.commit();
}

function auditSheet(workbook: WorkbookWriter, data: DossierData): void {
  const sheet = tableSheet(workbook, "Audit events", ["At", "Actor", "Action", "Entity type", "Entity id", "Summary", "Details"]);
  for (const e of data.auditEvents) addRow(sheet, [e.at, e.actorLabel, e.action, e.entityType, e.entityId, e.summary, JSON.stringify(e.details)]);
  sheet.commit();
}

/** The dossier's bytes. */
export async function dossierWorkbook(data: DossierData): Promise<Buffer> {
  // LMS curves have no methods side by side: their estimates are shown in "Age curves" instead;
  // indirect estimates have one row there and their cleaning and fit in "Indirect method".
  const estimateIds = new Set(data.version.partitions.filter((p) => p.method !== "lms").map((p) => p.estimateId));
  const estimates = data.study?.estimates.filter((e) => estimateIds.has(e.id)) ?? [];
  const indirect = estimates.filter((e) => e.options.method === "indirect");
  return streamedWorkbook(data.exportedAt, (workbook) => {
    summarySheet(workbook, data);
    signaturesSheet(workbook, data);
    versionPartitionsSheet(workbook, data);
    ageCurvesSheet(workbook, data);
    estimatesSheet(workbook, { estimates }, "Methods");
    if (indirect.length > 0) indirectSheet(workbook, { estimates: indirect }, "Indirect method");
    partitionsSheet(workbook, { assessments: data.study?.assessments ?? [] }, "Partition verdicts");
    if (data.donorLevel) {
      exclusionsSheet(workbook, data);
      donorSheet(workbook, { analyte: { ...data.version.analyte, unit: data.version.unit, decimals: data.version.decimals }, donorResults: data.study?.donorResults ?? [] });
    }
    auditSheet(workbook, data);
  });
}
