"use client";

import { ChosenEstimatesDraft } from "../analysis/chosen-estimates-draft";
import type { SectionAnalyte, SectionStudy } from "../analysis/types";
import { useLmsFits } from "./age-curves-panel";
import { ageWords, fitSexWords } from "./types";

/**
 * Step 3 of an age-curve study: a draft interval version whose partitions hold the chosen fits'
 * curves (scoring model lms; the limits follow the patient's exact age). One fit of both sexes,
 * or one fit of each sex.
 */
export function AgeCurveDraftPanel({ study, analyte }: { study: SectionStudy; analyte: SectionAnalyte }) {
  const { fits } = useLmsFits(study.id);
  // By default the newest fit of both sexes, else the newest of each sex.
  const both = fits.find((f) => f.options.sex === null);
  const defaults = both
    ? [both.id]
    : (["F", "M"] as const).map((s) => fits.find((f) => f.options.sex === s)?.id).filter((id): id is string => !!id);
  return (
    <ChosenEstimatesDraft
      study={study}
      analyte={analyte}
      method="lms"
      testPrefix="age-curve"
      defaults={defaults}
      items={fits.map((f) => ({
        id: f.id,
        label: `${fitSexWords(f.options.sex)} · n = ${f.n.toLocaleString("en")} · seed ${f.options.seed} · fitted ${f.createdAt.slice(0, 16).replace("T", " ")}`,
      }))}
      words={{
        first: "Fit the curves first (step 2).",
        choose: "Choose the fits the version holds and create the draft.",
        form: "Draft a version from the curves",
        legend: "Fits the version holds",
        hint: "One fit of both sexes, or one fit of each sex: every child must fall under one set of curves. Each partition covers its donors' ages; scoring reads the limits at the patient's exact age.",
        empty: (
          <>
            Fit the curves under <a href="#age-curves" className="underline">Age curves</a>; the draft takes its partitions from the fits.
          </>
        ),
        created: (v) =>
          `${v.partitions.length} partition${v.partitions.length === 1 ? "" : "s"} of LMS curves (${v.partitions
            .map((p) => `${fitSexWords(p.sex).toLowerCase()}, ${ageWords(p.ageFrom ?? 0)} to ${ageWords(p.ageTo ?? 0)}`)
            .join("; ")}).`,
        listed: (v) => v.partitions.map((p) => `${fitSexWords(p.sex)} (${p.method}, n = ${p.n})`).join("; "),
      }}
    />
  );
}
