/**
 * `bellwether verify-audit [--head POSITION:HASH]`
 * Checks the audit trail's hash chain (db/audit-chain.ts, lib/audit/chain.ts): every link against
 * its event as stored now, every event chained or queued, every signature's SHA-256, and with
 * `--head` that the chain still holds the head a backup manifest or a dossier recorded.
 * Intact: one summary line on stdout, exit 0. Broken: one line on stderr naming the first broken
 * event id, exit 3. The database is DATABASE_URL, else the private cluster of `npm start`.
 */
import { Client } from "pg";
import { verifyAuditChain, type AuditVerification } from "../../db/audit-chain";
import { openPrivateCluster, type PrivateCluster } from "../lib/private-cluster";
import { CliError } from "./cli-error";

/** Exit code of a broken chain, apart from usage errors (2) and crashes (1). */
export const BROKEN_EXIT_CODE = 3;

function parseArgs(args: string[]): { head: { position: number; hash: string } | null } {
  let head: { position: number; hash: string } | null = null;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    const eq = a.startsWith("--") ? a.indexOf("=") : -1;
    const flag = eq > 0 ? a.slice(0, eq) : a;
    if (flag === "--head") {
      const v = eq > 0 ? a.slice(eq + 1) : args[++i];
      const m = v === undefined ? null : /^(\d+):([0-9a-f]{64})$/.exec(v);
      if (!m) throw new CliError(`--head must be POSITION:HASH, the chain head a backup or dossier recorded (got ${v === undefined ? "nothing" : `"${v}"`})`);
      head = { position: Number(m[1]), hash: m[2] };
    } else {
      throw new CliError(`verify-audit takes no ${flag.startsWith("--") ? `option ${flag}` : `argument "${a}"`}; usage: bellwether verify-audit [--head POSITION:HASH]`);
    }
  }
  return { head };
}

const count = (n: number) => n.toLocaleString("en-GB");

/** The one line that says what was checked. */
export function summaryLine(v: AuditVerification): string {
  const head = v.head ? `head at link ${count(v.head.position)} (event ${v.head.eventId}) ${v.head.hash}` : "the chain is empty";
  return (
    `audit trail intact: ${count(v.links)} links checked, ${head}; ${count(v.events)} events, ` +
    `${count(v.pending)} awaiting the chain; ${count(v.signatures)} signatures match their content hashes`
  );
}

export function brokenLine(v: AuditVerification): string {
  const b = v.break!;
  const where = b.eventId !== null ? `event ${b.eventId}` : `link ${b.position}`;
  return `audit trail broken at ${where}: ${b.reason} (${v.links === 1 ? "1 link" : `${count(v.links)} links`} before it hold${v.links === 1 ? "s" : ""})`;
}

export async function run(args: string[]): Promise<number> {
  const { head } = parseArgs(args);
  let cluster: PrivateCluster | null = null;
  let url = process.env.DATABASE_URL;
  if (!url) {
    try {
      cluster = openPrivateCluster();
    } catch (err) {
      throw new CliError(err instanceof Error ? err.message : String(err));
    }
    url = cluster.appUrl;
  }
  const client = new Client({ connectionString: url });
  try {
    try {
      await client.connect();
    } catch (err) {
      throw new CliError(`cannot reach the database: ${err instanceof Error ? err.message : String(err)}`);
    }
    const result = await verifyAuditChain(client, { expected: head });
    if (result.ok) {
      process.stdout.write(`${summaryLine(result)}\n`);
      return 0;
    }
    process.stderr.write(`bellwether: ${brokenLine(result)}\n`);
    return BROKEN_EXIT_CODE;
  } finally {
    await client.end().catch(() => undefined);
    cluster?.release();
  }
}
