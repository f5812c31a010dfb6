import "server-only";
import { and, asc, eq, gte, isNull, lt, or, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { AppError } from "@/lib/api/errors";
import type { IssuedKey } from "@/lib/lis/keys";
import type { CreateLisConnectionInput, FlagCounts, LisConnectionOut, LisUsageOut, UpdateLisConnectionInput } from "@/lib/lis/input";
import type { Database, Executor } from "../client";
import { analytes, lisConnections, scoreLog, users, type LisConnection } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";

/** What every instance keeps in memory to recognise keys (lib/lis/key-store.ts). */
export interface KeyedConnection {
  id: string;
  name: string;
  keySha256: string;
  ratePerMinute: number;
  revoked: boolean;
}

const keyedColumns = {
  id: lisConnections.id,
  name: lisConnections.name,
  keySha256: lisConnections.keySha256,
  ratePerMinute: lisConnections.ratePerMinute,
  revoked: sql<boolean>`${lisConnections.revokedAt} IS NOT NULL`,
};

/** Every connection, revoked ones included (a revoked key must be told apart from an unknown one). */
export async function listKeyedConnections(executor: Executor): Promise<KeyedConnection[]> {
  return executor.select(keyedColumns).from(lisConnections);
}

export async function findKeyedConnectionByHash(executor: Executor, { keySha256 }: { keySha256: string }): Promise<KeyedConnection | null> {
  const [row] = await executor.select(keyedColumns).from(lisConnections).where(eq(lisConnections.keySha256, keySha256)).limit(1);
  return row ?? null;
}

/**
 * Records when keys were last used: each row only when its stored time is more than a minute
 * older (so several instances together still write at most about once a minute per key).
 */
export async function recordLisConnectionsUsed(executor: Executor, { uses }: { uses: readonly { id: string; at: Date }[] }): Promise<void> {
  for (const { id, at } of uses) {
    await executor
      .update(lisConnections)
      .set({ lastUsedAt: at })
      .where(
        and(
          eq(lisConnections.id, id),
          or(isNull(lisConnections.lastUsedAt), lt(lisConnections.lastUsedAt, new Date(at.getTime() - 60_000))),
        ),
      );
  }
}

const creator = alias(users, "lis_creator");
const revoker = alias(users, "lis_revoker");

const personOf = (id: string | null, name: string | null) => (id && name ? { id, name } : null);

async function selectConnections(executor: Executor, where?: ReturnType<typeof eq>): Promise<LisConnectionOut[]> {
  const rows = await executor
    .select({ c: lisConnections, creatorName: creator.name, revokerName: revoker.name })
    .from(lisConnections)
    .leftJoin(creator, eq(creator.id, lisConnections.createdBy))
    .leftJoin(revoker, eq(revoker.id, lisConnections.revokedBy))
    .where(where)
    .orderBy(sql`${lisConnections.revokedAt} IS NOT NULL`, asc(lisConnections.name), asc(lisConnections.createdAt));
  return rows.map(({ c, creatorName, revokerName }) => connectionOut(c, creatorName, revokerName));
}

function connectionOut(c: LisConnection, creatorName: string | null, revokerName: string | null): LisConnectionOut {
  return {
    id: c.id,
    name: c.name,
    contactEmail: c.contactEmail,
    keyPrefix: c.keyPrefix,
    ratePerMinute: c.ratePerMinute,
    status: c.revokedAt ? "revoked" : "active",
    createdAt: c.createdAt.toISOString(),
    createdBy: personOf(c.createdBy, creatorName),
    updatedAt: c.updatedAt.toISOString(),
    revokedAt: c.revokedAt?.toISOString() ?? null,
    revokedBy: personOf(c.revokedBy, revokerName),
    lastUsedAt: c.lastUsedAt?.toISOString() ?? null,
  };
}

/** Every LIS connection, active ones first, by name. */
export async function listLisConnections(executor: Executor): Promise<LisConnectionOut[]> {
  return selectConnections(executor);
}

export async function getLisConnection(executor: Executor, { id }: { id: string }): Promise<LisConnectionOut> {
  const [row] = await selectConnections(executor, eq(lisConnections.id, id));
  if (!row) throw notFound();
  return row;
}

export async function findLisConnectionByName(executor: Executor, { name }: { name: string }): Promise<LisConnection | undefined> {
  const [row] = await executor.select().from(lisConnections).where(eq(lisConnections.name, name)).orderBy(asc(lisConnections.createdAt)).limit(1);
  return row;
}

const notFound = () => new AppError("not_found", "There is no LIS connection with this id.");

/** Creates a connection holding `issued` (its prefix and hash; the key itself is never stored), audited. */
export async function createLisConnection(
  database: Database,
  { input, issued, actor }: { input: CreateLisConnectionInput; issued: IssuedKey; actor: Actor },
): Promise<LisConnectionOut> {
  const id = await database.transaction(async (tx) => {
    const [created] = await tx
      .insert(lisConnections)
      .values({
        name: input.name,
        contactEmail: input.contactEmail,
        keyPrefix: issued.keyPrefix,
        keySha256: issued.keySha256,
        ...(input.ratePerMinute !== undefined ? { ratePerMinute: input.ratePerMinute } : {}),
        createdBy: actor.id,
      })
      .returning();
    await recordAuditEvent(tx, {
      actor,
      action: "lis_connection.created",
      entityType: "lis_connection",
      entityId: created.id,
      summary: `Created the LIS connection "${created.name}" (key ${created.keyPrefix}…, ${created.ratePerMinute} requests a minute)`,
      details: { name: created.name, contactEmail: created.contactEmail, keyPrefix: created.keyPrefix, ratePerMinute: created.ratePerMinute },
    });
    return created.id;
  });
  return getLisConnection(database, { id });
}

const revokedConflict = (c: LisConnection) =>
  new AppError(
    "conflict",
    `The LIS connection "${c.name}" was revoked on ${c.revokedAt!.toISOString().slice(0, 10)} and can no longer be changed; create a new connection instead.`,
  );

/** Changes what `changes` names on an active connection, audited with each field's before and after. */
export async function updateLisConnection(
  database: Database,
  { id, changes, actor }: { id: string; changes: UpdateLisConnectionInput; actor: Actor },
): Promise<LisConnectionOut> {
  await database.transaction(async (tx) => {
    const [current] = await tx.select().from(lisConnections).where(eq(lisConnections.id, id)).for("update");
    if (!current) throw notFound();
    if (current.revokedAt) throw revokedConflict(current);
    const diff: Record<string, { from: unknown; to: unknown }> = {};
    for (const field of ["name", "contactEmail", "ratePerMinute"] as const) {
      const value = changes[field];
      if (value !== undefined && value !== current[field]) diff[field] = { from: current[field], to: value };
    }
    if (Object.keys(diff).length === 0) return;
    await tx
      .update(lisConnections)
      .set({ ...Object.fromEntries(Object.entries(diff).map(([f, d]) => [f, d.to])), updatedAt: new Date() })
      .where(eq(lisConnections.id, id));
    await recordAuditEvent(tx, {
      actor,
      action: "lis_connection.updated",
      entityType: "lis_connection",
      entityId: id,
      summary: `Changed the LIS connection "${current.name}": ${Object.keys(diff).join(", ")}`,
      details: diff,
    });
  });
  return getLisConnection(database, { id });
}

/** Revokes a connection for good: its key is refused from then on, in every instance. */
export async function revokeLisConnection(database: Database, { id, actor }: { id: string; actor: Actor }): Promise<LisConnectionOut> {
  await database.transaction(async (tx) => {
    const [current] = await tx.select().from(lisConnections).where(eq(lisConnections.id, id)).for("update");
    if (!current) throw notFound();
    if (current.revokedAt) {
      throw new AppError("conflict", `The LIS connection "${current.name}" was already revoked on ${current.revokedAt.toISOString().slice(0, 10)}.`);
    }
    const now = new Date();
    await tx.update(lisConnections).set({ revokedAt: now, revokedBy: actor.id, updatedAt: now }).where(eq(lisConnections.id, id));
    await recordAuditEvent(tx, {
      actor,
      action: "lis_connection.revoked",
      entityType: "lis_connection",
      entityId: id,
      summary: `Revoked the LIS connection "${current.name}" (key ${current.keyPrefix}…)`,
      details: { name: current.name, keyPrefix: current.keyPrefix },
    });
  });
  return getLisConnection(database, { id });
}

/**
 * The demo's connection made to match the demo's variables: created when missing, its key and
 * rate replaced when they differ. Audited as the system. Returns what it did.
 */
export async function ensureDemoLisConnection(
  database: Database,
  { name, contactEmail, issued, ratePerMinute, actor }: { name: string; contactEmail: string; issued: IssuedKey | null; ratePerMinute?: number; actor: Actor },
): Promise<"created" | "updated" | "unchanged"> {
  return database.transaction(async (tx) => {
    const [current] = await tx.select().from(lisConnections).where(eq(lisConnections.name, name)).orderBy(asc(lisConnections.createdAt)).limit(1).for("update");
    if (!current) {
      if (!issued) throw new Error("ensureDemoLisConnection needs a key to create the connection");
      const [created] = await tx
        .insert(lisConnections)
        .values({ name, contactEmail, keyPrefix: issued.keyPrefix, keySha256: issued.keySha256, ...(ratePerMinute ? { ratePerMinute } : {}) })
        .returning();
      await recordAuditEvent(tx, {
        actor,
        action: "lis_connection.created",
        entityType: "lis_connection",
        entityId: created.id,
        summary: `Created the demo's LIS connection "${name}" (key ${created.keyPrefix}…, ${created.ratePerMinute} requests a minute)`,
        details: { name, contactEmail, keyPrefix: created.keyPrefix, ratePerMinute: created.ratePerMinute },
      });
      return "created";
    }
    const set: Partial<LisConnection> = {};
    if (issued && issued.keySha256 !== current.keySha256) Object.assign(set, { keyPrefix: issued.keyPrefix, keySha256: issued.keySha256 });
    if (ratePerMinute && ratePerMinute !== current.ratePerMinute) set.ratePerMinute = ratePerMinute;
    if (Object.keys(set).length === 0) return "unchanged";
    await tx.update(lisConnections).set({ ...set, updatedAt: new Date() }).where(eq(lisConnections.id, current.id));
    await recordAuditEvent(tx, {
      actor,
      action: "lis_connection.updated",
      entityType: "lis_connection",
      entityId: current.id,
      summary: `Matched the demo's LIS connection "${name}" to the demo's settings: ${set.keySha256 ? "a new key" : ""}${set.keySha256 && set.ratePerMinute ? ", " : ""}${set.ratePerMinute ? `${set.ratePerMinute} requests a minute` : ""}`,
      details: { ...(set.keyPrefix ? { keyPrefix: { from: current.keyPrefix, to: set.keyPrefix } } : {}), ...(set.ratePerMinute ? { ratePerMinute: { from: current.ratePerMinute, to: set.ratePerMinute } } : {}) },
    });
    return "updated";
  });
}

const emptyCounts = (): FlagCounts => ({ total: 0, L: 0, N: 0, H: 0, LL: 0, HH: 0 });

/**
 * The admins' usage view: scores logged for each LIS connection over the last 24 hours and 7
 * days, by flag, in total and per analyte (from score_log; nothing about patients is there).
 */
export async function lisUsage(executor: Executor, { now }: { now: Date }): Promise<LisUsageOut> {
  const since7d = new Date(now.getTime() - 7 * 86_400_000);
  const since24h = new Date(now.getTime() - 86_400_000);
  const [connections, rows] = await Promise.all([
    executor
      .select({ id: lisConnections.id, name: lisConnections.name, keyPrefix: lisConnections.keyPrefix, revokedAt: lisConnections.revokedAt })
      .from(lisConnections)
      .orderBy(sql`${lisConnections.revokedAt} IS NOT NULL`, asc(lisConnections.name)),
    executor
      .select({
        callerId: scoreLog.callerId,
        code: analytes.code,
        name: analytes.name,
        flag: scoreLog.flag,
        n7d: sql<number>`count(*)::int`,
        n24h: sql<number>`(count(*) FILTER (WHERE ${scoreLog.scoredAt} >= ${since24h}))::int`,
      })
      .from(scoreLog)
      .innerJoin(analytes, eq(analytes.id, scoreLog.analyteId))
      .where(and(eq(scoreLog.callerKind, "lis"), gte(scoreLog.scoredAt, since7d), lt(scoreLog.scoredAt, now)))
      .groupBy(scoreLog.callerId, analytes.code, analytes.name, scoreLog.flag),
  ]);
  const add = (counts: FlagCounts, flag: string, n: number) => {
    counts.total += n;
    if (flag in counts && flag !== "total") counts[flag as Exclude<keyof FlagCounts, "total">] += n;
  };
  return {
    generatedAt: now.toISOString(),
    connections: connections.map((c) => {
      const last24h = emptyCounts();
      const last7d = emptyCounts();
      const byAnalyte = new Map<string, { code: string; name: string; last24h: FlagCounts; last7d: FlagCounts }>();
      for (const r of rows) {
        if (r.callerId !== c.id) continue;
        let a = byAnalyte.get(r.code);
        if (!a) byAnalyte.set(r.code, (a = { code: r.code, name: r.name, last24h: emptyCounts(), last7d: emptyCounts() }));
        add(a.last24h, r.flag, r.n24h);
        add(a.last7d, r.flag, r.n7d);
        add(last24h, r.flag, r.n24h);
        add(last7d, r.flag, r.n7d);
      }
      return {
        id: c.id,
        name: c.name,
        keyPrefix: c.keyPrefix,
        status: c.revokedAt ? ("revoked" as const) : ("active" as const),
        last24h,
        last7d,
        analytes: [...byAnalyte.values()].sort((x, y) => y.last7d.total - x.last7d.total || x.code.localeCompare(y.code)),
      };
    }),
  };
}
