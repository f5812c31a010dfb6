/**
 * The audit trail's hash chain in the database (lib/audit/chain.ts holds the formula). Plain `pg`
 * so that the app, the migration runner, the backup script and the command line share it.
 *
 * Sealing: every audit event's id is queued in audit_chain_pending by a trigger, in the event's
 * own transaction, so the queue holds only committed events as far as any other transaction can
 * see. The sealer, in a short transaction of its own under one advisory lock, reads the chain's
 * head and the queued events (in id order), appends their links and empties the queue of them.
 * Audited transactions therefore never wait for each other: a long one (an upload commit of
 * several seconds) is sealed after it commits, and the chain's order is the order in which
 * events became visible, not the order of their ids. Only sealers queue behind each other, for
 * milliseconds.
 */
import { inArray } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import type { Client, Pool, PoolClient } from "pg";
import { canonicalContentOf } from "../lib/versions/canonical-content";
import * as schema from "./schema";
import { canonicalVersionOf } from "./version-content";
import { chainLinks, ChainWalker, type ChainBreak, type ChainedEvent, type ChainHead, type ChainLink } from "../lib/audit/chain";

type Connection = Pool | Client | PoolClient;

const SEAL_LOCK = "bellwether.audit_chain";
const SEAL_BATCH = 5000;
const VERIFY_BATCH = 5000;

/** The event's fields as the chain hashes them (lib/audit/chain.ts says why they are text). */
const EVENT_COLUMNS = `
  e.id::text AS id,
  to_char(e.at AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"') AS at,
  e.actor_id::text AS "actorId",
  e.actor_label AS "actorLabel",
  e.action,
  e.entity_type AS "entityType",
  e.entity_id AS "entityId",
  e.summary,
  e.details::text AS details`;

/**
 * A pool hands each query to any of its connections, so a transaction needs one client of it.
 * Told apart by shape, not `instanceof`: bundlers and test runners may load pg twice.
 */
function isPool(connection: Connection): connection is Pool {
  return typeof (connection as Pool).totalCount === "number";
}

async function withClient<T>(connection: Connection, work: (client: Client | PoolClient) => Promise<T>): Promise<T> {
  if (isPool(connection)) {
    const client = await connection.connect();
    try {
      return await work(client);
    } finally {
      client.release();
    }
  }
  return work(connection);
}

/** The newest link, or null while the chain is empty. */
export async function readChainHead(connection: Connection): Promise<ChainHead | null> {
  const { rows } = await connection.query<{ position: string; eventId: string; hash: string }>(
    `SELECT c.position::text AS position, c.event_id::text AS "eventId", c.hash FROM audit_chain c ORDER BY c.position DESC LIMIT 1`,
  );
  return rows.length ? { position: Number(rows[0].position), eventId: rows[0].eventId, hash: rows[0].hash } : null;
}

/**
 * Links every queued audit event that has committed, in batches of SEAL_BATCH per transaction
 * (READ COMMITTED, so each statement after the lock sees what the previous sealer committed).
 * Returns how many were sealed and the head afterwards.
 */
export async function sealAuditChain(connection: Connection): Promise<{ sealed: number; head: ChainHead | null }> {
  return withClient(connection, async (client) => {
    // The usual pass finds nothing queued: one statement, no transaction, no lock.
    const { rows: queued } = await client.query<{ any: boolean }>("SELECT EXISTS (SELECT 1 FROM audit_chain_pending) AS any");
    if (!queued[0].any) return { sealed: 0, head: await readChainHead(client) };
    let sealed = 0;
    for (;;) {
      await client.query("BEGIN ISOLATION LEVEL READ COMMITTED");
      try {
        await client.query("SELECT pg_advisory_xact_lock(hashtext($1))", [SEAL_LOCK]);
        const head = await readChainHead(client);
        const { rows: events } = await client.query<ChainedEvent>(
          `SELECT ${EVENT_COLUMNS}
           FROM audit_chain_pending p JOIN audit_events e ON e.id = p.event_id
           ORDER BY e.id LIMIT ${SEAL_BATCH}`,
        );
        const links = chainLinks(head, events);
        if (links.length > 0) {
          await client.query(
            `INSERT INTO audit_chain (position, event_id, prev_hash, hash)
             SELECT * FROM unnest($1::bigint[], $2::bigint[], $3::text[], $4::text[])`,
            [links.map((l) => l.position), links.map((l) => l.eventId), links.map((l) => l.prevHash), links.map((l) => l.hash)],
          );
          await client.query("DELETE FROM audit_chain_pending WHERE event_id = ANY($1::bigint[])", [links.map((l) => l.eventId)]);
        }
        await client.query("COMMIT");
        sealed += links.length;
        if (events.length < SEAL_BATCH) {
          const last = links.at(-1);
          return { sealed, head: last ? { position: last.position, eventId: last.eventId, hash: last.hash } : head };
        }
      } catch (err) {
        await client.query("ROLLBACK").catch(() => undefined);
        throw err;
      }
    }
  });
}

export interface AuditVerification {
  ok: boolean;
  /** Links whose hash and order were checked. */
  links: number;
  /** Audit events in the table, and those queued but not yet chained. */
  events: number;
  pending: number;
  signatures: number;
  head: ChainHead | null;
  /** The first break found, in this order: the chain, events outside it, signatures, the expected head. */
  break: ChainBreak | null;
}

/**
 * Checks the whole chain: every link in position order against its event as stored now, every
 * audit event either chained or queued, every signature's SHA-256 against its canonical content
 * and against its `signature.created` audit event, and, when given, that the chain still holds
 * `expected` (the head a backup or a dossier recorded) at its position.
 */
/** A head recorded elsewhere (a backup manifest, a dossier); the event id is checked when given. */
export type ExpectedHead = { position: number; hash: string; eventId?: string };

export async function verifyAuditChain(connection: Connection, { expected }: { expected?: ExpectedHead | null } = {}): Promise<AuditVerification> {
  return withClient(connection, async (client) => {
    // One snapshot for the whole check, so that a sealer running meanwhile cannot make a
    // consistent chain look broken.
    await client.query("BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY");
    try {
      const result = await verifyInSnapshot(client, expected ?? null);
      await client.query("COMMIT");
      return result;
    } catch (err) {
      await client.query("ROLLBACK").catch(() => undefined);
      throw err;
    }
  });
}

/** The same check inside a transaction the caller holds open (it sees the caller's own changes). */
export function verifyAuditChainInTransaction(client: Client | PoolClient, { expected }: { expected?: ExpectedHead | null } = {}): Promise<AuditVerification> {
  return verifyInSnapshot(client, expected ?? null);
}

async function verifyInSnapshot(client: Client | PoolClient, expected: ExpectedHead | null): Promise<AuditVerification> {
  const walker = new ChainWalker();
  let broken: ChainBreak | null = null;
  let last: ChainHead | null = null;
  let after = 0;
  while (!broken) {
    const { rows } = await client.query<{ position: string; linkEventId: string; prevHash: string; hash: string; id: string | null } & Omit<ChainedEvent, "id">>(
      `SELECT c.position::text AS position, c.event_id::text AS "linkEventId", c.prev_hash AS "prevHash", c.hash, ${EVENT_COLUMNS}
       FROM audit_chain c LEFT JOIN audit_events e ON e.id = c.event_id
       WHERE c.position > $1 ORDER BY c.position LIMIT ${VERIFY_BATCH}`,
      [after],
    );
    for (const row of rows) {
      const link: ChainLink = { position: Number(row.position), eventId: row.linkEventId, prevHash: row.prevHash, hash: row.hash };
      const event: ChainedEvent | null =
        row.id === null
          ? null
          : { id: row.id, at: row.at, actorId: row.actorId, actorLabel: row.actorLabel, action: row.action, entityType: row.entityType, entityId: row.entityId, summary: row.summary, details: row.details };
      broken = walker.next(link, event);
      if (broken) break;
      last = { position: link.position, eventId: link.eventId, hash: link.hash };
    }
    if (rows.length < VERIFY_BATCH) break;
    after = Number(rows[rows.length - 1].position);
  }

  const { rows: counts } = await client.query<{ events: string; pending: string; signatures: string }>(
    `SELECT (SELECT count(*) FROM audit_events)::text AS events,
            (SELECT count(*) FROM audit_chain_pending)::text AS pending,
            (SELECT count(*) FROM signatures)::text AS signatures`,
  );

  if (!broken) {
    // An event neither chained nor queued: its queue entry was removed by hand, or it was
    // written with the trigger switched off.
    const { rows } = await client.query<{ id: string }>(
      `SELECT e.id::text AS id FROM audit_events e
       WHERE NOT EXISTS (SELECT 1 FROM audit_chain c WHERE c.event_id = e.id)
         AND NOT EXISTS (SELECT 1 FROM audit_chain_pending p WHERE p.event_id = e.id)
       ORDER BY e.id LIMIT 1`,
    );
    if (rows.length) broken = { position: null, eventId: rows[0].id, reason: `audit event ${rows[0].id} is neither in the chain nor queued for it` };
  }

  if (!broken) {
    const { rows } = await client.query<{ id: string; versionId: string; canonicalContent: string; hashOk: boolean; eventId: string | null; eventHash: string | null; contentSha256: string }>(
      `SELECT s.id::text AS id, s.version_id::text AS "versionId", s.canonical_content AS "canonicalContent",
              encode(sha256(convert_to(s.canonical_content, 'UTF8')), 'hex') = s.content_sha256 AS "hashOk",
              s.content_sha256 AS "contentSha256",
              e.id::text AS "eventId",
              e.details->>'contentSha256' AS "eventHash"
       FROM signatures s
       LEFT JOIN LATERAL (
         SELECT a.id, a.details FROM audit_events a
         WHERE a.action = 'signature.created' AND a.details->>'signatureId' = s.id::text
         ORDER BY a.id LIMIT 1
       ) e ON true
       ORDER BY s.signed_at, s.id`,
    );
    for (const s of rows) {
      if (!s.hashOk) {
        broken = { position: null, eventId: s.eventId, reason: `signature ${s.id}: its content no longer hashes to its recorded SHA-256` };
        break;
      }
      if (s.eventId !== null && s.eventHash !== s.contentSha256) {
        broken = { position: null, eventId: s.eventId, reason: `signature ${s.id}: its SHA-256 differs from the one audit event ${s.eventId} recorded when it was made` };
        break;
      }
    }
    if (!broken) broken = await versionContentBreak(client, rows);
  }

  if (!broken && expected) {
    const { rows } = await client.query<{ eventId: string; hash: string }>(
      `SELECT event_id::text AS "eventId", hash FROM audit_chain WHERE position = $1`,
      [expected.position],
    );
    if (rows.length === 0 || rows[0].hash !== expected.hash || (expected.eventId !== undefined && rows[0].eventId !== expected.eventId)) {
      broken = {
        position: expected.position,
        eventId: rows[0]?.eventId ?? expected.eventId ?? null,
        reason: `the chain no longer holds the recorded head (position ${expected.position}, hash ${expected.hash.slice(0, 12)}…): it was rewritten`,
      };
    }
  }

  return {
    ok: broken === null,
    links: walker.linksChecked,
    events: Number(counts[0].events),
    pending: Number(counts[0].pending),
    signatures: Number(counts[0].signatures),
    head: last,
    break: broken,
  };
}

/**
 * A signed version's content recomputed from its rows now (db/version-content.ts, the very reading
 * signing used) against the canonical content each of its signatures holds: a limit, model or
 * partition changed behind the database's guards shows here. Versions never change once they
 * leave draft, so every signature of a version covers the same content.
 */
async function versionContentBreak(
  client: Client | PoolClient,
  signed: readonly { id: string; versionId: string; canonicalContent: string; eventId: string | null }[],
): Promise<ChainBreak | null> {
  if (signed.length === 0) return null;
  const orm = drizzle(client, { schema });
  const versionIds = [...new Set(signed.map((s) => s.versionId))];
  const versions = new Map((await orm.select().from(schema.intervalVersions).where(inArray(schema.intervalVersions.id, versionIds))).map((v) => [v.id, v]));
  const analyteIds = [...new Set([...versions.values()].map((v) => v.analyteId))];
  const analytes = new Map((await orm.select().from(schema.analytes).where(inArray(schema.analytes.id, analyteIds))).map((a) => [a.id, a]));
  const now = new Map<string, { text: string; sha256: string }>();
  for (const s of signed) {
    let content = now.get(s.versionId);
    if (!content) {
      const version = versions.get(s.versionId)!;
      content = canonicalContentOf(await canonicalVersionOf(orm, { version, analyte: analytes.get(version.analyteId)! }));
      now.set(s.versionId, content);
    }
    if (content.text !== s.canonicalContent) {
      return {
        position: null,
        eventId: s.eventId,
        reason: `signature ${s.id}: interval version ${s.versionId} no longer holds the content it signed (it now hashes to ${content.sha256})`,
      };
    }
  }
  return null;
}
