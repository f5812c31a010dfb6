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

export const STUDY_STATUSES = ["open", "closed"] as const;
export const studyStatusEnum = pgEnum("study_status", STUDY_STATUSES);

/** One collection of healthy-donor results for one analyte, method and specimen. */
export const studies = pgTable(
  "studies",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    analyteId: uuid("analyte_id")
      .notNull()
      .references(() => analytes.id, { onDelete: "restrict" }),
    title: text("title").notNull(),
    method: text("method"),
    specimen: text("specimen"),
    /** The reference individuals and the exclusion criteria used when recruiting them. */
    criteria: text("criteria"),
    collectedFrom: text("collected_from"),
    collectedTo: text("collected_to"),
    status: studyStatusEnum("status").notNull().default("open"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "restrict" }),
  },
  (t) => [index("studies_analyte_idx").on(t.analyteId), index("studies_created_idx").on(t.createdAt)],
);

export const UPLOAD_STATUSES = ["pending", "committed", "cancelled"] as const;
export const uploadStatusEnum = pgEnum("upload_status", UPLOAD_STATUSES);

/**
 * One uploaded file of a study. While pending, `pendingRows` holds the validated donor rows (so
 * that any instance can commit them); commit or cancel empties it.
 */
export const uploads = pgTable(
  "uploads",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "restrict" }),
    fileName: text("file_name").notNull(),
    sha256: text("sha256").notNull(),
    sizeBytes: integer("size_bytes").notNull(),
    format: text("format").notNull(),
    status: uploadStatusEnum("status").notNull().default("pending"),
    rowsTotal: integer("rows_total").notNull(),
    rowsValid: integer("rows_valid").notNull(),
    rowsInvalid: integer("rows_invalid").notNull(),
    /** The validation report without the rows: problems, mapping, headers. */
    report: jsonb("report").$type<Record<string, unknown>>().notNull(),
    pendingRows: jsonb("pending_rows").$type<unknown[]>(),
    storedRows: integer("stored_rows"),
    uploadedBy: uuid("uploaded_by").references(() => users.id, { onDelete: "restrict" }),
    uploadedAt: timestamp("uploaded_at", { withTimezone: true }).notNull().defaultNow(),
    decidedBy: uuid("decided_by").references(() => users.id, { onDelete: "restrict" }),
    decidedAt: timestamp("decided_at", { withTimezone: true }),
  },
  (t) => [
    index("uploads_study_idx").on(t.studyId, t.uploadedAt),
    uniqueIndex("uploads_committed_sha_unique").on(t.studyId, t.sha256).where(sql`${t.status} = 'committed'`),
    check("uploads_sha256_format", sql`${t.sha256} ~ '^[0-9a-f]{64}$'`),
  ],
);

export const CENSORING_SIDES = ["below", "above"] as const;
export const censoringSideEnum = pgEnum("censoring_side", CENSORING_SIDES);

/** One stored healthy-donor result, from a committed upload. Values are in the analyte's unit. */
export const donorResults = pgTable(
  "donor_results",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "restrict" }),
    uploadId: uuid("upload_id")
      .notNull()
      .references(() => uploads.id, { onDelete: "restrict" }),
    /** Data row in the file, from 1. */
    rowNumber: integer("row_number").notNull(),
    donorCode: text("donor_code").notNull(),
    sex: text("sex").notNull(),
    ageYears: doublePrecision("age_years").notNull(),
    ageDays: integer("age_days").notNull(),
    birthDate: text("birth_date"),
    collectedOn: text("collected_on"),
    value: doublePrecision("value").notNull(),
    censoringSide: censoringSideEnum("censoring_side"),
    censoringInclusive: boolean("censoring_inclusive"),
    originalValue: doublePrecision("original_value"),
    originalUnit: text("original_unit"),
  },
  (t) => [
    index("donor_results_study_idx").on(t.studyId, t.id),
    index("donor_results_upload_idx").on(t.uploadId),
    check("donor_results_sex", sql`${t.sex} IN ('F', 'M')`),
    check("donor_results_censoring", sql`(${t.censoringSide} IS NULL) = (${t.censoringInclusive} IS NULL)`),
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
export type Study = typeof studies.$inferSelect;
export type Upload = typeof uploads.$inferSelect;
export type DonorResult = typeof donorResults.$inferSelect;
