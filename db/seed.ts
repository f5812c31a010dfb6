/**
 * The demo: an invented regional hospital laboratory with one user per role. Every name here is
 * made up for Bellwether's demo; the passwords are listed in the README.
 */
import { createAnalyteBody } from "@/lib/analytes/input";
import { describeLisKey, generateLisKey } from "@/lib/lis/keys";
import type { Database } from "./client";
import { createAnalyte, listAnalytes } from "./queries/analytes";
import { recordAuditEvent, SYSTEM_ACTOR } from "./queries/audit";
import { ensureDemoLisConnection, findLisConnectionByName } from "./queries/lis-connections";
import { countUsers, createUser, findUserByEmail } from "./queries/users";
import { DEMO_LABORATORY, DEMO_USERS } from "./demo-accounts";
import { seedDemoStudies, type DemoActors } from "./demo-seed-studies";
import { laboratory } from "./schema";

export { DEMO_LABORATORY, DEMO_USERS };

/**
 * The demo laboratory's catalogue: common chemistry in the SI units a European laboratory reports,
 * with their LOINC codes (METHODS.md §11 and the LOINC table) and molar masses where mass ↔
 * substance conversion is common. The critical limits are this invented laboratory's own policy.
 */
export const DEMO_ANALYTES: Record<string, unknown>[] = [
  {
    code: "GLU", name: "Glucose", unit: "mmol/L", decimals: 1, loinc: "14749-6", specimen: "plasma",
    criticalLow: 2.5, criticalHigh: 25, molarMass: 180.156,
    molarMassSource: "C6H12O6; Young DS, Ann Intern Med 1987;106:114-129 (factor 0.05551 mmol/L per mg/dL)",
  },
  { code: "NA", name: "Sodium", unit: "mmol/L", decimals: 0, loinc: "2951-2", specimen: "serum", criticalLow: 120, criticalHigh: 160 },
  { code: "K", name: "Potassium", unit: "mmol/L", decimals: 1, loinc: "2823-3", specimen: "serum", criticalLow: 2.8, criticalHigh: 6.2 },
  {
    code: "CREA", name: "Creatinine", unit: "umol/L", decimals: 0, loinc: "14682-9", specimen: "serum", molarMass: 113.12,
    molarMassSource: "C4H7N3O; Young DS, Ann Intern Med 1987;106:114-129 (factor 88.4 umol/L per mg/dL)",
  },
  {
    code: "UREA", name: "Urea", unit: "mmol/L", decimals: 1, loinc: "22664-7", specimen: "serum", molarMass: 60.056,
    molarMassSource: "CH4N2O; Young DS, Ann Intern Med 1987;106:114-129 (factor 0.1665 mmol/L per mg/dL)",
  },
  {
    code: "CA", name: "Calcium", unit: "mmol/L", decimals: 2, loinc: "2000-8", specimen: "serum", criticalLow: 1.6, criticalHigh: 3.5,
    molarMass: 40.078, molarMassSource: "Ca; Young DS, Ann Intern Med 1987;106:114-129 (factor 0.2495 mmol/L per mg/dL)",
  },
  { code: "ALT", name: "Alanine aminotransferase", unit: "U/L", decimals: 0, loinc: "1742-6", specimen: "serum" },
  { code: "ALP", name: "Alkaline phosphatase", unit: "U/L", decimals: 0, loinc: "6768-6", specimen: "serum" },
  // Children's ALP, scored on continuous age curves (an age-curve study); no LOINC code of its own.
  { code: "ALPC", name: "Alkaline phosphatase, children (age curves)", unit: "U/L", decimals: 0, specimen: "serum" },
  { code: "TSH", name: "Thyrotropin (TSH)", unit: "m[IU]/L", decimals: 2, loinc: "3016-3", specimen: "serum", reviewMonths: 36 },
  { code: "HGB", name: "Haemoglobin", unit: "g/L", decimals: 0, loinc: "718-7", specimen: "whole blood", criticalLow: 70, criticalHigh: 200 },
];

/** The demo's LIS connection: the laboratory information system of the invented hospital. */
export const DEMO_LIS_CONNECTION = { name: "Harrowmere LIS (demo)", contactEmail: "lis-team@harrowmere.example" } as const;

export interface SeedDemoOptions {
  /**
   * The demo LIS connection's key (BELLWETHER_DEMO_LIS_KEY; otherwise one is generated and printed
   * once, when the connection is made) and rate limit (BELLWETHER_DEMO_LIS_RATE_PER_MINUTE).
   */
  lis?: { key?: string; ratePerMinute?: number };
  /** Where the generated key is printed (the start command's output). */
  say?: (line: string) => void;
}

/**
 * Seeds the demo: into a database without users, the laboratory, its accounts, catalogue and
 * studies; into a database that already holds the demo's accounts, whatever part of the catalogue
 * and studies is missing (so an older demo gains the studies, and a seed stopped half-way
 * finishes). A database with other users is not the demo's and is left alone. Running it again
 * changes nothing. Returns whether it added anything.
 */
export async function seedDemo(database: Database, options: SeedDemoOptions = {}): Promise<boolean> {
  let added = false;
  if ((await countUsers(database)) === 0) {
    await database.insert(laboratory).values({ id: 1, name: DEMO_LABORATORY }).onConflictDoNothing();
    for (const u of DEMO_USERS) {
      await createUser(database, { input: u, actor: SYSTEM_ACTOR, allowPublishedPassword: true });
    }
    added = true;
  }
  const people = await demoActors(database);
  if (!people) return false;
  const existing = new Set((await listAnalytes(database)).map((a) => a.code));
  for (const a of DEMO_ANALYTES) {
    if (existing.has(String(a.code))) continue;
    // Through the API's own schema, so the demo's codes and units pass the checks a person's would.
    await createAnalyte(database, { input: createAnalyteBody.parse(a), actor: SYSTEM_ACTOR });
    added = true;
  }
  if (await seedDemoStudies(database, people)) added = true;
  if (await seedDemoLisConnection(database, options)) added = true;
  if (added) {
    await recordAuditEvent(database, {
      actor: SYSTEM_ACTOR,
      action: "demo.seeded",
      entityType: "laboratory",
      entityId: "1",
      summary: `Seeded the demo laboratory "${DEMO_LABORATORY}"`,
    });
  }
  return added;
}

/** The demo's scientist and director, or null when this database does not hold the demo's accounts. */
async function demoActors(database: Database): Promise<DemoActors | null> {
  const actorFor = async (role: "scientist" | "director") => {
    const account = DEMO_USERS.find((u) => u.role === role)!;
    const user = await findUserByEmail(database, { email: account.email });
    return user ? { id: user.id, label: user.email } : null;
  };
  const scientist = await actorFor("scientist");
  const director = await actorFor("director");
  return scientist && director ? { scientist, director } : null;
}

/**
 * The demo's LIS connection, made to match the given key and rate: created when missing (with a
 * generated key printed once when none is given), its key or rate replaced when they differ.
 */
async function seedDemoLisConnection(database: Database, { lis = {}, say = console.log }: SeedDemoOptions): Promise<boolean> {
  const exists = (await findLisConnectionByName(database, { name: DEMO_LIS_CONNECTION.name })) !== undefined;
  const issued = lis.key ? describeLisKey(lis.key) : exists ? null : generateLisKey();
  const outcome = await ensureDemoLisConnection(database, { ...DEMO_LIS_CONNECTION, issued, ratePerMinute: lis.ratePerMinute, actor: SYSTEM_ACTOR });
  if (outcome === "created" && !lis.key && issued) {
    say(`bellwether: the demo LIS connection's key (shown this once; set BELLWETHER_DEMO_LIS_KEY to choose it): ${issued.key}`);
  }
  return outcome !== "unchanged";
}
