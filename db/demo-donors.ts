/**
 * Synthetic healthy-donor results for the demo laboratory: invented donors drawn from the
 * project's seeded generator (lib/stats/random.ts), written out as the upload template's CSV so
 * that the demo goes through the same check and commit as a scientist's file. No real person,
 * laboratory or patient is behind any of it; the shapes only resemble what such studies show.
 */
import { createRandom, type Random } from "@/lib/stats/random";

export type Sex = "F" | "M";

/** What the value of one donor may depend on. */
export interface DemoDonor {
  sex: Sex;
  ageYears: number;
}

/** Draws for one cohort, all from one seeded stream. */
export interface DemoDraws {
  uniform(): number;
  /** A standard normal deviate. */
  normal(): number;
  /** Gaussian with this mean and SD. */
  gaussian(mean: number, sd: number): number;
  /** Lognormal: exp of a Gaussian with mean ln(median) and SD sdLog. */
  lognormal(median: number, sdLog: number): number;
}

/**
 * Standard normal deviates by the Box-Muller transform: two independent uniforms u1 in (0, 1]
 * and u2 in [0, 1) give z = sqrt(−2 ln u1)·cos(2π u2) (and its sine twin, kept for the next
 * call). Demo data only: lib/stats never draws normal values.
 * @see Box GEP, Muller ME. A note on the generation of random normal deviates. Ann Math Stat
 *   1958;29(2):610–611.
 * @example normalDeviates(createRandom(1))() // the same number on every run
 */
export function normalDeviates(random: Random): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const z = spare;
      spare = null;
      return z;
    }
    const radius = Math.sqrt(-2 * Math.log(1 - random.nextFloat()));
    const angle = 2 * Math.PI * random.nextFloat();
    spare = radius * Math.sin(angle);
    return radius * Math.cos(angle);
  };
}

export function demoDraws(seed: number): DemoDraws {
  const random = createRandom(seed);
  const normal = normalDeviates(random);
  return {
    uniform: () => random.nextFloat(),
    normal,
    gaussian: (mean, sd) => mean + sd * normal(),
    lognormal: (median, sdLog) => median * Math.exp(sdLog * normal()),
  };
}

/** One recruited group: how many donors, of which ages, and how their value is drawn. */
export interface CohortGroup {
  donors: number;
  /** Ages in years, uniform over [from, to). */
  ages: [number, number];
  /** The share of women (the rest are men). */
  women: number;
  value: (donor: DemoDonor, draws: DemoDraws) => number;
}

/** A file of donor results as a scientist would upload it. */
export interface DemoCohort {
  /** Donor codes are the prefix and a running number: HRW-K26-0001. */
  codePrefix: string;
  seed: number;
  groups: CohortGroup[];
  /** Decimals the instrument reports. */
  decimals: number;
  /** Collection period, ISO dates; each donor is collected on a day in it. */
  collected: [string, string];
  /** Gross errors in the file: these donors' values (by running number, from 1) are replaced. */
  grossErrors?: { donor: number; value: number }[];
  /**
   * Donors whose age comes as a birth date with the collection date (the exact age then follows),
   * as paediatric clinics record them; the others give age_years.
   */
  birthDates?: boolean;
}

const DAY_MS = 86_400_000;

function isoDay(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

/** A birth date that makes the donor `ageYears` old (to the day, near enough) on `collectedMs`. */
function birthDateFor(ageYears: number, collectedMs: number): string {
  return isoDay(collectedMs - Math.round(ageYears * 365.25) * DAY_MS);
}

/** The cohort as the upload template's CSV: the same seed always gives the same bytes. */
export function cohortCsv(cohort: DemoCohort): string {
  const draws = demoDraws(cohort.seed);
  const from = Date.parse(`${cohort.collected[0]}T00:00:00Z`);
  const days = Math.round((Date.parse(`${cohort.collected[1]}T00:00:00Z`) - from) / DAY_MS) + 1;
  const gross = new Map((cohort.grossErrors ?? []).map((g) => [g.donor, g.value]));
  const lines = ["donor_code,sex,age_years,birth_date,collected_on,value,unit"];
  let number = 0;
  for (const group of cohort.groups) {
    for (let i = 0; i < group.donors; i++) {
      number += 1;
      const sex: Sex = draws.uniform() < group.women ? "F" : "M";
      const ageYears = group.ages[0] + (group.ages[1] - group.ages[0]) * draws.uniform();
      const collectedMs = from + Math.floor(draws.uniform() * days) * DAY_MS;
      const drawn = group.value({ sex, ageYears }, draws);
      const value = (gross.get(number) ?? drawn).toFixed(cohort.decimals);
      const code = `${cohort.codePrefix}-${String(number).padStart(4, "0")}`;
      const age = cohort.birthDates ? "" : ageYears.toFixed(1);
      const birth = cohort.birthDates ? birthDateFor(ageYears, collectedMs) : "";
      lines.push(`${code},${sex},${age},${birth},${isoDay(collectedMs)},${value},`);
    }
  }
  return `${lines.join("\n")}\n`;
}

/** Adults as most chemistry studies recruit them. */
const ADULTS: [number, number] = [18, 80];

/**
 * The demo's cohorts, by shape: near-Gaussian (sodium, calcium, potassium, glucose), right-skewed
 * lognormal (ALT, TSH, urea), different by sex (haemoglobin, creatinine), gross errors
 * (haemolysed potassium samples), and a paediatric analyte that differs by age (alkaline
 * phosphatase, children against adults). The numbers are plausible, invented, and nobody's.
 */
export const DEMO_COHORTS = {
  sodium: (codePrefix: string, seed: number, donors: number): DemoCohort => ({
    codePrefix, seed, decimals: 1, collected: ["2024-03-04", "2024-06-28"],
    groups: [{ donors, ages: ADULTS, women: 0.5, value: (_, d) => d.gaussian(140.4, 1.9) }],
  }),
  potassium: (codePrefix: string, seed: number, donors: number, grossErrors?: DemoCohort["grossErrors"]): DemoCohort => ({
    codePrefix, seed, decimals: 2, collected: ["2024-03-04", "2024-06-28"], grossErrors,
    groups: [{ donors, ages: ADULTS, women: 0.5, value: (_, d) => d.gaussian(4.25, 0.3) }],
  }),
  calcium: (codePrefix: string, seed: number, donors: number): DemoCohort => ({
    codePrefix, seed, decimals: 2, collected: ["2024-03-04", "2024-06-28"],
    groups: [{ donors, ages: ADULTS, women: 0.5, value: (_, d) => d.gaussian(2.36, 0.085) }],
  }),
  glucose: (codePrefix: string, seed: number, donors: number): DemoCohort => ({
    codePrefix, seed, decimals: 1, collected: ["2024-03-04", "2024-06-28"],
    groups: [{ donors, ages: ADULTS, women: 0.5, value: (_, d) => d.lognormal(4.95, 0.085) }],
  }),
  urea: (codePrefix: string, seed: number, donors: number): DemoCohort => ({
    codePrefix, seed, decimals: 1, collected: ["2024-03-04", "2024-06-28"],
    groups: [{ donors, ages: ADULTS, women: 0.5, value: (_, d) => d.lognormal(5.0, 0.24) }],
  }),
  alt: (codePrefix: string, seed: number, donors: number): DemoCohort => ({
    codePrefix, seed, decimals: 0, collected: ["2024-03-04", "2024-06-28"],
    groups: [{ donors, ages: ADULTS, women: 0.5, value: (_, d) => d.lognormal(21, 0.42) }],
  }),
  tsh: (codePrefix: string, seed: number, donors: number): DemoCohort => ({
    codePrefix, seed, decimals: 2, collected: ["2024-03-04", "2024-06-28"],
    groups: [{ donors, ages: ADULTS, women: 0.55, value: (_, d) => d.lognormal(1.7, 0.45) }],
  }),
  creatinine: (codePrefix: string, seed: number, donors: number): DemoCohort => ({
    codePrefix, seed, decimals: 0, collected: ["2024-03-04", "2024-06-28"],
    groups: [{ donors, ages: ADULTS, women: 0.5, value: (p, d) => d.lognormal(p.sex === "M" ? 84 : 65, 0.14) }],
  }),
  haemoglobin: (codePrefix: string, seed: number, donors: number): DemoCohort => ({
    codePrefix, seed, decimals: 0, collected: ["2024-03-04", "2024-06-28"],
    groups: [{ donors, ages: ADULTS, women: 0.5, value: (p, d) => (p.sex === "M" ? d.gaussian(149, 9.5) : d.gaussian(134, 9)) }],
  }),
  alkalinePhosphatase: (codePrefix: string, seed: number, children: number, adults: number): DemoCohort => ({
    codePrefix, seed, decimals: 0, collected: ["2025-09-01", "2026-01-30"], birthDates: true,
    groups: [
      // Bone growth keeps children's activity at about three times adults'.
      { donors: children, ages: [2, 17.9], women: 0.5, value: (_, d) => d.lognormal(215, 0.3) },
      { donors: adults, ages: [18.2, 75], women: 0.5, value: (_, d) => d.lognormal(72, 0.27) },
    ],
  }),
  /**
   * Children from birth to 18 years for an age-curve study, every value drawn from smooth LMS
   * curves (Cole & Green's z → value, METHODS.md §9): the median high in infancy, falling to a
   * childhood plateau, a pubertal rise near 12 years, then falling towards adult activity; the
   * spread widening and the skewness power falling with age. Invented curves, like the donors.
   */
  alkalinePhosphatasePaediatric: (codePrefix: string, seed: number, donors: number): DemoCohort => ({
    codePrefix, seed, decimals: 0, collected: ["2025-04-01", "2025-12-19"], birthDates: true,
    // Infants recruited more densely than older children, as the curves change fastest there.
    groups: [
      { donors: Math.round(donors * 0.22), ages: [0.05, 2], women: 0.5, value: (p, d) => paediatricAlp(p.ageYears, d.normal()) },
      { donors: donors - Math.round(donors * 0.22), ages: [2, 18], women: 0.5, value: (p, d) => paediatricAlp(p.ageYears, d.normal()) },
    ],
  }),
} as const;

/** The demo's paediatric alkaline phosphatase (U/L) at `age` years and normal deviate `z`, by the LMS formula. */
export function paediatricAlp(age: number, z: number): number {
  const L = 0.35 - 0.25 * (age / 18);
  const M = 165 + 150 * Math.exp(-age / 1.3) + 95 * Math.exp(-(((age - 12) / 2.8) ** 2));
  const S = 0.2 + 0.04 * (age / 18);
  return M * (1 + L * S * z) ** (1 / L);
}
