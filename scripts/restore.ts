/**
 * `npm run restore FILE`: restores a dump that `npm run backup` wrote into an empty cluster.
 *
 *  1. Reads FILE.json (the manifest) and checks FILE's SHA-256 against it: a damaged or altered
 *     dump is refused before anything is touched.
 *  2. Connects to the target as a superuser, creates the owner role and the app's role when
 *     missing (a dump carries no roles), refuses a database that already holds tables, creates it
 *     owned by the owner role.
 *  3. pg_restore as the owner in one transaction, then db/grants.sql (the app role's grants).
 *  4. Verifies the audit chain and the signatures (db/audit-chain.ts) against the chain head in
 *     the manifest, and the counts; any difference is an error.
 *
 * Target: BELLWETHER_RESTORE_SUPERUSER_URL (a superuser on the target cluster) and the database
 * BELLWETHER_RESTORE_DATABASE (default: the manifest's); roles created there get
 * BELLWETHER_RESTORE_OWNER_PASSWORD and BELLWETHER_RESTORE_APP_PASSWORD. Without that URL, the
 * private cluster of `npm start` (made when the data folder holds none) with its own passwords.
 * Exit 2 for wrong arguments, a checksum that does not match or a target that is not empty; 1
 * when the restore or its verification failed.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { Client } from "pg";
import { verifyAuditChain } from "../db/audit-chain";
import { findPgBin } from "../db/local-server";
import { applyGrants } from "../db/migrate";
import { backupManifestSchema, manifestPathOf, type BackupManifest } from "../lib/backup/manifest";
import { sha256OfFile } from "./backup";
import { openPrivateCluster, type PrivateCluster } from "./lib/private-cluster";

const USAGE = "usage: npm run restore FILE   (FILE: a .dump written by npm run backup, with FILE.json beside it)";

/** Refusals before anything changed: exit code 2. */
class RestoreRefused extends Error {}

function withDatabase(url: string, database: string): string {
  const u = new URL(url);
  u.pathname = `/${database}`;
  return u.toString();
}

function runPgRestore(args: string[]): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(path.join(findPgBin(), "pg_restore"), args, { stdio: ["ignore", "ignore", "pipe"] });
    let stderr = "";
    child.stderr.on("data", (d: Buffer) => (stderr += d.toString()));
    child.on("error", reject);
    child.on("exit", (code) => (code === 0 ? resolve() : reject(new Error(`pg_restore failed (exit ${code}): ${stderr.trim()}`))));
  });
}

export async function readCheckedManifest(dumpPath: string): Promise<BackupManifest> {
  const manifestPath = manifestPathOf(dumpPath);
  if (!fs.existsSync(dumpPath)) throw new RestoreRefused(`${dumpPath} does not exist`);
  if (!fs.existsSync(manifestPath)) throw new RestoreRefused(`${manifestPath} is missing: a backup is the dump and its manifest, as npm run backup wrote them`);
  let manifest: BackupManifest;
  try {
    manifest = backupManifestSchema.parse(JSON.parse(fs.readFileSync(manifestPath, "utf8")));
  } catch {
    throw new RestoreRefused(`${manifestPath} is not a Bellwether backup manifest`);
  }
  const sha256 = await sha256OfFile(dumpPath);
  if (sha256 !== manifest.sha256) {
    throw new RestoreRefused(`${dumpPath} does not match its checksum (SHA-256 ${sha256}, the manifest says ${manifest.sha256}): the file is damaged or was altered; nothing was restored`);
  }
  return manifest;
}

export interface RestoreTarget {
  superuserUrl: string;
  database: string;
  ownerPassword: string | undefined;
  appPassword: string | undefined;
}

export async function restore(dumpPath: string, target: RestoreTarget): Promise<{ manifest: BackupManifest; summary: string }> {
  const manifest = await readCheckedManifest(dumpPath);
  const roles = [
    { name: manifest.ownerRole, password: target.ownerPassword },
    { name: manifest.appRole, password: target.appPassword },
  ];

  const admin = new Client({ connectionString: withDatabase(target.superuserUrl, "postgres") });
  await admin.connect();
  admin.on("notice", () => undefined);
  try {
    const exists = (await admin.query("SELECT 1 FROM pg_database WHERE datname = $1", [target.database])).rowCount === 1;
    if (exists) {
      const probe = new Client({ connectionString: withDatabase(target.superuserUrl, target.database) });
      await probe.connect();
      const { rows } = await probe.query<{ n: number }>("SELECT count(*)::int AS n FROM pg_tables WHERE schemaname IN ('public', 'drizzle')").finally(() => probe.end());
      if (rows[0].n > 0) {
        throw new RestoreRefused(`the database ${target.database} already holds ${rows[0].n} tables: restore needs an empty cluster (or a database name not in use); nothing was changed`);
      }
    }
    for (const role of roles) {
      const found = (await admin.query("SELECT 1 FROM pg_roles WHERE rolname = $1", [role.name])).rowCount === 1;
      if (found && !role.password) continue;
      if (!role.password) throw new RestoreRefused(`the role ${role.name} does not exist on the target: give its password in BELLWETHER_RESTORE_${role.name === manifest.appRole ? "APP" : "OWNER"}_PASSWORD`);
      await admin.query(
        `${found ? "ALTER" : "CREATE"} ROLE ${admin.escapeIdentifier(role.name)} WITH LOGIN NOSUPERUSER NOCREATEDB NOCREATEROLE PASSWORD ${admin.escapeLiteral(role.password)}`,
      );
    }
    if (!exists) await admin.query(`CREATE DATABASE ${admin.escapeIdentifier(target.database)} OWNER ${admin.escapeIdentifier(manifest.ownerRole)}`);
    else await admin.query(`ALTER DATABASE ${admin.escapeIdentifier(target.database)} OWNER TO ${admin.escapeIdentifier(manifest.ownerRole)}`);
  } finally {
    await admin.end();
  }

  // As the superuser taking the owner's role, so that every object belongs to the owner as on the
  // source (whether or not its password is known here); in one transaction.
  const superuserOnDb = withDatabase(target.superuserUrl, target.database);
  await runPgRestore(["--no-owner", "--no-privileges", "--exit-on-error", "--single-transaction", `--role=${manifest.ownerRole}`, `--dbname=${superuserOnDb}`, dumpPath]);

  const owner = new Client({ connectionString: superuserOnDb });
  await owner.connect();
  owner.on("notice", () => undefined);
  try {
    await owner.query(`SET ROLE ${owner.escapeIdentifier(manifest.ownerRole)}`);
    await applyGrants(owner);
    const verification = await verifyAuditChain(owner, { expected: manifest.chainHead });
    if (!verification.ok) throw new Error(`the restored audit trail does not verify: ${verification.break!.reason}`);
    const { rows: [c] } = await owner.query<{ signatures: number; signed: number }>(
      "SELECT (SELECT count(*) FROM signatures)::int AS signatures, (SELECT count(*) FROM interval_versions WHERE state <> 'draft' AND state <> 'awaiting_signoff')::int AS signed",
    );
    const found = { auditEvents: verification.events, auditChainPending: verification.pending, signatures: c.signatures, signedVersions: c.signed };
    for (const key of Object.keys(found) as (keyof typeof found)[]) {
      if (found[key] !== manifest.counts[key]) throw new Error(`the restored database holds ${found[key]} ${key}, the manifest says ${manifest.counts[key]}`);
    }
    const head = manifest.chainHead ? `audit chain verified up to the recorded head ${manifest.chainHead.position} ${manifest.chainHead.hash}` : "audit chain empty";
    return {
      manifest,
      summary: `restored ${path.basename(dumpPath)} into ${target.database}: ${found.auditEvents} audit events, ${found.signatures} signatures, ${found.signedVersions} signed versions; ${head}`,
    };
  } finally {
    await owner.end();
  }
}

async function main(): Promise<number> {
  const args = process.argv.slice(2);
  if (args.length !== 1 || args[0].startsWith("-")) {
    console.error(`restore: ${args.length === 0 ? "FILE is required" : `unexpected arguments: ${args.join(" ")}`}\n${USAGE}`);
    return 2;
  }
  const dumpPath = path.resolve(args[0]);
  let cluster: PrivateCluster | null = null;
  try {
    let target: RestoreTarget;
    const database = process.env.BELLWETHER_RESTORE_DATABASE;
    if (process.env.BELLWETHER_RESTORE_SUPERUSER_URL) {
      const manifest = await readCheckedManifest(dumpPath);
      target = {
        superuserUrl: process.env.BELLWETHER_RESTORE_SUPERUSER_URL,
        database: database || manifest.database,
        ownerPassword: process.env.BELLWETHER_RESTORE_OWNER_PASSWORD || undefined,
        appPassword: process.env.BELLWETHER_RESTORE_APP_PASSWORD || undefined,
      };
    } else {
      await readCheckedManifest(dumpPath);
      cluster = openPrivateCluster({ create: true });
      target = { superuserUrl: cluster.superuserUrl, database: database || "bellwether", ownerPassword: cluster.server.ownerPassword, appPassword: cluster.server.appPassword };
    }
    const { summary } = await restore(dumpPath, target);
    console.log(`restore: ${summary}`);
    return 0;
  } catch (err) {
    console.error(`restore: ${err instanceof Error ? err.message : String(err)}`);
    return err instanceof RestoreRefused ? 2 : 1;
  } finally {
    cluster?.release();
  }
}

if (require.main === module) {
  main().then((code) => process.exit(code));
}
