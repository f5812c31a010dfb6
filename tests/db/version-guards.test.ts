import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { appUrl, ownerUrl, pgError } from "../support/scratch-database";

// The triggers of drizzle/0009_version-immutability.sql, checked in SQL as the app's role (as the
// app connects) and, where the grants would already refuse, as the owner. Expected messages and
// SQLSTATEs are PostgreSQL's (55000 object_not_in_prerequisite_state, 42501 insufficient_privilege).
const { pool } = testDatabase();
afterAll(() => pool.end());

/** The demo's potassium version 1, in force and signed by the demo seed. */
let inForce: { id: string; number: number; analyte_id: string };
let partitionId: string;
let signatureId: string;

beforeAll(async () => {
  [inForce] = (
    await pool.query("SELECT v.id, v.number, v.analyte_id FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = 'K' AND v.state = 'in_force'")
  ).rows;
  [{ id: partitionId }] = (await pool.query("SELECT id FROM interval_partitions WHERE version_id = $1", [inForce.id])).rows;
  [{ id: signatureId }] = (await pool.query("SELECT id FROM signatures WHERE version_id = $1", [inForce.id])).rows;
});

/** Runs the statements in a transaction that is always rolled back; returns the first error. */
async function inRolledBack(...statements: string[]): Promise<{ code: string; message: string } | null> {
  const client = await pool.connect();
  try {
    await client.query("BEGIN");
    for (const s of statements) await client.query(s);
    return null;
  } catch (err) {
    const e = err as { code?: string; message: string };
    return { code: e.code ?? "", message: e.message };
  } finally {
    await client.query("ROLLBACK");
    client.release();
  }
}

describe("a signed version cannot be changed in SQL", () => {
  it("refuses an UPDATE of a version in force as the app's role", async () => {
    expect(await pgError(appUrl(), `UPDATE interval_versions SET critical_high = 99 WHERE id = '${inForce.id}'`)).toEqual({
      code: "55000",
      message: `interval version ${inForce.id} (number ${inForce.number}) is in_force: moving it to in_force may change only review_by, effective_to`,
    });
  });

  it("refuses a move with a column it does not own, and moves the design does not have", async () => {
    expect(await pgError(appUrl(), `UPDATE interval_versions SET state = 'superseded', note = 'x' WHERE id = '${inForce.id}'`)).toEqual({
      code: "55000",
      message: `interval version ${inForce.id} (number ${inForce.number}) is in_force: moving it to superseded may change only state, effective_to`,
    });
    expect(await pgError(appUrl(), `UPDATE interval_versions SET state = 'draft' WHERE id = '${inForce.id}'`)).toEqual({
      code: "55000",
      message: `interval version ${inForce.id} (number ${inForce.number}) is in_force: it cannot be changed to draft`,
    });
  });

  it("allows the design's moves with their own columns (rolled back here)", async () => {
    expect(await inRolledBack(`UPDATE interval_versions SET review_by = now() + interval '1 year' WHERE id = '${inForce.id}'`)).toBeNull();
    expect(await inRolledBack(`UPDATE interval_versions SET state = 'superseded', effective_to = now() WHERE id = '${inForce.id}'`)).toBeNull();
    expect(
      await inRolledBack(
        `UPDATE interval_versions SET state = 'withdrawn', effective_to = now(), withdrawn_at = now(), withdrawn_reason = 'test' WHERE id = '${inForce.id}'`,
      ),
    ).toBeNull();
  });

  it("refuses deleting it, inserting a version already in force, and touching its partitions", async () => {
    expect(await pgError(appUrl(), `DELETE FROM interval_versions WHERE id = '${inForce.id}'`)).toEqual({
      code: "55000",
      message: `interval version ${inForce.id} (number ${inForce.number}) is in_force: only a draft can be deleted`,
    });
    expect(
      await pgError(appUrl(), `INSERT INTO interval_versions (analyte_id, number, state, unit, decimals) VALUES ('${inForce.analyte_id}', 999, 'in_force', 'mmol/L', 1)`),
    ).toEqual({ code: "55000", message: "an interval version is created as a draft, not in_force" });
    const changeRefused = { code: "55000", message: `the partitions of interval version ${inForce.id} cannot change: it is in_force` };
    expect(await pgError(appUrl(), `UPDATE interval_partitions SET high = high + 1 WHERE id = '${partitionId}'`)).toEqual(changeRefused);
    expect(await pgError(appUrl(), `DELETE FROM interval_partitions WHERE id = '${partitionId}'`)).toEqual(changeRefused);
    expect(
      await pgError(
        appUrl(),
        `INSERT INTO interval_partitions (version_id, position, low, high, method, n, model) VALUES ('${inForce.id}', 99, 1, 2, 'parametric', 20, '{}')`,
      ),
    ).toEqual(changeRefused);
  });

  it("keeps signatures append-only: no UPDATE or DELETE for the app's role, nor, by trigger, for the owner", async () => {
    expect(await pgError(appUrl(), `UPDATE signatures SET comment = 'x' WHERE id = '${signatureId}'`)).toEqual({
      code: "42501",
      message: "permission denied for table signatures",
    });
    expect(await pgError(appUrl(), `DELETE FROM signatures WHERE id = '${signatureId}'`)).toEqual({ code: "42501", message: "permission denied for table signatures" });
    expect(await pgError(ownerUrl(), `UPDATE signatures SET comment = 'x' WHERE id = '${signatureId}'`)).toEqual({
      code: "42501",
      message: "signatures is append-only: UPDATE is not allowed",
    });
    expect(await pgError(ownerUrl(), `DELETE FROM signatures WHERE id = '${signatureId}'`)).toEqual({
      code: "42501",
      message: "signatures is append-only: DELETE is not allowed",
    });
    expect(await pgError(ownerUrl(), "TRUNCATE signatures CASCADE")).toEqual({ code: "42501", message: "signatures is append-only: TRUNCATE is not allowed" });
  });
});

describe("one version in force per analyte", () => {
  it("makes the second of two transactions that put versions of one analyte in force fail on interval_versions_one_in_force", async () => {
    const code = `VG${Date.now().toString(36).slice(-6).toUpperCase()}`;
    const [{ id: analyteId }] = (
      await pool.query("INSERT INTO analytes (code, name, unit, decimals, specimen) VALUES ($1, 'Guard test', 'mmol/L', 1, 'serum') RETURNING id", [code])
    ).rows;
    const version = async (number: number, state: "awaiting_signoff" | "in_force") => {
      const [{ id }] = (await pool.query("INSERT INTO interval_versions (analyte_id, number, unit, decimals) VALUES ($1, $2, 'mmol/L', 1) RETURNING id", [analyteId, number])).rows;
      await pool.query("UPDATE interval_versions SET state = 'awaiting_signoff' WHERE id = $1", [id]);
      if (state === "in_force") await pool.query("UPDATE interval_versions SET state = 'in_force', effective_from = now() WHERE id = $1", [id]);
      return id as string;
    };
    const v1 = await version(1, "in_force");
    const v2 = await version(2, "awaiting_signoff");
    const v3 = await version(3, "awaiting_signoff");
    const a = await pool.connect();
    const b = await pool.connect();
    try {
      await a.query("BEGIN");
      await b.query("BEGIN");
      // A supersedes version 1 and puts version 2 in force; B, signing version 3 at the same
      // moment, found nothing to supersede in its snapshot and puts version 3 in force.
      await a.query("UPDATE interval_versions SET state = 'superseded', effective_to = now() WHERE id = $1", [v1]);
      await a.query("UPDATE interval_versions SET state = 'in_force', effective_from = now() WHERE id = $1", [v2]);
      const second = b.query("UPDATE interval_versions SET state = 'in_force', effective_from = now() WHERE id = $1", [v3]).then(
        () => null,
        (err: { code: string; constraint: string }) => ({ code: err.code, constraint: err.constraint }),
      );
      await a.query("COMMIT");
      expect(await second).toEqual({ code: "23505", constraint: "interval_versions_one_in_force" });
      await b.query("ROLLBACK");
    } finally {
      a.release();
      b.release();
    }
    const states = (await pool.query("SELECT number, state::text FROM interval_versions WHERE analyte_id = $1 ORDER BY number", [analyteId])).rows;
    expect(states).toEqual([
      { number: 1, state: "superseded" },
      { number: 2, state: "in_force" },
      { number: 3, state: "awaiting_signoff" },
    ]);
  });
});
