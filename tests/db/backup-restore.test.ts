import { execFile } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ensureCluster, startServer, stopServer, superuserUrl, type LocalServer } from "@/db/local-server";
import { assertSchemaCurrent } from "@/db/migrate";
import { recordAuditEvent, SYSTEM_ACTOR } from "@/db/queries/audit";
import { backupManifestSchema, type BackupManifest } from "@/lib/backup/manifest";
import { testDatabase } from "../support/database";
import { createAnalyte, putInForce, uniqueCode } from "../support/scores";
import { ownerUrl, pgError, queryRows, SUPERUSER_URL } from "../support/scratch-database";
import { signInAll, type Cookies } from "../support/studies";

const exec = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const TSX = path.join(ROOT, "node_modules/.bin/tsx");
const WORK = path.join(ROOT, ".test-data", "backup-restore");
const RESTORED_DB = "bellwether_restored";
const OWNER_PASSWORD = "restored-owner-password";
const APP_PASSWORD = "restored-app-password";

const { database, pool } = testDatabase();

async function script(file: string, args: string[], env: Record<string, string>): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await exec(TSX, [file, ...args], { cwd: ROOT, env: { ...process.env, ...env } });
    return { code: 0, stdout, stderr };
  } catch (e) {
    const err = e as { code: number; stdout: string; stderr: string };
    return { code: err.code, stdout: err.stdout, stderr: err.stderr };
  }
}

/** Every row of a table as PostgreSQL's own JSON of it, keyed by `key`. */
async function rowsOf(url: string, table: string, key: string, where = "true"): Promise<Map<string, string>> {
  const rows = await queryRows<{ k: string; row: string }>(url, `SELECT ${key}::text AS k, to_jsonb(t)::text AS row FROM ${table} t WHERE ${where} ORDER BY ${key}`);
  return new Map(rows.map((r) => [r.k, r.row]));
}

function withDatabase(url: string, db: string, user?: string, password?: string): string {
  const u = new URL(url);
  u.pathname = `/${db}`;
  if (user) {
    u.username = user;
    u.password = password ?? "";
  }
  return u.toString();
}

// Needs a cluster of its own (the spare port) and the test cluster's superuser.
describe.skipIf(!SUPERUSER_URL || !process.env.BELLWETHER_TEST_SPARE_PG_PORT)("npm run backup during activity, npm run restore into an empty cluster", () => {
  let target: LocalServer;
  let cookies: Cookies;
  let dumpPath: string;
  let manifest: BackupManifest;
  let restoredOwnerView: string;

  beforeAll(async () => {
    fs.rmSync(WORK, { recursive: true, force: true });
    target = ensureCluster(path.join(WORK, "postgres"), Number(process.env.BELLWETHER_TEST_SPARE_PG_PORT));
    startServer(target);
    cookies = await signInAll();
  });
  afterAll(async () => {
    await pool.end();
    if (target) stopServer(target);
    fs.rmSync(WORK, { recursive: true, force: true });
  });

  it("writes a dump, its manifest with the chain head and its checksum while versions are signed and events written", async () => {
    const outDir = path.join(WORK, "backups");
    let active = true;
    let signed = 0;
    const activity = (async () => {
      for (let i = 0; active; i++) {
        await recordAuditEvent(database, { actor: SYSTEM_ACTOR, action: "test.activity", entityType: "test", summary: `activity during the backup ${i}` });
        if (i % 4 === 0) {
          const code = uniqueCode("BKP");
          await createAnalyte(cookies, { code, name: `Backup check ${code}`, unit: "g/L", decimals: 0 });
          await putInForce(pool, cookies, code, [{ low: 35, high: 52, method: "adopted", n: 20, model: { kind: "zlog", scale: "log" } }]);
          signed += 1;
        }
      }
    })();
    const result = await script("scripts/backup.ts", ["--out", outDir], { BELLWETHER_MIGRATION_URL: ownerUrl() });
    // Go on a little after the dump, so that the source holds more than the backup.
    const more = signed + 1;
    while (signed < more) await new Promise((r) => setTimeout(r, 50));
    active = false;
    await activity;

    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
    const [dumpLine] = result.stdout.split("\n");
    dumpPath = /^backup: (\S+\.dump) \(/.exec(dumpLine)![1];
    manifest = backupManifestSchema.parse(JSON.parse(fs.readFileSync(`${dumpPath}.json`, "utf8")));
    expect(fs.readFileSync(`${dumpPath}.sha256`, "utf8")).toBe(`${manifest.sha256}  ${path.basename(dumpPath)}\n`);
    // The checksum as coreutils computes it.
    const { stdout } = await exec("sha256sum", [dumpPath]);
    expect(stdout.split(" ")[0]).toBe(manifest.sha256);
    expect(manifest.chainHead).not.toBeNull();
    expect(manifest.counts.signatures).toBeGreaterThan(0);
  });

  it("restores it into an empty cluster with the app's role and grants, the chain verified against the manifest", async () => {
    const result = await script("scripts/restore.ts", [dumpPath], {
      BELLWETHER_RESTORE_SUPERUSER_URL: superuserUrl(target),
      BELLWETHER_RESTORE_DATABASE: RESTORED_DB,
      BELLWETHER_RESTORE_OWNER_PASSWORD: OWNER_PASSWORD,
      BELLWETHER_RESTORE_APP_PASSWORD: APP_PASSWORD,
    });
    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
    const head = manifest.chainHead!;
    expect(result.stdout).toBe(
      `restore: restored ${path.basename(dumpPath)} into ${RESTORED_DB}: ${manifest.counts.auditEvents} audit events, ${manifest.counts.signatures} signatures, ` +
        `${manifest.counts.signedVersions} signed versions; audit chain verified up to the recorded head ${head.position} ${head.hash}\n`,
    );
    restoredOwnerView = withDatabase(superuserUrl(target), RESTORED_DB);

    // The app's role exists again, with exactly its grants: it may read and add, not rewrite.
    const restoredApp = withDatabase(superuserUrl(target), RESTORED_DB, "bellwether_app", APP_PASSWORD);
    await expect(assertSchemaCurrent(restoredApp)).resolves.toBeUndefined();
    expect(await pgError(restoredApp, "UPDATE audit_events SET summary = 'x' WHERE false")).toEqual({ code: "42501", message: "permission denied for table audit_events" });
    expect(await pgError(restoredApp, "UPDATE signatures SET comment = 'x' WHERE false")).toEqual({ code: "42501", message: "permission denied for table signatures" });
    expect(await pgError(restoredApp, "SELECT count(*) FROM interval_versions")).toBeNull();

    const verify = await exec(TSX, ["scripts/bellwether.ts", "verify-audit", "--head", `${head.position}:${head.hash}`], { cwd: ROOT, env: { ...process.env, DATABASE_URL: restoredApp } });
    expect(verify.stdout).toMatch(new RegExp(`^audit trail intact: [\\d,]+ links checked, head at link ${head.position.toLocaleString("en-GB")} \\(event ${head.eventId}\\) ${head.hash};`));
  });

  it("finds every signed version, signature and audit event of the backup identical to the source's", async () => {
    const source = ownerUrl();
    const signedWhere = "state NOT IN ('draft', 'awaiting_signoff')";
    for (const [table, key, where] of [
      ["signatures", "id", "true"],
      ["interval_versions", "id", signedWhere],
      ["interval_partitions", "id", `version_id IN (SELECT id FROM interval_versions WHERE ${signedWhere})`],
      ["audit_events", "id", "true"],
      ["audit_chain", "position", "true"],
    ] as const) {
      const restored = await rowsOf(restoredOwnerView, table, key, where);
      const original = await rowsOf(source, table, key, `${key} IN (${[...restored.keys()].map((k) => `'${k}'`).join(",") || "NULL"})`);
      expect(restored.size, table).toBeGreaterThan(0);
      for (const [k, row] of restored) expect(row, `${table} ${k}`).toBe(original.get(k));
    }
    const counts = await queryRows<{ events: number; signatures: number; signed: number }>(
      restoredOwnerView,
      `SELECT (SELECT count(*) FROM audit_events)::int AS events, (SELECT count(*) FROM signatures)::int AS signatures, (SELECT count(*) FROM interval_versions WHERE ${signedWhere})::int AS signed`,
    );
    expect(counts[0]).toEqual({ events: manifest.counts.auditEvents, signatures: manifest.counts.signatures, signed: manifest.counts.signedVersions });
    // The source went on after the snapshot: it holds what the backup does not.
    const [now] = await queryRows<{ signatures: number }>(source, "SELECT count(*)::int AS signatures FROM signatures");
    expect(now.signatures).toBeGreaterThan(manifest.counts.signatures);
  });

  it("refuses a cluster whose database is not empty, and a dump that does not match its checksum, changing nothing", async () => {
    const env = { BELLWETHER_RESTORE_SUPERUSER_URL: superuserUrl(target), BELLWETHER_RESTORE_DATABASE: RESTORED_DB };
    const before = await queryRows<{ n: number }>(restoredOwnerView, "SELECT count(*)::int AS n FROM audit_events");
    const again = await script("scripts/restore.ts", [dumpPath], env);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(new RegExp(`^restore: the database ${RESTORED_DB} already holds \\d+ tables: restore needs an empty cluster \\(or a database name not in use\\); nothing was changed\\n$`));
    expect(await queryRows<{ n: number }>(restoredOwnerView, "SELECT count(*)::int AS n FROM audit_events")).toEqual(before);

    const damaged = path.join(WORK, "damaged.dump");
    const bytes = fs.readFileSync(dumpPath);
    bytes[bytes.length >> 1] ^= 0xff;
    fs.writeFileSync(damaged, bytes);
    fs.copyFileSync(`${dumpPath}.json`, `${damaged}.json`);
    const refused = await script("scripts/restore.ts", [damaged], { ...env, BELLWETHER_RESTORE_DATABASE: "bellwether_never" });
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/^restore: \S+damaged\.dump does not match its checksum \(SHA-256 [0-9a-f]{64}, the manifest says [0-9a-f]{64}\): the file is damaged or was altered; nothing was restored\n$/);
    expect(await queryRows(superuserUrl(target), "SELECT datname FROM pg_database WHERE datname = 'bellwether_never'")).toEqual([]);
  });
});
