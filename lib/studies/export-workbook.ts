/**
 * A study as an XLSX workbook for the laboratory's dossier: Summary, Donor results (with
 * exclusions and reasons), Partitions (the assessments run) and Estimates (one row per estimate
 * and method). Pure: plain data in, bytes out.
 *
 * Text is never a formula: lib/xlsx/streamed-workbook.ts writes every cell. Donor codes keep
 * their exact characters.
 */
import type { ReferenceIntervalEstimate } from "@/lib/stats/estimate";
import type { LmsCurvesDocument } from "@/lib/stats/lms-curves";
import type { IndirectEstimateDocument } from "./indirect-estimates";
import { addRow, streamedWorkbook, tableSheet, type CellValue, type WorkbookWriter } from "@/lib/xlsx/streamed-workbook";
import { partitionLabel, partitionOut } from "./estimate-input";

export interface StudyExportData {
  study: {
    id: string;
    title: string;
    status: string;
    method: string | null;
    specimen: string | null;
    criteria: string | null;
    collectedFrom: string | null;
    collectedTo: string | null;
    createdAt: Date;
    partitionPlan: { sex: boolean; ageBands: [number, number][] | null } | null;
  };
  analyte: { code: string; name: string; unit: string; decimals: number };
  uploads: {
    fileName: string;
    sha256: string;
    status: string;
    rowsTotal: number;
    rowsValid: number;
    rowsInvalid: number;
    storedRows: number | null;
    uploadedAt: Date;
  }[];
  donorResults: {
    id: number;
    uploadFile: string;
    rowNumber: number;
    donorCode: string;
    sex: string;
    ageYears: number;
    ageDays: number;
    birthDate: string | null;
    collectedOn: string | null;
    value: number;
    censoringSide: "below" | "above" | null;
    originalValue: number | null;
    originalUnit: string | null;
    /** Routine results of an indirect study (null otherwise): what the cleaning steps read. */
    collectedAt?: string | null;
    setting?: string | null;
    flags?: string[] | null;
    exclusion: { source: string; rule: string | null; reason: string; createdAt: Date; by: string | null } | null;
  }[];
  assessments: { id: string; createdAt: Date; request: Record<string, unknown>; result: Record<string, unknown> }[];
  estimates: {
    id: string;
    createdAt: Date;
    sex: string | null;
    ageFrom: number | null;
    ageTo: number | null;
    options: Record<string, unknown>;
    seed: number;
    n: number;
    document: Record<string, unknown>;
    exclusionIds: string[];
    uploadHashes: string[];
  }[];
  exportedAt: Date;
  exportedBy: string;
}

export function num(v: unknown): number | null {
  return typeof v === "number" && Number.isFinite(v) ? v : null;
}

export function str(v: unknown): string | null {
  if (v === null || v === undefined) return null;
  return typeof v === "string" ? v : JSON.stringify(v);
}

function bandsText(bands: unknown): string | null {
  if (!Array.isArray(bands)) return null;
  return bands.map((b) => (Array.isArray(b) ? `[${b[0]}, ${b[1]})` : String(b))).join(" ");
}

function planText(plan: StudyExportData["study"]["partitionPlan"]): string {
  if (!plan) return "Not chosen: one partition of everyone";
  const parts = [plan.sex ? "by sex" : null, plan.ageBands ? `age bands (years) ${bandsText(plan.ageBands)}` : null].filter(Boolean);
  return parts.length ? parts.join(", ") : "One partition of everyone";
}

function summarySheet(workbook: WorkbookWriter, data: StudyExportData): void {
  const sheet = workbook.addWorksheet("Summary");
  sheet.columns = [{ width: 28 }, { width: 70 }, { width: 12 }, { width: 12 }, { width: 12 }, { width: 12 }, { width: 22 }];
  const { study, analyte } = data;
  const excluded = data.donorResults.filter((d) => d.exclusion !== null).length;
  const censored = data.donorResults.filter((d) => d.censoringSide !== null).length;
  const pairs: [string, CellValue][] = [
    ["Study", study.title],
    ["Study id", study.id],
    ["Status", study.status],
    ["Analyte", `${analyte.code} (${analyte.name})`],
    ["Unit", analyte.unit],
    ["Display decimals", analyte.decimals],
    ["Method / instrument", study.method],
    ["Specimen", study.specimen],
    ["Reference individuals and criteria", study.criteria],
    ["Collection period", study.collectedFrom || study.collectedTo ? `${study.collectedFrom ?? "…"} to ${study.collectedTo ?? "…"}` : null],
    ["Opened", study.createdAt],
    ["Donor results", data.donorResults.length],
    ["Excluded (exclusion in effect)", excluded],
    ["Used for estimation", data.donorResults.length - excluded],
    ["Censored values", censored],
    ["Partition plan", planText(study.partitionPlan)],
    ["Partition assessments", data.assessments.length],
    ["Estimates", data.estimates.length],
    ["Exported", data.exportedAt],
    ["Exported by", data.exportedBy],
  ];
  for (const pair of pairs) addRow(sheet, pair);
  addRow(sheet, []);
  addRow(sheet, ["Upload", "SHA-256", "Status", "Rows", "Valid", "Invalid", "Uploaded"], true);
  for (const u of data.uploads) addRow(sheet, [u.fileName, u.sha256, u.status, u.rowsTotal, u.rowsValid, u.rowsInvalid, u.uploadedAt]);
  sheet.commit();
}

/** The donor results with their exclusions in effect: donor-level data. */
export function donorSheet(workbook: WorkbookWriter, data: Pick<StudyExportData, "analyte" | "donorResults">): void {
  // Routine results (an indirect study) add what the cleaning steps read: without the collection
  // time, setting and flags the steps recorded in the estimate could not be followed from the rows.
  const routine = data.donorResults.some((d) => d.collectedAt != null || d.setting != null || d.flags != null);
  const sheet = tableSheet(workbook, "Donor results", [
    "Id", "Upload", "Row", "Donor code", "Sex", "Age (years)", "Age (days)", "Birth date", "Collected on",
    `Value (${data.analyte.unit})`, "Censored", "Original value", "Original unit", "Excluded", "Exclusion source", "Rule", "Reason", "Excluded at", "Excluded by",
    ...(routine ? ["Collected at", "Setting", "Flags"] : []),
  ]);
  for (const d of data.donorResults) {
    const x = d.exclusion;
    addRow(sheet, [
      d.id, d.uploadFile, d.rowNumber, d.donorCode, d.sex, d.ageYears, d.ageDays, d.birthDate, d.collectedOn,
      d.value, d.censoringSide === "below" ? "<" : d.censoringSide === "above" ? ">" : null, d.originalValue, d.originalUnit,
      x ? "yes" : "no", x?.source ?? null, x?.rule ?? null, x?.reason ?? null, x?.createdAt ?? null, x?.by ?? null,
      ...(routine ? [d.collectedAt ?? null, d.setting ?? null, d.flags && d.flags.length > 0 ? d.flags.join("; ") : null] : []),
    ]);
  }
  sheet.commit();
}

/** The partition assessments run, with their groups, comparisons and verdicts. */
export function partitionsSheet(workbook: WorkbookWriter, data: Pick<StudyExportData, "assessments">, name = "Partitions"): void {
  const sheet = tableSheet(workbook, name, ["Assessment", "Made", "By", "Bands (years)", "Sex", "Verdict", "Group / comparison", "n", "Mean", "SD", "Median", "Harris-Boyd", "Lahti", "Summary"]);
  for (const a of data.assessments) {
    const r = a.result;
    const base: CellValue[] = [a.id, a.createdAt, str(r.by ?? a.request.by), bandsText(r.bands ?? a.request.bands), str(r.sex ?? a.request.sex), str(r.verdict)];
    const groups = Array.isArray(r.groups) ? (r.groups as Record<string, unknown>[]) : [];
    const comparisons = Array.isArray(r.comparisons) ? (r.comparisons as Record<string, unknown>[]) : [];
    for (const g of groups) addRow(sheet, [...base, str(g.label), num(g.n), num(g.mean), num(g.sd), num(g.median), null, null, null]);
    for (const c of comparisons) {
      const verdictOf = (v: unknown) => str((v as { verdict?: unknown } | null)?.verdict ?? null);
      const between = Array.isArray(c.between) ? c.between.join(" vs ") : str(c.between);
      addRow(sheet, [...base, between, null, null, null, null, verdictOf(c.harrisBoyd), verdictOf(c.lahti), null]);
    }
    addRow(sheet, [...base, null, null, null, null, null, null, null, str(r.summary)]);
  }
  sheet.commit();
}

const METHODS = ["nonparametric", "parametric", "robust"] as const;

/** One row per estimate and method: limits, CIs, scale, provenance, warnings. */
export function estimatesSheet(workbook: WorkbookWriter, data: Pick<StudyExportData, "estimates">, name = "Estimates"): void {
  const sheet = tableSheet(workbook, name, [
    "Estimate", "Made", "Partition", "Sex", "Age from", "Age to", "Outliers", "Transform", "Seed", "n", "Method", "Recommended",
    "Lower limit", "Lower CI low", "Lower CI high", "Upper limit", "Upper CI low", "Upper CI high", "Scale", "Lambda",
    "Exclusions in effect", "Upload SHA-256", "Engine", "Warnings",
  ]);
  for (const e of data.estimates) {
    const doc = e.document as unknown as ReferenceIntervalEstimate;
    const engine = doc.provenance?.engine;
    const engineText = engine ? `${engine.name} ${engine.version}${engine.commit ? ` ${engine.commit}` : ""}${engine.uncommittedChanges ? " (uncommitted changes)" : ""}` : null;
    if (e.options.method === "indirect") {
      // One row here; the cleaning steps, the fit and the second opinion in "Indirect estimates".
      const d = e.document as unknown as IndirectEstimateDocument;
      addRow(sheet, [
        e.id, e.createdAt, partitionLabel(partitionOut(e)), e.sex, e.ageFrom, e.ageTo, null, null, e.seed, e.n, "indirect", null,
        num(d.lower), num(d.lowerCi?.[0]), num(d.lowerCi?.[1]), num(d.upper), num(d.upperCi?.[0]), num(d.upperCi?.[1]),
        d.lambda === 0 ? "ln" : "box-cox", num(d.lambda), e.exclusionIds.length, e.uploadHashes.join(" "), engineText, (d.warnings ?? []).join(" "),
      ]);
      continue;
    }
    if (e.options.method === "lms") {
      // LMS age curves have no fixed limits: one row here, the curves at their ages in "Age curves".
      addRow(sheet, [
        e.id, e.createdAt, partitionLabel(partitionOut(e)), e.sex, e.ageFrom, e.ageTo, null, null, e.seed, e.n, "lms", null,
        null, null, null, null, null, null, null, null, e.exclusionIds.length, e.uploadHashes.join(" "), engineText, (doc.warnings ?? []).join(" "),
      ]);
      continue;
    }
    for (const method of METHODS) {
      const m = doc[method];
      const parametricScale = method === "nonparametric" ? null : doc.parametric;
      addRow(sheet, [
        e.id, e.createdAt, partitionLabel(partitionOut(e)), e.sex, e.ageFrom, e.ageTo, str(e.options.outliers), str(e.options.transform), e.seed, e.n,
        method, doc.recommended === method ? "yes" : "no",
        num(m?.lower), num(m?.lowerCi?.[0]), num(m?.lowerCi?.[1]), num(m?.upper), num(m?.upperCi?.[0]), num(m?.upperCi?.[1]),
        parametricScale?.transform ?? null, num(parametricScale?.lambda),
        e.exclusionIds.length, e.uploadHashes.join(" "),
        engineText,
        (doc.warnings ?? []).join(" "),
      ]);
    }
  }
  sheet.commit();
}

/** The method an indirect estimate names in the dossier. */
export const INDIRECT_METHOD_NAME =
  "Indirect: truncated maximum likelihood on a power-normal (Box-Cox) model of the non-diseased results (Arzideh et al., Clin Chem Lab Med 2007; J Lab Med 2009), after the IFCC's data cleaning (Jones et al., Clin Chem Lab Med 2019); 90% CIs by a seeded percentile bootstrap; Bhattacharya's procedure as a second opinion";

/**
 * The indirect estimates, each as a block of rows: the method, the path from the study's routine
 * results to the values estimated (each cleaning step with the results it removed), the fit, the
 * limits with their CIs, Bhattacharya's second opinion, the settings behind the values and the
 * advice (lib/studies/indirect-estimates.ts's document).
 */
export function indirectSheet(workbook: WorkbookWriter, data: Pick<StudyExportData, "estimates">, name = "Indirect estimates"): void {
  const sheet = tableSheet(workbook, name, ["Estimate", "Section", "Item", "Value", "Removed", "Remaining"]);
  for (const e of data.estimates) {
    if (e.options.method !== "indirect") continue;
    const d = e.document as unknown as IndirectEstimateDocument;
    const row = (section: string, item: string, value: CellValue, removed: CellValue = null, remaining: CellValue = null) =>
      addRow(sheet, [e.id, section, item, value, removed, remaining]);
    row("Method", "Method", INDIRECT_METHOD_NAME);
    row("Method", "Partition", partitionLabel(partitionOut(e)));
    row("Method", "Seed", e.seed);
    row("Cleaning", "Routine results in the study", d.cleaning.results, null, d.cleaning.results);
    row("Cleaning", "Exclusions in effect (by hand)", d.cleaning.excluded, d.cleaning.excluded, d.cleaning.results - d.cleaning.excluded);
    for (const step of d.cleaning.steps) row("Cleaning", `${step.step}: ${step.description}`, step.before, step.removed, step.remaining);
    row("Fit", "Values estimated (n)", d.n);
    row("Fit", "Box-Cox lambda", num(d.lambda));
    row("Fit", "Mean on the Box-Cox scale (mu)", num(d.mu));
    row("Fit", "SD on the Box-Cox scale (sigma)", num(d.sigma));
    row("Fit", "Non-diseased fraction", num(d.fraction));
    row("Fit", "Truncation interval, lower end", num(d.truncation[0]));
    row("Fit", "Truncation interval, upper end", num(d.truncation[1]));
    row("Fit", `Chi-square (${d.df} df)`, num(d.chiSquare));
    row("Fit", "p", num(d.pValue));
    row("Fit", "Passed the fit and plausibility criterion", d.accepted ? "yes" : "no");
    row("Limits", "Lower limit", num(d.lower));
    row("Limits", "Lower limit, 90% CI", d.lowerCi ? `${d.lowerCi[0]} to ${d.lowerCi[1]}` : null);
    row("Limits", "Upper limit", num(d.upper));
    row("Limits", "Upper limit, 90% CI", d.upperCi ? `${d.upperCi[0]} to ${d.upperCi[1]}` : null);
    row("Limits", "Bootstrap replicates (used)", `${d.bootstrap.replicates} (${d.bootstrap.used})`);
    row("Second opinion", "Bhattacharya lower limit", num(d.secondOpinion.lower));
    row("Second opinion", "Bhattacharya upper limit", num(d.secondOpinion.upper));
    for (const share of d.settings.shares) row("Settings", share.setting, share.count, null, num(share.share));
    for (const line of d.advice) row("Advice", "", line);
  }
  sheet.commit();
}

/**
 * The LMS estimates' curves at the ages of their documents: one row per estimate and age with L,
 * M, S and the 2.5th, 50th and 97.5th centiles (lib/studies/age-curves.ts's document).
 */
export function ageCurvesSheet(workbook: WorkbookWriter, data: Pick<StudyExportData, "estimates">, name = "Age curves"): void {
  const sheet = tableSheet(workbook, name, [
    "Estimate", "Sex", "Seed", "n", "Age (years)", "L", "M", "S", "2.5th centile", "50th centile", "97.5th centile", "edf L", "edf M", "edf S",
  ]);
  for (const e of data.estimates) {
    if (e.options.method !== "lms") continue;
    const doc = e.document as unknown as LmsCurvesDocument;
    for (const [i, age] of doc.at.entries()) {
      addRow(sheet, [
        e.id, e.sex, e.seed, e.n, age, num(doc.L[i]), num(doc.M[i]), num(doc.S[i]), num(doc.lower[i]), num(doc.median[i]), num(doc.upper[i]),
        num(doc.edf.L), num(doc.edf.M), num(doc.edf.S),
      ]);
    }
  }
  sheet.commit();
}

/** The workbook's bytes, written with exceljs's streaming writer. */
export async function studyWorkbook(data: StudyExportData): Promise<Buffer> {
  return streamedWorkbook(data.exportedAt, (workbook) => {
    summarySheet(workbook, data);
    donorSheet(workbook, data);
    partitionsSheet(workbook, data);
    estimatesSheet(workbook, data);
    if (data.estimates.some((e) => e.options.method === "lms")) ageCurvesSheet(workbook, data);
    if (data.estimates.some((e) => e.options.method === "indirect")) indirectSheet(workbook, data);
  });
}
