import { relations, sql } from "drizzle-orm";
import {
  bigserial,
  boolean,
  check,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";

export const ROLES = ["admin", "director", "scientist", "clinician"] as const;
export const roleEnum = pgEnum("user_role", ROLES);

/** The one laboratory this installation serves. */
export const laboratory = pgTable(
  "laboratory",
  {
    id: integer("id").primaryKey().default(1),
    name: text("name").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [check("laboratory_single_row", sql`${t.id} = 1`)],
);

export const users = pgTable(
  "users",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    email: text("email").notNull(),
    name: text("name").notNull(),
    role: roleEnum("role").notNull(),
    passwordHash: text("password_hash").notNull(),
    active: boolean("active").notNull().default(true),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    deactivatedAt: timestamp("deactivated_at", { withTimezone: true }),
    lastSignInAt: timestamp("last_sign_in_at", { withTimezone: true }),
    /**
     * Carried in the session token at sign-in and compared on every request: raising it (password
     * change or reset, role change, deactivation) ends every session signed in before.
     */
    sessionVersion: integer("session_version").notNull().default(1),
    /** Set when an administrator chose the password: the person must replace it before anything else. */
    mustChangePassword: boolean("must_change_password").notNull().default(false),
  },
  (t) => [
    uniqueIndex("users_email_unique").on(sql`lower(${t.email})`),
    check("users_email_lowercase", sql`${t.email} = lower(${t.email})`),
  ],
);

/**
 * Failed sign-ins from one client address (IPv4 address or IPv6 /64), whatever the e-mail: the
 * per-address limit against trying many accounts. `failures` counts charged attempts within the
 * window; a successful sign-in gives its own charge back.
 */
export const signInAddressFailures = pgTable(
  "sign_in_address_failures",
  {
    address: text("address").primaryKey(),
    failures: integer("failures").notNull(),
    lastFailureAt: timestamp("last_failure_at", { withTimezone: true }).notNull(),
    blockedUntil: timestamp("blocked_until", { withTimezone: true }),
  },
  (t) => [index("sign_in_address_failures_last_idx").on(t.lastFailureAt)],
);

/**
 * Failed sign-ins for one e-mail from one client address: the increasing wait. Keyed by both, so
 * that failures from one address never keep the person out from another.
 */
export const signInAccountFailures = pgTable(
  "sign_in_account_failures",
  {
    email: text("email").notNull(),
    address: text("address").notNull(),
    failures: integer("failures").notNull(),
    lastFailureAt: timestamp("last_failure_at", { withTimezone: true }).notNull(),
    blockedUntil: timestamp("blocked_until", { withTimezone: true }),
  },
  (t) => [primaryKey({ columns: [t.email, t.address] }), index("sign_in_account_failures_last_idx").on(t.lastFailureAt)],
);

/**
 * Append-only record of who did what. A trigger in the migrations rejects UPDATE, DELETE and
 * TRUNCATE, so not even the application can rewrite history.
 */
export const auditEvents = pgTable(
  "audit_events",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "restrict" }),
    actorLabel: text("actor_label").notNull(),
    action: text("action").notNull(),
    entityType: text("entity_type").notNull(),
    entityId: text("entity_id"),
    summary: text("summary").notNull(),
    details: jsonb("details").$type<Record<string, unknown>>().notNull().default({}),
  },
  (t) => [
    index("audit_events_at_idx").on(t.at),
    index("audit_events_actor_idx").on(t.actorId, t.at),
    index("audit_events_action_idx").on(t.action, t.at),
    index("audit_events_entity_idx").on(t.entityType, t.entityId),
  ],
);

/**
 * The analyte catalogue: what the laboratory measures, in which UCUM unit, shown with how many
 * decimals. Our own `code` is the key the API and the LIS use. The unit and decimals lock once an
 * interval version beyond draft exists (lib/analytes/unit-lock.ts holds that rule).
 */
export const analytes = pgTable(
  "analytes",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    code: text("code").notNull(),
    name: text("name").notNull(),
    loinc: text("loinc"),
    /** A UCUM code, case-sensitive as UCUM requires (mg/dL, mmol/L, 10*9/L). */
    unit: text("unit").notNull(),
    decimals: integer("decimals").notNull(),
    specimen: text("specimen").notNull(),
    /** Default critical (panic) limits in the analyte's unit; an interval version carries its own. */
    criticalLow: doublePrecision("critical_low"),
    criticalHigh: doublePrecision("critical_high"),
    reviewMonths: integer("review_months").notNull().default(24),
    /** g/mol, for mass ↔ substance conversion, with the source it was taken from (METHODS.md §11). */
    molarMass: doublePrecision("molar_mass"),
    molarMassSource: text("molar_mass_source"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "restrict" }),
    updatedBy: uuid("updated_by").references(() => users.id, { onDelete: "restrict" }),
  },
  (t) => [
    uniqueIndex("analytes_code_unique").on(t.code),
    check("analytes_code_format", sql`${t.code} ~ '^[A-Z0-9]{1,16}$'`),
    check("analytes_loinc_format", sql`${t.loinc} IS NULL OR ${t.loinc} ~ '^[0-9]{1,7}-[0-9]$'`),
    check("analytes_decimals_range", sql`${t.decimals} BETWEEN 0 AND 6`),
    check("analytes_review_months_range", sql`${t.reviewMonths} BETWEEN 1 AND 120`),
    check(
      "analytes_critical_order",
      sql`${t.criticalLow} IS NULL OR ${t.criticalHigh} IS NULL OR ${t.criticalLow} < ${t.criticalHigh}`,
    ),
    check("analytes_molar_mass_positive", sql`${t.molarMass} IS NULL OR ${t.molarMass} > 0`),
    check("analytes_molar_mass_sourced", sql`(${t.molarMass} IS NULL) = (${t.molarMassSource} IS NULL)`),
  ],
);

export const usersRelations = relations(users, ({ many }) => ({
  auditEvents: many(auditEvents),
}));

export const auditEventsRelations = relations(auditEvents, ({ one }) => ({
  actor: one(users, { fields: [auditEvents.actorId], references: [users.id] }),
}));

export type Role = (typeof ROLES)[number];
export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;
export type AuditEvent = typeof auditEvents.$inferSelect;
export type Analyte = typeof analytes.$inferSelect;
