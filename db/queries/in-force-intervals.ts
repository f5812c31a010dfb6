import "server-only";
import { sql } from "drizzle-orm";
import type { Database } from "../client";
import { analytes, intervalPartitions, intervalVersions } from "../schema";

export interface InForceAnalyteRow {
  id: string;
  code: string;
  name: string;
  loinc: string | null;
  unit: string;
  decimals: number;
  molarMass: number | null;
}

export interface InForceVersionRow {
  id: string;
  analyteId: string;
  number: number;
  unit: string;
  decimals: number;
  criticalLow: number | null;
  criticalHigh: number | null;
  effectiveFrom: Date | null;
  reviewBy: Date | null;
}

export interface InForcePartitionRow {
  id: string;
  versionId: string;
  position: number;
  sex: string | null;
  ageFromDays: number | null;
  ageToDays: number | null;
  low: number | null;
  high: number | null;
  lowCiLower: number | null;
  lowCiUpper: number | null;
  highCiLower: number | null;
  highCiUpper: number | null;
  method: string;
  n: number;
  model: unknown;
}

export interface InForceSnapshot {
  analytes: InForceAnalyteRow[];
  versions: InForceVersionRow[];
  partitions: InForcePartitionRow[];
}

/**
 * What scoring needs of the catalogue, read in one snapshot: every analyte (or the one named by
 * `analyteId`), its version in force if any, and that version's partitions with their stored
 * scoring models. One statement (its three parts as JSON), so an analyte and its version are seen
 * as one committed state in a single round trip: under load, when every round trip waits for a
 * turn of a busy event loop, the five of a read-only transaction (BEGIN, three queries, COMMIT)
 * made a notified change reach scoring seconds late (`npm run bench:resilience`, two instances).
 * The model cache (lib/scores/model-cache.ts) calls it on first use, on every (re)connection of
 * the listener and for an analyte whose change was notified.
 */
export async function loadInForceSnapshot(database: Database, { analyteId }: { analyteId?: string } = {}): Promise<InForceSnapshot> {
  const onlyAnalyte = analyteId ? sql`AND a.id = ${analyteId}` : sql``;
  const result = await database.execute<{ analytes: RawAnalyte[]; versions: RawVersion[]; partitions: RawPartition[] }>(sql`
    WITH a AS (
      SELECT a.id, a.code, a.name, a.loinc, a.unit, a.decimals, a.molar_mass FROM ${analytes} a WHERE true ${onlyAnalyte}
    ), v AS (
      SELECT v.id, v.analyte_id, v.number, v.unit, v.decimals, v.critical_low, v.critical_high, v.effective_from, v.review_by
        FROM ${intervalVersions} v JOIN a ON a.id = v.analyte_id WHERE v.state = 'in_force'
    )
    SELECT
      (SELECT coalesce(json_agg(json_build_object('id', a.id, 'code', a.code, 'name', a.name, 'loinc', a.loinc, 'unit', a.unit,
              'decimals', a.decimals, 'molarMass', a.molar_mass)), '[]') FROM a) AS analytes,
      (SELECT coalesce(json_agg(json_build_object('id', v.id, 'analyteId', v.analyte_id, 'number', v.number, 'unit', v.unit,
              'decimals', v.decimals, 'criticalLow', v.critical_low, 'criticalHigh', v.critical_high,
              'effectiveFrom', v.effective_from, 'reviewBy', v.review_by)), '[]') FROM v) AS versions,
      (SELECT coalesce(json_agg(json_build_object('id', p.id, 'versionId', p.version_id, 'position', p.position, 'sex', p.sex,
              'ageFromDays', p.age_from_days, 'ageToDays', p.age_to_days, 'low', p.low, 'high', p.high,
              'lowCiLower', p.low_ci_lower, 'lowCiUpper', p.low_ci_upper, 'highCiLower', p.high_ci_lower,
              'highCiUpper', p.high_ci_upper, 'method', p.method, 'n', p.n, 'model', p.model) ORDER BY p.version_id, p.position), '[]')
         FROM ${intervalPartitions} p JOIN v ON v.id = p.version_id) AS partitions`);
  const row = result.rows[0];
  const date = (value: string | null) => (value === null ? null : new Date(value));
  return {
    analytes: row.analytes,
    versions: row.versions.map((v) => ({ ...v, effectiveFrom: date(v.effectiveFrom), reviewBy: date(v.reviewBy) })),
    partitions: row.partitions,
  };
}

type RawAnalyte = InForceAnalyteRow;
/** A version as JSON gives it: times as ISO strings. */
type RawVersion = Omit<InForceVersionRow, "effectiveFrom" | "reviewBy"> & { effectiveFrom: string | null; reviewBy: string | null };
type RawPartition = InForcePartitionRow;
