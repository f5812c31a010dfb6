import "server-only";
import { and, desc, eq, gte, ilike, lt, or, sql, type SQL } from "drizzle-orm";
import type { Executor } from "../client";
import type { ChainHead } from "@/lib/audit/chain";
import { auditChain, auditEvents } from "../schema";

/** Who did something: a user (id and e-mail), or the system itself (seed, migrations). */
export interface Actor {
  id: string | null;
  label: string;
}

export const SYSTEM_ACTOR: Actor = { id: null, label: "system" };

export interface AuditInput {
  actor: Actor;
  action: string;
  entityType: string;
  entityId?: string | null;
  summary: string;
  details?: Record<string, unknown>;
}

export async function recordAuditEvent(executor: Executor, input: AuditInput): Promise<void> {
  await executor.insert(auditEvents).values({
    actorId: input.actor.id,
    actorLabel: input.actor.label,
    action: input.action,
    entityType: input.entityType,
    entityId: input.entityId ?? null,
    summary: input.summary,
    details: input.details ?? {},
  });
}

export interface AuditFilter {
  /** Part of the actor's e-mail or label. */
  actor?: string;
  action?: string;
  entityType?: string;
  /** Inclusive start and exclusive end, as dates. */
  from?: Date;
  to?: Date;
  /** Free text in the summary or entity id. */
  text?: string;
}

function whereOf(filter: AuditFilter): SQL | undefined {
  const parts: SQL[] = [];
  if (filter.actor) parts.push(ilike(auditEvents.actorLabel, `%${escapeLike(filter.actor)}%`));
  if (filter.action) parts.push(eq(auditEvents.action, filter.action));
  if (filter.entityType) parts.push(eq(auditEvents.entityType, filter.entityType));
  if (filter.from) parts.push(gte(auditEvents.at, filter.from));
  if (filter.to) parts.push(lt(auditEvents.at, filter.to));
  if (filter.text) {
    const pattern = `%${escapeLike(filter.text)}%`;
    parts.push(or(ilike(auditEvents.summary, pattern), ilike(auditEvents.entityId, pattern))!);
  }
  return parts.length ? and(...parts) : undefined;
}

function escapeLike(s: string): string {
  return s.replace(/[\\%_]/g, (c) => `\\${c}`);
}

export async function listAuditEvents(
  executor: Executor,
  { filter, limit, offset }: { filter: AuditFilter; limit: number; offset: number },
) {
  const where = whereOf(filter);
  const [rows, [{ total }]] = await Promise.all([
    executor
      .select()
      .from(auditEvents)
      .where(where)
      .orderBy(desc(auditEvents.at), desc(auditEvents.id))
      .limit(limit)
      .offset(offset),
    executor.select({ total: sql<number>`count(*)::int` }).from(auditEvents).where(where),
  ]);
  return { rows, total };
}

/** The distinct actions and entity types present, for the filter menus. */
export async function listAuditVocabulary(executor: Executor) {
  const [actions, entityTypes] = await Promise.all([
    executor.selectDistinct({ value: auditEvents.action }).from(auditEvents).orderBy(auditEvents.action),
    executor.selectDistinct({ value: auditEvents.entityType }).from(auditEvents).orderBy(auditEvents.entityType),
  ]);
  return { actions: actions.map((a) => a.value), entityTypes: entityTypes.map((e) => e.value) };
}

/**
 * The audit chain's newest link (db/audit-chain.ts seals events into it after they commit), read
 * in the caller's snapshot: what a dossier or a printed record carries, so that a trail rewritten
 * afterwards fails `bellwether verify-audit --head POSITION:HASH`. Null while the chain is empty.
 */
export async function readAuditChainHead(executor: Executor): Promise<ChainHead | null> {
  const [row] = await executor
    .select({ position: auditChain.position, eventId: sql<string>`${auditChain.eventId}::text`, hash: auditChain.hash })
    .from(auditChain)
    .orderBy(desc(auditChain.position))
    .limit(1);
  return row ?? null;
}
