/**
 * What the study pages pass from the server to their components: plain, serialisable objects,
 * dates already formatted. Section components (components/studies/sections/*) receive
 * `{ study, analyte }` of these types.
 */
export interface StudyAnalyte {
  code: string;
  name: string;
  unit: string;
  decimals: number;
  specimen: string;
}

export interface StudyView {
  id: string;
  title: string;
  status: "open" | "closed";
  /** `direct`: limits per partition; `age_curve`: LMS centile curves in exact age; `indirect`: limits from routine results. */
  kind: "direct" | "age_curve" | "indirect";
  method: string | null;
  specimen: string | null;
  criteria: string | null;
  collectedFrom: string | null;
  collectedTo: string | null;
  /** ISO dates (2026-03-02). */
  openedOn: string;
  closedOn: string | null;
  closedBy: string | null;
  partitionPlan: { sex: boolean; ageBands: [number, number][] | null } | null;
  counts: { donorResults: number; uploads: number; pendingUploads: number; exclusions: number };
}

/** The props every section of the study page receives. */
export interface StudySectionProps {
  study: StudyView;
  analyte: StudyAnalyte;
}

/** One row of the studies table. */
export interface StudyRow {
  id: string;
  analyte: string;
  analyteName: string;
  title: string;
  kind: "direct" | "age_curve" | "indirect";
  status: "open" | "closed";
  donorResults: number;
  uploads: number;
  openedOn: string;
}

/** A study's kind in words. */
export const STUDY_KIND_WORDS: Record<StudyView["kind"], string> = {
  direct: "Limits per partition",
  age_curve: "Age curves (LMS)",
  indirect: "Indirect (routine results)",
};

/** A study's status in words. */
export const STUDY_STATUS_WORDS: Record<StudyView["status"], string> = {
  open: "Open: taking data",
  closed: "Closed: no more changes",
};
