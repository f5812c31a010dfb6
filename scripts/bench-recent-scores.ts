/**
 * Times the review page's recent-score figures (GET …/comparison `recentScores`) over a large
 * score log: 1,000,000 logged scores of one analyte in the last 90 days (and 100,000 older ones
 * outside the window), once with values at the analyte's decimals (as most laboratory values
 * are) and once at full precision (every value distinct: the worst case, as after a unit
 * conversion). Prints figures, asserts nothing. Against a running, seeded demo database, as the
 * app's role:
 *   DATABASE_URL=postgres://… [BELLWETHER_MIGRATION_URL=postgres://owner…] \
 *     node --conditions react-server --import tsx scripts/bench-recent-scores.ts [--rows 1000000]
 * With the owner's URL it runs ANALYZE after writing, as autovacuum would soon after.
 * It logs against the demo's sodium (NA: version 1 in force, version 2 a draft) and deletes what
 * it wrote at the end.
 */
import { randomUUID } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { findIntervalVersion, listIntervalVersions } from "../db/queries/interval-versions";
import { loggedScoreGroups } from "../db/queries/recent-scores";
import { recentScoresOf } from "../db/queries/version-comparison";
import * as schema from "../db/schema";

const ROWS = Number(process.argv[process.argv.indexOf("--rows") + 1] || 1_000_000) || 1_000_000;
const RUNS = 5;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function main() {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error("Set DATABASE_URL to a seeded demo database (the app's role).");
  const pool = new Pool({ connectionString: url, max: 2 });
  const database = drizzle(pool, { schema });
  const marker = randomUUID();
  const owner = process.env.BELLWETHER_MIGRATION_URL ? new Pool({ connectionString: process.env.BELLWETHER_MIGRATION_URL, max: 1 }) : null;
  if (!owner) console.log("BELLWETHER_MIGRATION_URL is not set: the statistics of score_log are left to autovacuum, and the first plans may be poor.");
  try {
    const [analyte] = await database.select().from(schema.analytes).where(eq(schema.analytes.code, "NA"));
    if (!analyte) throw new Error("The demo's NA is missing: seed the demo first.");
    const versions = await listIntervalVersions(database, { query: { analyte: "NA" } });
    const inForce = versions.find((v) => v.state === "in_force");
    const draft = versions.find((v) => v.state === "draft" || v.state === "awaiting_signoff");
    if (!inForce || !draft) throw new Error("NA needs a version in force and a draft (the demo has both).");
    const [part] = await database
      .select()
      .from(schema.intervalPartitions)
      .where(and(eq(schema.intervalPartitions.versionId, inForce.id), eq(schema.intervalPartitions.position, inForce.partitions[0].position)));
    const low = part.low ?? 0;
    const high = part.high ?? low + 1;

    for (const precision of ["decimals", "full"] as const) {
      const started = performance.now();
      // Values spread a little beyond the limits, flagged under the version in force; the time
      // spread over 100 days so that about a tenth falls outside the 90-day window.
      const value = precision === "decimals" ? `round(v::numeric, ${analyte.decimals})::float8` : "v";
      await pool.query(
        `INSERT INTO score_log (scored_at, analyte_id, version_id, partition_id, value, flag, caller_kind, caller_id, channel)
         SELECT at, $1::uuid, $2::uuid, $3::uuid, x, CASE WHEN x < $4::float8 THEN 'L' WHEN x > $5::float8 THEN 'H' ELSE 'N' END, 'lis', $6::uuid, 'api'
         FROM (
           SELECT now() - make_interval(secs => (i % 100 + random()) * 86400) AS at, ${value} AS x
           FROM (SELECT i, $4::float8 + ($5::float8 - $4::float8) * (random() * 1.3 - 0.15) AS v FROM generate_series(1, $7::int) i) s
         ) t`,
        [analyte.id, inForce.id, part.id, low, high, marker, Math.round(ROWS / 0.9)],
      );
      // The app's role may not ANALYZE; the owner may (autovacuum would, a little later).
      if (owner) await owner.query("ANALYZE score_log");
      console.log(`${precision === "decimals" ? `values at ${analyte.decimals} decimals` : "values at full precision"}: wrote ${Math.round(ROWS / 0.9).toLocaleString("en")} log rows in ${((performance.now() - started) / 1000).toFixed(1)} s`);

      const version = await findIntervalVersion(database, { id: draft.id });
      const sqlTimes: number[] = [];
      const allTimes: number[] = [];
      let groups = 0;
      let answer: Awaited<ReturnType<typeof recentScoresOf>> | null = null;
      for (let run = 0; run < RUNS; run++) {
        const now = new Date();
        const a = performance.now();
        groups = (await loggedScoreGroups(database, { analyteCode: "NA", since: new Date(now.getTime() - 90 * 86_400_000), until: now })).length;
        sqlTimes.push(performance.now() - a);
        const b = performance.now();
        answer = await database.transaction((tx) => recentScoresOf(tx, { version, at: now }), { isolationLevel: "repeatable read", accessMode: "read only" });
        allTimes.push(performance.now() - b);
      }
      console.log(
        `  ${answer!.total.toLocaleString("en")} scores in the window, ${groups.toLocaleString("en")} groups reach the app; ` +
          `query median ${median(sqlTimes).toFixed(0)} ms, query + re-flagging median ${median(allTimes).toFixed(0)} ms (of ${RUNS} runs; ` +
          `${answer!.changed.toLocaleString("en")} would change flag)`,
      );
      await pool.query("DELETE FROM score_log WHERE caller_id = $1", [marker]);
    }
  } finally {
    await pool.query("DELETE FROM score_log WHERE caller_id = $1", [marker]).catch(() => undefined);
    await pool.end();
    await owner?.end();
  }
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
