/**
 * `npm run backup [-- --out DIR]`: a consistent dump of Bellwether's database with a checksum.
 *
 *  1. Seals the audit events still queued for the hash chain (db/audit-chain.ts).
 *  2. Opens a repeatable-read transaction, exports its snapshot and reads the chain's head and
 *     the counts in it; pg_dump then dumps that very snapshot (`--snapshot`), so the head in the
 *     manifest is the newest link inside the dump, while the app goes on writing.
 *  3. Writes DIR/bellwether-<UTC time>.dump (pg_dump's custom format, without owners and grants:
 *     `npm run restore` recreates the roles and applies db/grants.sql), DIR/….dump.json (the
 *     manifest: SHA-256, chain head, counts; lib/backup/manifest.ts) and DIR/….dump.sha256
 *     (for `sha256sum -c`).
 *
 * The database is BELLWETHER_MIGRATION_URL (the owner, who can read every table and drizzle's
 * bookkeeping), else the private cluster of `npm start`. DIR is --out, else
 * BELLWETHER_BACKUP_DIR, else .backups/ beside the data folder (not inside it: restoring means
 * moving the data folder aside, and its backups must not go with it). Exit 2 for wrong
 * arguments, 1 when the backup could not be made (nothing is left behind but what was complete).
 */
import { spawn } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { parseArgs } from "node:util";
import { Client } from "pg";
import { readChainHead, sealAuditChain } from "../db/audit-chain";
import { APP_ROLE, findPgBin } from "../db/local-server";
import { BACKUP_FORMAT, manifestPathOf, type BackupManifest } from "../lib/backup/manifest";
import { openPrivateCluster, privateClusterDir, type PrivateCluster } from "./lib/private-cluster";

const USAGE = "usage: npm run backup [-- --out DIR]";

export async function sha256OfFile(file: string): Promise<string> {
  const hash = crypto.createHash("sha256");
  for await (const chunk of fs.createReadStream(file)) hash.update(chunk as Buffer);
  return hash.digest("hex");
}

function runPgDump(args: string[]): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(path.join(findPgBin(), "pg_dump"), args, { stdio: ["ignore", "ignore", "pipe"] });
    let stderr = "";
    child.stderr.on("data", (d: Buffer) => (stderr += d.toString()));
    child.on("error", reject);
    child.on("exit", (code) => (code === 0 ? resolve() : reject(new Error(`pg_dump failed (exit ${code}): ${stderr.trim()}`))));
  });
}

function stamp(d: Date): string {
  return d.toISOString().replace(/[-:]/g, "").replace(/\.\d+Z$/, "Z");
}

export async function backup({ ownerUrl, outDir }: { ownerUrl: string; outDir: string }): Promise<{ dumpPath: string; manifest: BackupManifest }> {
  fs.mkdirSync(outDir, { recursive: true });
  const createdAt = new Date();
  const dumpPath = path.join(outDir, `bellwether-${stamp(createdAt)}.dump`);
  if (fs.existsSync(dumpPath)) throw new Error(`${dumpPath} exists already`);
  const partial = `${dumpPath}.partial`;

  const client = new Client({ connectionString: ownerUrl });
  await client.connect();
  client.on("notice", () => undefined);
  try {
    await sealAuditChain(client);
    await client.query("BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY");
    const { rows: [snap] } = await client.query<{ snapshot: string }>("SELECT pg_export_snapshot() AS snapshot");
    const head = await readChainHead(client);
    const { rows: [info] } = await client.query<{ database: string; owner: string; version: string; schema: string | null; events: string; pending: string; signatures: string; signed: string }>(
      `SELECT current_database() AS database, current_user AS owner, current_setting('server_version') AS version,
              (SELECT max(created_at)::text FROM drizzle.__drizzle_migrations) AS schema,
              (SELECT count(*) FROM audit_events)::text AS events,
              (SELECT count(*) FROM audit_chain_pending)::text AS pending,
              (SELECT count(*) FROM signatures)::text AS signatures,
              (SELECT count(*) FROM interval_versions WHERE state <> 'draft' AND state <> 'awaiting_signoff')::text AS signed`,
    );
    await runPgDump(["--format=custom", "--no-owner", "--no-privileges", `--snapshot=${snap.snapshot}`, `--file=${partial}`, `--dbname=${ownerUrl}`]);
    await client.query("COMMIT");

    const sha256 = await sha256OfFile(partial);
    fs.renameSync(partial, dumpPath);
    const manifest: BackupManifest = {
      format: BACKUP_FORMAT,
      createdAt: createdAt.toISOString(),
      dumpFile: path.basename(dumpPath),
      sizeBytes: fs.statSync(dumpPath).size,
      sha256,
      database: info.database,
      ownerRole: info.owner,
      appRole: APP_ROLE,
      serverVersion: info.version,
      schemaVersion: info.schema,
      chainHead: head,
      counts: { auditEvents: Number(info.events), auditChainPending: Number(info.pending), signatures: Number(info.signatures), signedVersions: Number(info.signed) },
    };
    fs.writeFileSync(manifestPathOf(dumpPath), `${JSON.stringify(manifest, null, 2)}\n`);
    fs.writeFileSync(`${dumpPath}.sha256`, `${sha256}  ${path.basename(dumpPath)}\n`);
    return { dumpPath, manifest };
  } catch (err) {
    await client.query("ROLLBACK").catch(() => undefined);
    fs.rmSync(partial, { force: true });
    throw err;
  } finally {
    await client.end();
  }
}

async function main(): Promise<number> {
  let out: string | undefined;
  try {
    ({ values: { out } } = parseArgs({ args: process.argv.slice(2), options: { out: { type: "string" } }, strict: true }));
  } catch (err) {
    console.error(`backup: ${(err as Error).message}\n${USAGE}`);
    return 2;
  }
  let cluster: PrivateCluster | null = null;
  try {
    const ownerUrl = process.env.BELLWETHER_MIGRATION_URL || (cluster = openPrivateCluster()).ownerUrl;
    const outDir = path.resolve(out ?? process.env.BELLWETHER_BACKUP_DIR ?? path.join(path.dirname(privateClusterDir().dataRoot), ".backups"));
    const { dumpPath, manifest } = await backup({ ownerUrl, outDir });
    const head = manifest.chainHead ? `audit chain head ${manifest.chainHead.position} ${manifest.chainHead.hash}` : "audit chain empty";
    console.log(`backup: ${dumpPath} (${manifest.sizeBytes.toLocaleString("en-GB")} bytes, SHA-256 ${manifest.sha256})`);
    console.log(`backup: ${manifest.counts.auditEvents} audit events, ${manifest.counts.signatures} signatures, ${manifest.counts.signedVersions} signed versions; ${head}`);
    console.log(`backup: manifest ${manifestPathOf(dumpPath)}; restore with \`npm run restore ${dumpPath}\``);
    return 0;
  } catch (err) {
    console.error(`backup: ${err instanceof Error ? err.message : String(err)}`);
    return 1;
  } finally {
    cluster?.release();
  }
}

if (require.main === module) {
  main().then((code) => process.exit(code));
}
