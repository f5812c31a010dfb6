/**
 * The demo laboratory's reference studies: which analyte, which invented cohort, and how far
 * each has come. Data only; db/demo-seed-studies.ts carries them out through the same queries the
 * API uses. Everything here is made up for Bellwether's demo.
 */
import { DEMO_COHORTS, type DemoCohort } from "./demo-donors";
import { DEMO_TSH_ROUTINE, type DemoRoutineData } from "./demo-routine";
import type { IndirectEstimateInput } from "@/lib/studies/indirect-estimates";

/**
 * How far a study has come, each stage including the ones before it: results uploaded;
 * screened (outliers confirmed, a manual exclusion); partitions assessed and chosen; estimated;
 * a draft interval version; that version submitted for sign-off; that version in force.
 */
export const DEMO_STAGES = ["uploaded", "screened", "partitioned", "estimated", "draft", "awaiting_signoff", "in_force"] as const;
export type DemoStage = (typeof DEMO_STAGES)[number];

export interface DemoStudy {
  analyte: string;
  title: string;
  method: string;
  criteria: string;
  /** The healthy donors (direct and age-curve studies). */
  cohort?: DemoCohort;
  /** The routine results (an indirect study). */
  routine?: DemoRoutineData;
  /** An indirect study's estimate: the cleaning steps, partition and seed the scientist chose. */
  indirect?: IndirectEstimateInput;
  fileName: string;
  stage: DemoStage;
  /** The partition tests the scientist ran, and the plan chosen from them (none: one partition of everyone). */
  assessment?: { by: "sex" } | { by: "age"; bands: [number, number][] };
  plan?: { sex: boolean; ageBands: [number, number][] | null };
  /**
   * `age_curve`: LMS curves in exact age (fitted once, both sexes, seed 1); `indirect`: routine
   * results cleaned and estimated once as `indirect` says; direct otherwise.
   */
  kind?: "direct" | "age_curve" | "indirect";
  /** The method chosen for each partition of the version ("lms" for curves, "indirect" for an indirect estimate). */
  chosenMethod: "nonparametric" | "parametric" | "robust" | "lms" | "indirect";
  /** A manual exclusion made while screening: the donors (running numbers) and why. */
  manualExclusion?: { donors: number[]; reason: string };
  /** Why the outliers the screen proposed were confirmed. */
  outlierReason?: string;
  /** For an in-force version: when it took effect. */
  effectiveFrom?: string;
  note?: string;
}

const ADULT_CRITERIA =
  "Volunteers from the Harrowmere staff and blood-donor panel, 18-80 years, who declared themselves well, " +
  "took no regular medication, were not pregnant, and had no illness in the preceding four weeks. Fasting morning samples.";

const ESTABLISHED = "Harrowmere reference interval study 2024";

/**
 * Every demo study, oldest first. The in-force ones were established in 2024; the others are this
 * year's work. The seeds of the nonparametric in-force cohorts are ones whose values have no tie
 * on the ranks of the limits: lib/scoring scores a tied value at its mid-rank, which would put
 * such a limit a little off percentile 2.5 or 97.5 (at 2.70 for a tie of two at ranks 6 and 7 of
 * 240), and the demo's versions in force are to show limits exactly at 2.5 and 97.5.
 */
export const DEMO_STUDIES: readonly DemoStudy[] = [
  // Established in 2024 and in force since 2025.
  {
    analyte: "NA", title: `Sodium: ${ESTABLISHED}`, method: "Indirect ISE, Corvel AX-400", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.sodium("HRW-NA24", 2601, 240), fileName: "sodium-2024.csv", stage: "in_force",
    chosenMethod: "nonparametric", effectiveFrom: "2025-01-06",
  },
  {
    analyte: "K", title: `Potassium: ${ESTABLISHED}`, method: "Indirect ISE, Corvel AX-400", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.potassium("HRW-K24", 2502, 240), fileName: "potassium-2024.csv", stage: "in_force",
    chosenMethod: "nonparametric", effectiveFrom: "2025-01-06",
  },
  {
    analyte: "CA", title: `Calcium: ${ESTABLISHED}`, method: "Arsenazo III, Corvel AX-400", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.calcium("HRW-CA24", 2403, 240), fileName: "calcium-2024.csv", stage: "in_force",
    chosenMethod: "parametric", effectiveFrom: "2025-01-06",
  },
  {
    analyte: "GLU", title: `Glucose: ${ESTABLISHED}`, method: "Hexokinase, Corvel AX-400", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.glucose("HRW-GLU24", 3404, 240), fileName: "glucose-2024.csv", stage: "in_force",
    chosenMethod: "nonparametric", effectiveFrom: "2025-01-06",
  },
  {
    analyte: "UREA", title: `Urea: ${ESTABLISHED}`, method: "Urease/GLDH, Corvel AX-400", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.urea("HRW-UR24", 2405, 220), fileName: "urea-2024.csv", stage: "in_force",
    chosenMethod: "nonparametric", effectiveFrom: "2025-01-06",
  },
  {
    analyte: "ALT", title: `ALT: ${ESTABLISHED}`, method: "IFCC without pyridoxal phosphate, Corvel AX-400", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.alt("HRW-ALT24", 2406, 240), fileName: "alt-2024.csv", stage: "in_force",
    chosenMethod: "parametric", effectiveFrom: "2025-01-06",
  },
  {
    analyte: "TSH", title: `TSH: ${ESTABLISHED}`, method: "Sandwich chemiluminescence, Lumora i20", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.tsh("HRW-TSH24", 2507, 240), fileName: "tsh-2024.csv", stage: "in_force",
    chosenMethod: "nonparametric", effectiveFrom: "2025-02-03",
  },
  {
    analyte: "CREA", title: `Creatinine: ${ESTABLISHED}`, method: "Enzymatic, Corvel AX-400", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.creatinine("HRW-CR24", 2508, 300), fileName: "creatinine-2024.csv", stage: "in_force",
    assessment: { by: "sex" }, plan: { sex: true, ageBands: null }, chosenMethod: "nonparametric", effectiveFrom: "2025-01-06",
  },
  {
    analyte: "HGB", title: `Haemoglobin: ${ESTABLISHED}`, method: "SLS-haemoglobin, Hemavue 5", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.haemoglobin("HRW-HB24", 2409, 300), fileName: "haemoglobin-2024.csv", stage: "in_force",
    assessment: { by: "sex" }, plan: { sex: true, ageBands: null }, chosenMethod: "parametric", effectiveFrom: "2025-01-06",
  },
  // This year's work, one study at each stage.
  {
    analyte: "ALP", title: "Alkaline phosphatase: children and adults 2025-26", method: "IFCC (AMP buffer), Corvel AX-400",
    criteria:
      "Children 2-17 years seen for minor elective surgery at the Harrowmere children's unit (with parental consent), and adult " +
      "volunteers from the staff panel; none with known bone or liver disease, fractures in the past year, or medication affecting either.",
    cohort: DEMO_COHORTS.alkalinePhosphatase("HRW-ALP25", 2510, 160, 150), fileName: "alp-children-adults.csv",
    stage: "awaiting_signoff", assessment: { by: "age", bands: [[0, 18], [18, 120]] }, plan: { sex: false, ageBands: [[0, 18], [18, 120]] },
    chosenMethod: "nonparametric", note: "First paediatric interval for ALP: children and adults partitioned at 18 years.",
  },
  {
    analyte: "ALPC", title: "Alkaline phosphatase: paediatric age curves 2025", kind: "age_curve", method: "IFCC (AMP buffer), Corvel AX-400",
    criteria:
      "Children from birth to 18 years seen at the Harrowmere children's unit for minor elective surgery or well-child checks (with " +
      "parental consent); none with known bone, liver or kidney disease, a fracture in the past year, or medication affecting bone. " +
      "Birth date and collection date recorded for each.",
    cohort: DEMO_COHORTS.alkalinePhosphatasePaediatric("HRW-ALPC25", 2616, 1200), fileName: "alp-paediatric-2025.csv",
    stage: "in_force", chosenMethod: "lms", effectiveFrom: "2026-02-02",
    note: "Continuous LMS age curves from birth to 18 years: the limits follow the child's exact age, with no steps at birthdays.",
  },
  {
    analyte: "NA", title: "Sodium: verification after the AX-400 electrode change", method: "Indirect ISE, Corvel AX-400 (new electrode lot)",
    criteria: ADULT_CRITERIA, cohort: DEMO_COHORTS.sodium("HRW-NA26", 2611, 200), fileName: "sodium-2026.csv",
    stage: "draft", chosenMethod: "nonparametric", outlierReason: "Screen proposal confirmed on review of the run log.",
    note: "Re-established after the electrode change; limits within 1 mmol/L of version 1.",
  },
  {
    analyte: "ALT", title: "ALT: 2026 re-establishment with pyridoxal phosphate", method: "IFCC with pyridoxal phosphate, Corvel AX-400",
    criteria: ADULT_CRITERIA, cohort: DEMO_COHORTS.alt("HRW-ALT26", 2612, 240), fileName: "alt-2026.csv",
    stage: "estimated", chosenMethod: "parametric",
  },
  {
    analyte: "HGB", title: "Haemoglobin: Hemavue 7 introduction", method: "SLS-haemoglobin, Hemavue 7", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.haemoglobin("HRW-HB26", 2613, 300), fileName: "haemoglobin-2026.csv", stage: "partitioned",
    assessment: { by: "sex" }, plan: { sex: true, ageBands: null }, chosenMethod: "parametric",
  },
  {
    analyte: "K", title: "Potassium: 2026 study with the new tube supplier", method: "Indirect ISE, Corvel AX-400", criteria: ADULT_CRITERIA,
    // Four gross errors: three visibly haemolysed samples and one with EDTA carried over from the wrong tube.
    cohort: DEMO_COHORTS.potassium("HRW-K26", 2614, 240, [
      { donor: 17, value: 6.9 },
      { donor: 88, value: 7.4 },
      { donor: 152, value: 8.1 },
      { donor: 203, value: 9.6 },
    ]),
    fileName: "potassium-2026.csv", stage: "screened", chosenMethod: "nonparametric",
    outlierReason: "Haemolysed or EDTA-contaminated on the sample log: not a healthy-donor value.",
    manualExclusion: { donors: [41, 42], reason: "Donors disclosed a potassium supplement after sampling (recruitment criterion)." },
  },
  {
    analyte: "TSH", title: "TSH: indirect interval from routine results 2025-26", kind: "indirect", method: "Electrochemiluminescence, Corvel IM-200",
    criteria:
      "Every TSH requested of the laboratory from January 2025 to June 2026, exported from the laboratory system with pseudonymous " +
      "patient keys. Cleaning: results after the reagent reformulation of March 2025 only, outpatients only, no interference flags, " +
      "each patient's first result.",
    routine: DEMO_TSH_ROUTINE, fileName: "tsh-routine-2025-26.csv", stage: "draft", chosenMethod: "indirect",
    indirect: {
      method: "indirect",
      cleaning: { period: { from: "2025-03-03", to: "2026-06-30" }, excludeSettings: ["inpatient", "emergency"], excludeFlags: "any", onePerPatient: "first" },
      seed: 1,
    },
    note: "First TSH interval of our own: estimated indirectly from outpatients' routine results; compare with the manufacturer's before sign-off.",
  },
  {
    analyte: "UREA", title: "Urea: second analyser (AX-400 #2) comparison", method: "Urease/GLDH, Corvel AX-400 #2", criteria: ADULT_CRITERIA,
    cohort: DEMO_COHORTS.urea("HRW-UR26", 2615, 200), fileName: "urea-analyser-2.csv", stage: "uploaded", chosenMethod: "nonparametric",
  },
];
