/**
 * A seeded file of routine results for indirect studies, built so that what each IFCC cleaning
 * step removes is known by construction, with a known non-diseased distribution behind it.
 *
 * Every patient i (0 ≤ i < patients) has one "core" result: collected in 2025, in a
 * low-prevalence setting, and either non-diseased (log-normal, median `median`, SD `sdLog` of
 * ln x) or diseased. The diseased components follow scripts/fixtures/indirect-mixtures.R: on the
 * ln scale, centred 3 SDs below (SD 1·sdLog) and 3.5 SDs above (SD 1.5·sdLog) the non-diseased
 * mean. Which patient is which is fixed by i, not drawn: i % 20 ∈ {0, 1} diseased above (10%),
 * i % 20 = 2 diseased below (5%), the rest non-diseased (85%).
 *
 * Beside the core results, extra rows that one cleaning step each removes (counts below, for a
 * multiple of 120 patients):
 * - i % 10 = 0: a result outside 2025, alternately at 2024-12-31T23:59 and 2026-01-01T00:00
 *   (patients / 10 rows; the period step).
 * - i % 8 = 0: an "inpatient" (or "Inpatient") result earlier on the core's day, from the upper
 *   diseased component (patients / 8; the settings step).
 * - i % 12 = 0: a result flagged "haemolysed", "lipaemic|haemolysed" or "haemolysed; icteric" in
 *   turn, earlier on the core's day (patients / 12; the flags step with ["haemolysed"]).
 * - i % 5 = 0: a repeat result later on the core's day, written *before* the core row in the
 *   file, from the upper diseased component (patients / 5; one result per patient, "first").
 * Core results: collected at 12:00 on day i % 360 of 2025, settings "outpatient", "general
 * practice" or none in turn; i % 7 = 0 carries the flag "icteric" (kept unless every flagged
 * result is excluded). Patient 1's core result is at 2025-01-01T00:00:00 and patient 3's at
 * 2025-12-31T23:59:59 (the period's inclusive ends; neither has extra rows).
 */
import { createRandom } from "@/lib/stats/random";

export interface RoutineRow {
  patientKey: string;
  sex: "F" | "M";
  ageYears: number;
  /** As written in the file: "2025-03-04T12:00:00". */
  collectedAt: string;
  /** Written with two decimals. */
  value: string;
  setting: string;
  /** As written in the file's flags cell. */
  flags: string;
  kind: "core" | "period" | "setting" | "flag" | "repeat";
}

export interface RoutineSpec {
  patients: number;
  seed: number;
  median: number;
  sdLog: number;
}

export const ROUTINE_HEADER = "patient_key,sex,age_years,birth_date,collected_at,value,unit,setting,flags";

const FLAGGED = ["haemolysed", "lipaemic|haemolysed", "haemolysed; icteric"];
const CORE_SETTINGS = ["outpatient", "general practice", ""];

function dayOf2025(day: number): string {
  return new Date(Date.UTC(2025, 0, 1 + day)).toISOString().slice(0, 10);
}

export function routineRows({ patients, seed, median, sdLog }: RoutineSpec): RoutineRow[] {
  const random = createRandom(seed);
  const gauss = () => {
    const u1 = 1 - random.nextFloat();
    const u2 = random.nextFloat();
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  };
  const mu = Math.log(median);
  const healthy = () => Math.exp(mu + sdLog * gauss());
  const high = () => Math.exp(mu + 3.5 * sdLog + 1.5 * sdLog * gauss());
  const low = () => Math.exp(mu - 3 * sdLog + sdLog * gauss());
  const rows: RoutineRow[] = [];
  for (let i = 0; i < patients; i++) {
    const patientKey = `P${String(i + 1).padStart(6, "0")}`;
    const sex = i % 2 === 0 ? "F" : "M";
    const ageYears = 18 + random.nextInt(62);
    const day = dayOf2025(i % 360);
    const row = (kind: RoutineRow["kind"], collectedAt: string, value: number, setting: string, flags = ""): RoutineRow => ({
      patientKey, sex, ageYears, collectedAt, value: value.toFixed(2), setting, flags, kind,
    });
    const group = i % 20;
    const coreValue = group < 2 ? high() : group === 2 ? low() : healthy();
    const coreAt = i === 1 ? "2025-01-01T00:00:00" : i === 3 ? "2025-12-31T23:59:59" : `${day}T12:00:00`;
    const core = row("core", coreAt, coreValue, CORE_SETTINGS[i % 3], i % 7 === 0 ? "icteric" : "");
    if (i % 10 === 0) rows.push(row("period", (i / 10) % 2 === 0 ? "2024-12-31T23:59:00" : "2026-01-01T00:00:00", healthy(), "outpatient"));
    if (i % 8 === 0) rows.push(row("setting", `${day}T07:30:00`, high(), (i / 8) % 2 === 0 ? "inpatient" : "Inpatient"));
    if (i % 12 === 0) rows.push(row("flag", `${day}T08:00:00`, high(), "outpatient", FLAGGED[(i / 12) % 3]));
    if (i % 5 === 0) rows.push(row("repeat", `${day}T16:00:00`, high(), "outpatient"));
    rows.push(core);
  }
  return rows;
}

export function routineCsv(rows: readonly RoutineRow[], unit = ""): string {
  const quote = (s: string) => (/[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  const lines = rows.map((r) => [r.patientKey, r.sex, r.ageYears, "", r.collectedAt, r.value, unit, quote(r.setting), quote(r.flags)].join(","));
  return `${ROUTINE_HEADER}\n${lines.join("\n")}\n`;
}
