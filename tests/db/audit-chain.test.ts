import { execFile } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { Client } from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sealAuditChain, verifyAuditChain, verifyAuditChainInTransaction } from "@/db/audit-chain";
import { migrateDatabase } from "@/db/migrate";
import { recordAuditEvent, SYSTEM_ACTOR } from "@/db/queries/audit";
import { chainLinks, type ChainedEvent } from "@/lib/audit/chain";
import { testDatabase } from "../support/database";
import { waitFor } from "../support/scores";
import { appUrl, createScratchDatabase, ownerUrl, pgError, queryRows, SUPERUSER_URL, type ScratchDatabase } from "../support/scratch-database";

const exec = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const TSX = path.join(ROOT, "node_modules/.bin/tsx");

const { database, pool } = testDatabase();
afterAll(() => pool.end());

async function marker(tag: string): Promise<number> {
  const summary = `${tag} ${Date.now()} ${Math.random()}`;
  await recordAuditEvent(database, { actor: SYSTEM_ACTOR, action: "test.chain", entityType: "test", summary });
  const [row] = await queryRows<{ id: string }>(appUrl(), `SELECT id::text FROM audit_events WHERE summary = '${summary}'`);
  return Number(row.id);
}

async function linkOf(id: number): Promise<{ position: number } | null> {
  const rows = await queryRows<{ position: string }>(appUrl(), `SELECT position::text FROM audit_chain WHERE event_id = ${id}`);
  return rows.length ? { position: Number(rows[0].position) } : null;
}

/** The command line through tsx, or with `launcher` through the bundle that `npm run -s bellwether` runs. */
async function verifyCli(url: string, args: string[] = [], { launcher = false } = {}): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const [bin, entry] = launcher ? [process.execPath, "scripts/cli/launch.cjs"] : [TSX, "scripts/bellwether.ts"];
    const { stdout, stderr } = await exec(bin, [entry, "verify-audit", ...args], { cwd: ROOT, env: { ...process.env, DATABASE_URL: url } });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

describe("the audit chain on the served test database", () => {
  it("links every event, the demo seed's included, and verifies intact with every signature", async () => {
    await sealAuditChain(pool);
    const v = await verifyAuditChain(pool);
    expect(v.break).toBeNull();
    expect(v.ok).toBe(true);
    // One snapshot: each event is either linked or still queued (the served app keeps writing).
    expect(v.links).toBe(v.events - v.pending);
    expect(v.signatures).toBeGreaterThan(0);
    expect(v.head?.position).toBe(v.links);
  });

  it("the served app seals committed events by itself (lib/audit/sealer.ts, once a second)", async () => {
    const id = await marker("sealed by the app");
    // A bound on the wait, not a speed check: the machine may be busy.
    await waitFor(async () => (await linkOf(id)) !== null, 20_000, 100);
    expect((await verifyAuditChain(pool)).ok).toBe(true);
  });

  it("an audited transaction left open holds no other audited write, and the chain follows commit order", async () => {
    const slow = new Client({ connectionString: appUrl() });
    await slow.connect();
    try {
      await slow.query("BEGIN");
      const { rows } = await slow.query<{ id: string }>(
        "INSERT INTO audit_events (actor_label, action, entity_type, summary) VALUES ('system', 'test.chain', 'test', 'the long transaction') RETURNING id::text",
      );
      const slowId = Number(rows[0].id);
      // Written and committed while the first transaction still holds its event: were the chain
      // taken at insert time, this would wait for it (and the test would time out).
      const quickId = await marker("committed meanwhile");
      await sealAuditChain(pool);
      expect(quickId).toBeGreaterThan(slowId);
      expect(await linkOf(quickId)).not.toBeNull();
      expect(await linkOf(slowId)).toBeNull();

      await slow.query("COMMIT");
      await sealAuditChain(pool);
      const [slowLink, quickLink] = [await linkOf(slowId), await linkOf(quickId)];
      // Chained in the order they became visible: the earlier id after the later one.
      expect(slowLink!.position).toBeGreaterThan(quickLink!.position);
      expect((await verifyAuditChain(pool)).ok).toBe(true);
    } finally {
      await slow.end();
    }
  });

  it("sealers running at once link each event exactly once", async () => {
    const ids: number[] = [];
    for (let i = 0; i < 30; i++) ids.push(await marker(`concurrent sealers ${i}`));
    await Promise.all([sealAuditChain(pool), sealAuditChain(pool), sealAuditChain(pool)]);
    const rows = await queryRows<{ n: string; positions: string }>(
      appUrl(),
      `SELECT count(*)::text AS n, count(DISTINCT position)::text AS positions FROM audit_chain WHERE event_id = ANY(ARRAY[${ids.join(",")}]::bigint[])`,
    );
    expect(rows[0]).toEqual({ n: "30", positions: "30" });
    expect((await verifyAuditChain(pool)).ok).toBe(true);
  });

  /** Runs `tamper` as the owner and the verification in the same transaction, then rolls both back. */
  async function verifyTampered(tamper: string) {
    const owner = new Client({ connectionString: ownerUrl() });
    await owner.connect();
    try {
      await owner.query("BEGIN");
      await owner.query(tamper);
      return await verifyAuditChainInTransaction(owner);
    } finally {
      await owner.query("ROLLBACK");
      await owner.end();
    }
  }

  async function signedVersion(): Promise<{ versionId: string; signatureId: string; eventId: string }> {
    const [row] = await queryRows<{ versionId: string; signatureId: string; eventId: string }>(
      appUrl(),
      `SELECT s.version_id::text AS "versionId", s.id::text AS "signatureId", e.id::text AS "eventId"
       FROM signatures s JOIN interval_versions v ON v.id = s.version_id
       JOIN audit_events e ON e.action = 'signature.created' AND e.details->>'signatureId' = s.id::text
       WHERE v.state = 'in_force' ORDER BY s.signed_at, s.id LIMIT 1`,
    );
    return row;
  }

  it("a signed version whose limits were changed behind the guards fails at its signature", async () => {
    await sealAuditChain(pool);
    const { versionId, signatureId, eventId } = await signedVersion();
    // Only the first signature of the version may be named: the earliest one that no longer holds.
    const [{ first }] = await queryRows<{ first: string }>(appUrl(), `SELECT id::text AS first FROM signatures WHERE version_id = '${versionId}' ORDER BY signed_at, id LIMIT 1`);
    expect(first).toBe(signatureId);
    const result = await verifyTampered(
      `ALTER TABLE interval_partitions DISABLE TRIGGER interval_partitions_guard;
       UPDATE interval_partitions SET high = high + 1 WHERE version_id = '${versionId}';`,
    );
    expect(result.ok).toBe(false);
    expect(result.break).toEqual({
      position: null,
      eventId,
      reason: expect.stringMatching(new RegExp(`^signature ${signatureId}: interval version ${versionId} no longer holds the content it signed \\(it now hashes to [0-9a-f]{64}\\)$`)),
    });
  });

  it("a signature whose content and hash were both rewritten fails against its audit event", async () => {
    await sealAuditChain(pool);
    const { signatureId, eventId } = await signedVersion();
    const result = await verifyTampered(
      `ALTER TABLE signatures DISABLE TRIGGER signatures_no_update_delete;
       UPDATE signatures SET canonical_content = canonical_content || ' ',
         content_sha256 = encode(sha256(convert_to(canonical_content || ' ', 'UTF8')), 'hex') WHERE id = '${signatureId}';`,
    );
    expect(result.break).toEqual({
      position: null,
      eventId,
      reason: `signature ${signatureId}: its SHA-256 differs from the one audit event ${eventId} recorded when it was made`,
    });
    const onlyContent = await verifyTampered(
      `ALTER TABLE signatures DISABLE TRIGGER signatures_no_update_delete;
       UPDATE signatures SET canonical_content = canonical_content || ' ' WHERE id = '${signatureId}';`,
    );
    expect(onlyContent.break?.reason).toBe(`signature ${signatureId}: its content no longer hashes to its recorded SHA-256`);
  });

  it("the app's role may add links but not change or remove them, and the owner is refused by the triggers", async () => {
    const id = await marker("append-only chain");
    await sealAuditChain(pool);
    const { position } = (await linkOf(id))!;
    expect(await pgError(appUrl(), `UPDATE audit_chain SET hash = repeat('0', 64) WHERE position = ${position}`)).toEqual({ code: "42501", message: "permission denied for table audit_chain" });
    expect(await pgError(appUrl(), `DELETE FROM audit_chain WHERE position = ${position}`)).toEqual({ code: "42501", message: "permission denied for table audit_chain" });
    // The trigger's own message (drizzle/0013_audit-hash-chain.sql).
    expect(await pgError(ownerUrl(), `UPDATE audit_chain SET hash = repeat('0', 64) WHERE position = ${position}`)).toEqual({ code: "42501", message: "audit_chain is append-only: UPDATE is not allowed" });
    expect(await pgError(ownerUrl(), `DELETE FROM audit_chain WHERE position = ${position}`)).toEqual({ code: "42501", message: "audit_chain is append-only: DELETE is not allowed" });
    expect(await pgError(ownerUrl(), "TRUNCATE audit_chain")).toEqual({ code: "42501", message: "audit_chain is append-only: TRUNCATE is not allowed" });
  });
});

// A scratch database of its own: the edits below would break the shared one's chain for good.
describe.skipIf(!SUPERUSER_URL)("a trail from before the chain, and an owner who edits it", () => {
  let s: ScratchDatabase;
  const ids: number[] = [];

  beforeAll(async () => {
    s = await createScratchDatabase("chain");
    // Migrations up to 0012 only, as an installation from before the chain had them.
    const folder = fs.mkdtempSync(path.join(os.tmpdir(), "bellwether-migrations-"));
    fs.mkdirSync(path.join(folder, "meta"));
    const journal = JSON.parse(fs.readFileSync(path.join(ROOT, "drizzle/meta/_journal.json"), "utf8"));
    journal.entries = journal.entries.filter((e: { idx: number }) => e.idx < 13);
    fs.writeFileSync(path.join(folder, "meta/_journal.json"), JSON.stringify(journal));
    for (const e of journal.entries as { tag: string }[]) fs.copyFileSync(path.join(ROOT, "drizzle", `${e.tag}.sql`), path.join(folder, `${e.tag}.sql`));
    const owner = new Client({ connectionString: s.ownerUrl });
    await owner.connect();
    owner.on("notice", () => undefined);
    try {
      await migrate(drizzle(owner), { migrationsFolder: folder });
      for (const summary of ["first event", "second event", "third event"]) {
        const { rows } = await owner.query<{ id: string }>(
          "INSERT INTO audit_events (actor_label, action, entity_type, summary, details) VALUES ('system', 'test.before_chain', 'test', $1, $2) RETURNING id::text",
          [summary, JSON.stringify({ note: summary, n: 1.5 })],
        );
        ids.push(Number(rows[0].id));
      }
    } finally {
      await owner.end();
      fs.rmSync(folder, { recursive: true, force: true });
    }
  });
  afterAll(() => s?.drop());

  it("the migration run chains the events already there, in id order", async () => {
    await migrateDatabase(s.ownerUrl);
    const links = await queryRows<{ position: string; event: string }>(s.appUrl, "SELECT position::text, event_id::text AS event FROM audit_chain ORDER BY position");
    expect(links).toEqual(ids.map((id, i) => ({ position: String(i + 1), event: String(id) })));
    const result = await verifyCli(s.appUrl);
    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
    expect(result.stdout).toMatch(/^audit trail intact: 3 links checked, head at link 3 \(event \d+\) [0-9a-f]{64}; 3 events, 0 awaiting the chain; 0 signatures match their content hashes\n$/);
    expect(await verifyCli(s.appUrl, [], { launcher: true })).toEqual(result);
  });

  it("an event edited by the owner fails the check at that event", async () => {
    for (const summary of ["fourth event", "fifth event"]) {
      const [row] = await queryRows<{ id: string }>(s.appUrl, `INSERT INTO audit_events (actor_label, action, entity_type, summary) VALUES ('system', 'test.chained', 'test', '${summary}') RETURNING id::text`);
      ids.push(Number(row.id));
    }
    const client = new Client({ connectionString: s.appUrl });
    await client.connect();
    await sealAuditChain(client);
    await client.end();
    const before = await verifyCli(s.appUrl);
    expect(before.code).toBe(0);
    const head = before.stdout.match(/head at link (\d+) \(event \d+\) ([0-9a-f]{64})/)!;
    expect(head[1]).toBe("5");

    await queryRows(
      s.ownerUrl,
      `ALTER TABLE audit_events DISABLE TRIGGER audit_events_no_update_delete;
       UPDATE audit_events SET summary = 'second event (quietly reworded)' WHERE id = ${ids[1]};
       ALTER TABLE audit_events ENABLE TRIGGER audit_events_no_update_delete;`,
    );
    const after = await verifyCli(s.appUrl);
    expect(after.code).toBe(3);
    expect(after.stdout).toBe("");
    expect(after.stderr).toBe(
      `bellwether: audit trail broken at event ${ids[1]}: audit event ${ids[1]} was changed after it was chained (link 2's hash no longer matches it) (1 link before it holds)\n`,
    );

    // The owner then rehashes every link from the edit on: the chain holds together again, and
    // only the head recorded elsewhere (a backup manifest, a dossier) shows the rewrite.
    const events = await queryRows<ChainedEvent>(
      s.appUrl,
      `SELECT e.id::text AS id, to_char(e.at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"') AS at, e.actor_id::text AS "actorId",
              e.actor_label AS "actorLabel", e.action, e.entity_type AS "entityType", e.entity_id AS "entityId", e.summary, e.details::text AS details
       FROM audit_chain c JOIN audit_events e ON e.id = c.event_id WHERE c.position >= 2 ORDER BY c.position`,
    );
    const [first] = await queryRows<{ hash: string }>(s.appUrl, "SELECT hash FROM audit_chain WHERE position = 1");
    const rewritten = chainLinks({ position: 1, hash: first.hash }, events);
    await queryRows(
      s.ownerUrl,
      `ALTER TABLE audit_chain DISABLE TRIGGER audit_chain_no_update_delete;
       ${rewritten.map((l) => `UPDATE audit_chain SET prev_hash = '${l.prevHash}', hash = '${l.hash}' WHERE position = ${l.position};`).join("\n")}
       ALTER TABLE audit_chain ENABLE TRIGGER audit_chain_no_update_delete;`,
    );
    expect((await verifyCli(s.appUrl)).code).toBe(0);
    const against = await verifyCli(s.appUrl, ["--head", `${head[1]}:${head[2]}`]);
    expect(against.code).toBe(3);
    expect(against.stderr).toBe(
      `bellwether: audit trail broken at event ${ids[4]}: the chain no longer holds the recorded head (position 5, hash ${head[2].slice(0, 12)}…): it was rewritten (5 links before it hold)\n`,
    );
  });

  it("an event taken out of the queue before it was chained is named", async () => {
    const [row] = await queryRows<{ id: string }>(s.appUrl, "INSERT INTO audit_events (actor_label, action, entity_type, summary) VALUES ('system', 'test.unqueued', 'test', 'never chained') RETURNING id::text");
    await queryRows(s.ownerUrl, `DELETE FROM audit_chain_pending WHERE event_id = ${row.id}`);
    const result = await verifyCli(s.appUrl);
    expect(result.code).toBe(3);
    expect(result.stderr).toBe(`bellwether: audit trail broken at event ${row.id}: audit event ${row.id} is neither in the chain nor queued for it (5 links before it hold)\n`);
  });

  it("refuses a malformed --head as a usage error", async () => {
    const result = await verifyCli(s.appUrl, ["--head", "five"]);
    expect(result.code).toBe(2);
    expect(result.stderr).toBe('bellwether: --head must be POSITION:HASH, the chain head a backup or dossier recorded (got "five")\n');
  });
});
