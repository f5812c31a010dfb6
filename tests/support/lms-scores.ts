/**
 * An lms interval version for the scoring tests: LMS curves fitted (lib/stats/lms-fit.ts, a
 * fixed seed) to the committed 600-donor paediatric fixture, stored as issue 11's partition
 * contract says (method lms, the LmsModel as it is, low and high null, the age range in days).
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import { fitLms } from "@/lib/stats/lms-fit";
import type { LmsModel } from "@/lib/stats/lms-model";
import type { PartitionSpec } from "./scores";

const FIXTURE = path.resolve(__dirname, "../fixtures/lms/lms-cli-600.csv");

let fitted: { model: LmsModel; n: number } | null = null;

/** The fixture's curves (fitted once per test file; the same to the bit on every run). */
export function fixtureCurves(): { model: LmsModel; n: number } {
  if (fitted) return fitted;
  const rows = readFileSync(FIXTURE, "utf8").trim().split("\n").slice(1);
  const ages = rows.map((r) => Number(r.split(",")[0]));
  const values = rows.map((r) => Number(r.split(",")[1]));
  const fit = fitLms(ages, values, { seed: 20261102 });
  fitted = { model: fit.model, n: fit.n };
  return fitted;
}

/** Curves whose median is `factor` times the given ones' (L and S unchanged). */
export function scaledCurves(model: LmsModel, factor: number): LmsModel {
  return { ...model, logM: model.logM.map((c) => c + Math.log(factor)) };
}

/** The partition row of issue 11's contract for stored curves. */
export function lmsPartition(model: LmsModel, n: number, sex: "F" | "M" | null = null): PartitionSpec {
  return {
    sex,
    ageFromDays: Math.ceil(model.ageMin * 365.25),
    ageToDays: Math.floor(model.ageMax * 365.25) + 1,
    low: null,
    high: null,
    method: "lms",
    n,
    model: model as unknown as Record<string, unknown>,
  };
}
