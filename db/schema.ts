import { relations, sql } from "drizzle-orm";
import {
  type AnyPgColumn,
  bigint,
  bigserial,
  boolean,
  check,
  doublePrecision,
  foreignKey,
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
 * The audit trail's hash chain (drizzle/0013_audit-hash-chain.sql, DEVELOPERS.md "Audit hash
 * chain"): one link per audit event, in the order the events were sealed after their transactions
 * committed. `hash` is the SHA-256 of the RFC 8785 text of {position, prevHash, event} (lib/audit/
 * chain.ts); `prevHash` is the link before's hash, 64 zeros for the first. Append-only like
 * audit_events (triggers refuse UPDATE, DELETE and TRUNCATE).
 */
export const auditChain = pgTable(
  "audit_chain",
  {
    position: bigint("position", { mode: "number" }).primaryKey(),
    eventId: bigint("event_id", { mode: "number" })
      .notNull()
      .references(() => auditEvents.id, { onDelete: "restrict" }),
    prevHash: text("prev_hash").notNull(),
    hash: text("hash").notNull(),
    sealedAt: timestamp("sealed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("audit_chain_event_unique").on(t.eventId),
    check("audit_chain_position_positive", sql`${t.position} > 0`),
    check("audit_chain_hash_format", sql`${t.hash} ~ '^[0-9a-f]{64}$' AND ${t.prevHash} ~ '^[0-9a-f]{64}$'`),
  ],
);

/**
 * Audit events committed but not yet in the chain. A trigger adds each new event's id in the
 * event's own transaction; the sealer (db/audit-chain.ts) links them and removes them here.
 */
export const auditChainPending = pgTable("audit_chain_pending", {
  eventId: bigint("event_id", { mode: "number" })
    .primaryKey()
    .references(() => auditEvents.id, { onDelete: "restrict" }),
});

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

/**
 * What a study estimates: `direct`, limits per partition from healthy donors (CLSI EP28-A3c);
 * `age_curve`, continuous LMS centile curves in age from healthy donors of known exact age
 * (METHODS.md §9); `indirect`, limits per partition from routine results of patients, by
 * truncated maximum likelihood after the IFCC's data cleaning (METHODS.md §8). Set at creation
 * and never changed.
 */
export const STUDY_KINDS = ["direct", "age_curve", "indirect"] as const;
export const studyKindEnum = pgEnum("study_kind", STUDY_KINDS);
export type StudyKind = (typeof STUDY_KINDS)[number];

/** One collection of healthy-donor results for one analyte, method and specimen. */
export const studies = pgTable(
  "studies",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    analyteId: uuid("analyte_id")
      .notNull()
      .references(() => analytes.id, { onDelete: "restrict" }),
    title: text("title").notNull(),
    kind: studyKindEnum("kind").notNull().default("direct"),
    method: text("method"),
    specimen: text("specimen"),
    /** The reference individuals and the exclusion criteria used when recruiting them. */
    criteria: text("criteria"),
    collectedFrom: text("collected_from"),
    collectedTo: text("collected_to"),
    status: studyStatusEnum("status").notNull().default("open"),
    /**
     * The partitions the scientist chose after assessing them: `{sex: boolean, ageBands:
     * [[from, to), …] in years or null}`; null until chosen (one partition of everyone).
     */
    partitionPlan: jsonb("partition_plan").$type<{ sex: boolean; ageBands: [number, number][] | null }>(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "restrict" }),
    closedAt: timestamp("closed_at", { withTimezone: true }),
    closedBy: uuid("closed_by").references(() => users.id, { onDelete: "restrict" }),
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
    // The target of donor_results' (study_id, upload_id) key: a donor result's study is its upload's.
    uniqueIndex("uploads_study_id_unique").on(t.studyId, t.id),
    uniqueIndex("uploads_committed_sha_unique").on(t.studyId, t.sha256).where(sql`${t.status} = 'committed'`),
    check("uploads_sha256_format", sql`${t.sha256} ~ '^[0-9a-f]{64}$'`),
  ],
);

export const CENSORING_SIDES = ["below", "above"] as const;
export const censoringSideEnum = pgEnum("censoring_side", CENSORING_SIDES);

/**
 * One stored healthy-donor result, from a committed upload. Values are in the analyte's unit.
 * An indirect study keeps its routine results here too: `donor_code` holds the pseudonymous
 * patient key (one patient may have many results), `collected_at` the collection date and time,
 * and `setting` and `flags` what the laboratory system recorded; direct and age-curve studies
 * leave those three null.
 * One foreign key, (study_id, upload_id) → uploads (study_id, id), stands for two: the upload
 * exists, and it belongs to the same study (whose existence uploads' own key guarantees).
 * PostgreSQL checks a foreign key row by row, so on a 200,000-row commit each key costs about
 * 0.7 s; one key instead of two keeps the commit well under 3 s (scripts/bench-upload-commit.ts).
 */
export const donorResults = pgTable(
  "donor_results",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    studyId: uuid("study_id").notNull(),
    uploadId: uuid("upload_id").notNull(),
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
    /** Routine results: collection date and time, ISO 8601 local time "YYYY-MM-DDTHH:MM:SS". */
    collectedAt: text("collected_at"),
    /** Routine results: outpatient, inpatient, emergency … as the file gives it. */
    setting: text("setting"),
    /** Routine results: the result's flags (haemolysed, icteric …), in the file's order. */
    flags: jsonb("flags").$type<string[]>(),
  },
  (t) => [
    foreignKey({
      name: "donor_results_upload_fk",
      columns: [t.studyId, t.uploadId],
      foreignColumns: [uploads.studyId, uploads.id],
    }).onDelete("restrict"),
    index("donor_results_study_idx").on(t.studyId, t.id),
    // The donor-results listing's default order: its first pages read 100 index entries, not 200,000 rows.
    index("donor_results_study_row_idx").on(t.studyId, t.rowNumber, t.id),
    index("donor_results_upload_idx").on(t.uploadId),
    check("donor_results_sex", sql`${t.sex} IN ('F', 'M')`),
    check("donor_results_censoring", sql`(${t.censoringSide} IS NULL) = (${t.censoringInclusive} IS NULL)`),
  ],
);

export const EXCLUSION_SOURCES = ["manual", "outlier"] as const;
export const exclusionSourceEnum = pgEnum("exclusion_source", EXCLUSION_SOURCES);

/**
 * A donor result set aside, always with a reason and who did it: by hand ("manual") or by
 * confirming an outlier proposal ("outlier", with the rule that proposed it). Undoing sets
 * `undoneAt` instead of deleting, so the record of what was once excluded stays; at most one
 * exclusion of a donor result is in effect at a time.
 */
export const exclusions = pgTable(
  "exclusions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "restrict" }),
    donorResultId: bigint("donor_result_id", { mode: "number" })
      .notNull()
      .references(() => donorResults.id, { onDelete: "restrict" }),
    source: exclusionSourceEnum("source").notNull(),
    /** The screen that proposed it ("horn", "dixon", "tukey"), for source "outlier". */
    rule: text("rule"),
    reason: text("reason").notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    undoneBy: uuid("undone_by").references(() => users.id, { onDelete: "restrict" }),
    undoneAt: timestamp("undone_at", { withTimezone: true }),
  },
  (t) => [
    index("exclusions_study_idx").on(t.studyId, t.createdAt),
    uniqueIndex("exclusions_active_unique").on(t.donorResultId).where(sql`${t.undoneAt} IS NULL`),
    check("exclusions_reason_given", sql`length(btrim(${t.reason})) > 0`),
    check("exclusions_rule_for_outlier", sql`(${t.source} = 'outlier') = (${t.rule} IS NOT NULL)`),
    check("exclusions_undone_pair", sql`(${t.undoneAt} IS NULL) = (${t.undoneBy} IS NULL)`),
  ],
);

export const OUTLIER_DECISIONS = ["exclude", "keep"] as const;
export const outlierDecisionEnum = pgEnum("outlier_decision", OUTLIER_DECISIONS);

/**
 * The scientist's answer to one outlier proposal: "exclude" (which also creates an exclusion,
 * linked here) or "keep", each with a reason and the screen's evidence as it stood. Undone like
 * an exclusion; at most one decision per donor result is in effect.
 */
export const outlierDecisions = pgTable(
  "outlier_decisions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "restrict" }),
    donorResultId: bigint("donor_result_id", { mode: "number" })
      .notNull()
      .references(() => donorResults.id, { onDelete: "restrict" }),
    decision: outlierDecisionEnum("decision").notNull(),
    rule: text("rule").notNull(),
    reason: text("reason").notNull(),
    /** The screen's statistic and explanation when the decision was taken. */
    evidence: jsonb("evidence").$type<Record<string, unknown>>().notNull().default({}),
    exclusionId: uuid("exclusion_id").references(() => exclusions.id, { onDelete: "restrict" }),
    decidedBy: uuid("decided_by").references(() => users.id, { onDelete: "restrict" }),
    decidedAt: timestamp("decided_at", { withTimezone: true }).notNull().defaultNow(),
    undoneBy: uuid("undone_by").references(() => users.id, { onDelete: "restrict" }),
    undoneAt: timestamp("undone_at", { withTimezone: true }),
  },
  (t) => [
    index("outlier_decisions_study_idx").on(t.studyId, t.decidedAt),
    uniqueIndex("outlier_decisions_active_unique").on(t.donorResultId).where(sql`${t.undoneAt} IS NULL`),
    check("outlier_decisions_reason_given", sql`length(btrim(${t.reason})) > 0`),
    check("outlier_decisions_exclusion_link", sql`(${t.decision} = 'exclude') = (${t.exclusionId} IS NOT NULL)`),
    check("outlier_decisions_undone_pair", sql`(${t.undoneAt} IS NULL) = (${t.undoneBy} IS NULL)`),
  ],
);

/**
 * One run of the partition tests (Harris-Boyd and Lahti) over a study, kept so that the
 * dossier shows what the scientist saw when choosing partitions.
 */
export const partitionAssessments = pgTable(
  "partition_assessments",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "restrict" }),
    /** The request: `{by: "sex"}` or `{by: "age", bands: [[0, 18], [18, 120]]}`. */
    request: jsonb("request").$type<Record<string, unknown>>().notNull(),
    result: jsonb("result").$type<Record<string, unknown>>().notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("partition_assessments_study_idx").on(t.studyId, t.createdAt)],
);

/**
 * The output of the methods for one partition of one study: the estimate document exactly as
 * the engine returned it, with what is needed to compute it again (the partition, the options
 * and seed, the exclusions in effect and the committed uploads' SHA-256).
 */
export const estimates = pgTable(
  "estimates",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "restrict" }),
    /** F, M or null for both. */
    sex: text("sex"),
    /** Half-open age band in years, [ageFrom, ageTo); null for no bound. */
    ageFrom: doublePrecision("age_from"),
    ageTo: doublePrecision("age_to"),
    /** The options as given: `{outliers, transform, seed}`. */
    options: jsonb("options").$type<Record<string, unknown>>().notNull(),
    seed: integer("seed").notNull(),
    n: integer("n").notNull(),
    document: jsonb("document").$type<Record<string, unknown>>().notNull(),
    /** Ids of the exclusions in effect when the estimate was made. */
    exclusionIds: jsonb("exclusion_ids").$type<string[]>().notNull(),
    /** SHA-256 of every committed upload of the study at the time. */
    uploadHashes: jsonb("upload_hashes").$type<string[]>().notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("estimates_study_idx").on(t.studyId, t.createdAt),
    check("estimates_sex", sql`${t.sex} IS NULL OR ${t.sex} IN ('F', 'M')`),
    check("estimates_age_order", sql`${t.ageFrom} IS NULL OR ${t.ageTo} IS NULL OR ${t.ageFrom} < ${t.ageTo}`),
  ],
);

export const VERSION_STATES = ["draft", "awaiting_signoff", "in_force", "superseded", "withdrawn"] as const;
export const versionStateEnum = pgEnum("version_state", VERSION_STATES);

/**
 * The unit of sign-off: numbered per analyte, one or more partitions, its own critical limits.
 * Only a draft is editable. At most one version of an analyte is in force (a unique index, so
 * that two signings at the same moment cannot both succeed).
 */
export const intervalVersions = pgTable(
  "interval_versions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    analyteId: uuid("analyte_id")
      .notNull()
      .references(() => analytes.id, { onDelete: "restrict" }),
    number: integer("number").notNull(),
    state: versionStateEnum("state").notNull().default("draft"),
    studyId: uuid("study_id").references(() => studies.id, { onDelete: "restrict" }),
    /** The analyte's unit and decimals when drafted; the limits are in this unit. */
    unit: text("unit").notNull(),
    decimals: integer("decimals").notNull(),
    criticalLow: doublePrecision("critical_low"),
    criticalHigh: doublePrecision("critical_high"),
    note: text("note"),
    /** The director's comment when the version was last returned to draft. */
    returnComment: text("return_comment"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedBy: uuid("updated_by").references(() => users.id, { onDelete: "restrict" }),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    submittedBy: uuid("submitted_by").references(() => users.id, { onDelete: "restrict" }),
    submittedAt: timestamp("submitted_at", { withTimezone: true }),
    effectiveFrom: timestamp("effective_from", { withTimezone: true }),
    effectiveTo: timestamp("effective_to", { withTimezone: true }),
    /** While in force: when the version is next due for review (its analyte's review period). */
    reviewBy: timestamp("review_by", { withTimezone: true }),
    returnedBy: uuid("returned_by").references(() => users.id, { onDelete: "restrict" }),
    returnedAt: timestamp("returned_at", { withTimezone: true }),
    withdrawnBy: uuid("withdrawn_by").references(() => users.id, { onDelete: "restrict" }),
    withdrawnAt: timestamp("withdrawn_at", { withTimezone: true }),
    withdrawnReason: text("withdrawn_reason"),
    /** For a version drafted from an accepted adoption check rather than a study. */
    adoptionCheckId: uuid("adoption_check_id").references((): AnyPgColumn => adoptionChecks.id, { onDelete: "restrict" }),
  },
  (t) => [
    uniqueIndex("interval_versions_number_unique").on(t.analyteId, t.number),
    uniqueIndex("interval_versions_one_in_force").on(t.analyteId).where(sql`${t.state} = 'in_force'`),
    index("interval_versions_state_idx").on(t.state, t.analyteId),
    check("interval_versions_number_positive", sql`${t.number} > 0`),
    check(
      "interval_versions_critical_order",
      sql`${t.criticalLow} IS NULL OR ${t.criticalHigh} IS NULL OR ${t.criticalLow} < ${t.criticalHigh}`,
    ),
  ],
);

/**
 * The methods of an estimate a partition may take its limits from. The table also allows
 * "adopted": limits taken from an accepted adoption check (scored by zlog, or a flag only), and
 * "lms": LMS age curves from an age-curve study, whose limits depend on the exact age, so the
 * partition's own low and high are null and its model (lib/stats/lms-model.ts) holds the curves;
 * and "indirect": limits by truncated maximum likelihood from an indirect study's routine
 * results, scored by the fitted power-normal (a Box-Cox gaussian).
 */
export const PARTITION_METHODS = ["nonparametric", "parametric", "robust"] as const;

/**
 * One partition of an interval version: who it applies to (sex, half-open age range in days),
 * the limits with their 90% CIs, the method, n, and the scoring model (lib/scoring/model.ts).
 */
export const intervalPartitions = pgTable(
  "interval_partitions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => intervalVersions.id, { onDelete: "restrict" }),
    position: integer("position").notNull(),
    sex: text("sex"),
    /** [ageFromDays, ageToDays); null for no bound. */
    ageFromDays: integer("age_from_days"),
    ageToDays: integer("age_to_days"),
    low: doublePrecision("low"),
    high: doublePrecision("high"),
    lowCiLower: doublePrecision("low_ci_lower"),
    lowCiUpper: doublePrecision("low_ci_upper"),
    highCiLower: doublePrecision("high_ci_lower"),
    highCiUpper: doublePrecision("high_ci_upper"),
    method: text("method").notNull(),
    n: integer("n").notNull(),
    model: jsonb("model").$type<Record<string, unknown>>().notNull(),
    estimateId: uuid("estimate_id").references(() => estimates.id, { onDelete: "restrict" }),
  },
  (t) => [
    uniqueIndex("interval_partitions_position_unique").on(t.versionId, t.position),
    check("interval_partitions_sex", sql`${t.sex} IS NULL OR ${t.sex} IN ('F', 'M')`),
    check(
      "interval_partitions_age_order",
      sql`${t.ageFromDays} IS NULL OR ${t.ageToDays} IS NULL OR ${t.ageFromDays} < ${t.ageToDays}`,
    ),
    check("interval_partitions_has_limit", sql`${t.method} = 'lms' OR ${t.low} IS NOT NULL OR ${t.high} IS NOT NULL`),
    check("interval_partitions_limit_order", sql`${t.low} IS NULL OR ${t.high} IS NULL OR ${t.low} <= ${t.high}`),
    check("interval_partitions_method", sql`${t.method} IN ('nonparametric', 'parametric', 'robust', 'adopted', 'lms', 'indirect')`),
    check("interval_partitions_lms_model", sql`(${t.method} = 'lms') = (${t.model}->>'kind' = 'lms')`),
    check("interval_partitions_n_positive", sql`${t.n} > 0`),
  ],
);

export const SIGNATURE_MEANINGS = ["approved_for_clinical_use", "reviewed_still_valid", "withdrawn_from_use"] as const;
export const signatureMeaningEnum = pgEnum("signature_meaning", SIGNATURE_MEANINGS);

/**
 * An electronic signature on an interval version (21 CFR Part 11 as the design target,
 * METHODS.md §12): who, when, what it means, and the SHA-256 of the version's canonical content
 * (RFC 8785), which is kept beside it so that anyone can recompute the hash. Append-only: the
 * app role may only SELECT and INSERT (db/grants.sql).
 */
export const signatures = pgTable(
  "signatures",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => intervalVersions.id, { onDelete: "restrict" }),
    signerId: uuid("signer_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    /** The signer's printed name at the moment of signing (§11.50). */
    signerName: text("signer_name").notNull(),
    signerRole: roleEnum("signer_role").notNull(),
    meaning: signatureMeaningEnum("meaning").notNull(),
    comment: text("comment"),
    /** The RFC 8785 serialisation that was hashed. */
    canonicalContent: text("canonical_content").notNull(),
    contentSha256: text("content_sha256").notNull(),
    signedAt: timestamp("signed_at", { withTimezone: true }).notNull().defaultNow(),
    /** The next-auth session the signature was made in (first signing asks for e-mail too). */
    sessionId: text("session_id"),
  },
  (t) => [
    index("signatures_version_idx").on(t.versionId, t.signedAt),
    index("signatures_session_idx").on(t.sessionId, t.signerId),
    check("signatures_sha256_format", sql`${t.contentSha256} ~ '^[0-9a-f]{64}$'`),
  ],
);

/**
 * Failed signing attempts of one account (wrong password or e-mail at a signature). Past the
 * limit signing is locked for the account and the admins are alerted.
 */
export const signingFailures = pgTable("signing_failures", {
  userId: uuid("user_id")
    .primaryKey()
    .references(() => users.id, { onDelete: "restrict" }),
  failures: integer("failures").notNull(),
  lastFailureAt: timestamp("last_failure_at", { withTimezone: true }).notNull(),
  lockedAt: timestamp("locked_at", { withTimezone: true }),
});

export const OUTBOX_STATUSES = ["queued", "sent", "failed"] as const;
export const outboxStatusEnum = pgEnum("outbox_status", OUTBOX_STATUSES);

/**
 * E-mail queued in the same transaction as the change it reports, delivered afterwards through
 * the provider with retries: a provider failure never loses the change or the message.
 */
export const outbox = pgTable(
  "outbox",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    /** What the message is about: "version.submitted", "version.returned", "signing.locked", … */
    kind: text("kind").notNull(),
    recipients: jsonb("recipients").$type<string[]>().notNull(),
    subject: text("subject").notNull(),
    text: text("text").notNull(),
    html: text("html"),
    entityType: text("entity_type"),
    entityId: text("entity_id"),
    status: outboxStatusEnum("status").notNull().default("queued"),
    attempts: integer("attempts").notNull().default(0),
    nextAttemptAt: timestamp("next_attempt_at", { withTimezone: true }).notNull().defaultNow(),
    lastError: text("last_error"),
    providerId: text("provider_id"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    sentAt: timestamp("sent_at", { withTimezone: true }),
  },
  (t) => [
    index("outbox_due_idx").on(t.status, t.nextAttemptAt),
    index("outbox_created_idx").on(t.createdAt),
    index("outbox_entity_idx").on(t.entityType, t.entityId),
  ],
);

export const ADOPTION_DECISIONS = ["accepted", "second_set_needed", "not_verified"] as const;
export const adoptionDecisionEnum = pgEnum("adoption_decision", ADOPTION_DECISIONS);

/**
 * A verification of an interval the laboratory did not establish itself (CLSI EP28-A3c, 20
 * local healthy-donor values, a second 20 when the first set is borderline). The values are kept
 * as the check's evidence; the policy's thresholds are stored with their source.
 */
export const adoptionChecks = pgTable(
  "adoption_checks",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    analyteId: uuid("analyte_id")
      .notNull()
      .references(() => analytes.id, { onDelete: "restrict" }),
    sex: text("sex"),
    lower: doublePrecision("lower"),
    upper: doublePrecision("upper"),
    /** Where the interval comes from: a manufacturer's insert, a publication. */
    source: text("source").notNull(),
    firstValues: jsonb("first_values").$type<number[]>().notNull(),
    secondValues: jsonb("second_values").$type<number[]>(),
    /** The thresholds applied and their source. */
    policy: jsonb("policy").$type<Record<string, unknown>>().notNull(),
    decision: adoptionDecisionEnum("decision").notNull(),
    /** The counts and the binomial reasoning of each set. */
    reasoning: jsonb("reasoning").$type<Record<string, unknown>>().notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("adoption_checks_analyte_idx").on(t.analyteId, t.createdAt),
    check("adoption_checks_sex", sql`${t.sex} IS NULL OR ${t.sex} IN ('F', 'M')`),
    check("adoption_checks_has_limit", sql`${t.lower} IS NOT NULL OR ${t.upper} IS NOT NULL`),
    check("adoption_checks_limit_order", sql`${t.lower} IS NULL OR ${t.upper} IS NULL OR ${t.lower} < ${t.upper}`),
  ],
);

/**
 * A laboratory information system allowed to call the scoring API with a key. Only the key's
 * SHA-256 and a short prefix (for recognition in lists and logs) are stored: the key itself is
 * shown once, at creation. A 128-bit random secret needs no slow password hash.
 */
export const lisConnections = pgTable(
  "lis_connections",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    name: text("name").notNull(),
    contactEmail: text("contact_email").notNull(),
    /** The key's first characters, e.g. "bwk_3f9a1c0d", shown beside the name. */
    keyPrefix: text("key_prefix").notNull(),
    /** Lower-case hex SHA-256 of the whole key. */
    keySha256: text("key_sha256").notNull(),
    /** Requests a minute this connection may make (all instances together). */
    ratePerMinute: integer("rate_per_minute").notNull().default(6000),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    revokedBy: uuid("revoked_by").references(() => users.id, { onDelete: "restrict" }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    /** Written at most once a minute per key, from memory, not on every request. */
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
  },
  (t) => [
    uniqueIndex("lis_connections_key_sha256_unique").on(t.keySha256),
    uniqueIndex("lis_connections_key_prefix_unique").on(t.keyPrefix),
    check("lis_connections_key_sha256_format", sql`${t.keySha256} ~ '^[0-9a-f]{64}$'`),
    check("lis_connections_rate_range", sql`${t.ratePerMinute} BETWEEN 1 AND 10000000`),
    check("lis_connections_revoked_pair", sql`${t.revokedBy} IS NULL OR ${t.revokedAt} IS NOT NULL`),
  ],
);

/**
 * The de-identified score log: one row per scored value, with no patient identifier (no name,
 * no birth date, no record number; the value, the partition that applied and the caller only).
 * It feeds the sign-off impact figures and the admins' usage view. Written in batches from
 * memory (lib/score-service), so rows may arrive a moment after the score; no foreign keys, so
 * that the batch COPY stays cheap; the ids point at analytes, versions and partitions that are
 * never deleted once in force.
 */
export const scoreLog = pgTable(
  "score_log",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    scoredAt: timestamp("scored_at", { withTimezone: true }).notNull(),
    analyteId: uuid("analyte_id").notNull(),
    versionId: uuid("version_id").notNull(),
    partitionId: uuid("partition_id").notNull(),
    /** The value in the version's unit (after any conversion), as scored. */
    value: doublePrecision("value").notNull(),
    /** "<" or ">" for a censored value. */
    censored: text("censored"),
    flag: text("flag").notNull(),
    z: doublePrecision("z"),
    percentile: doublePrecision("percentile"),
    /** "user" or "lis", and the user's or LIS connection's id. */
    callerKind: text("caller_kind").notNull(),
    callerId: uuid("caller_id").notNull(),
    /** "app" (the score page), "api" (POST /api/v1/scores) or "fhir". */
    channel: text("channel").notNull(),
  },
  (t) => [
    index("score_log_analyte_time_idx").on(t.analyteId, t.scoredAt),
    index("score_log_caller_time_idx").on(t.callerId, t.scoredAt),
    index("score_log_time_idx").on(t.scoredAt),
    check("score_log_caller_kind", sql`${t.callerKind} IN ('user', 'lis')`),
    check("score_log_channel", sql`${t.channel} IN ('app', 'api', 'fhir')`),
    check("score_log_censored", sql`${t.censored} IS NULL OR ${t.censored} IN ('<', '>')`),
  ],
);

/**
 * Each app instance's count of requests per LIS connection in the current minute, written in the
 * background (never on a request) so that instances behind one load balancer share one limit.
 */
export const rateLimitCounts = pgTable(
  "rate_limit_counts",
  {
    connectionId: uuid("connection_id").notNull(),
    windowStart: timestamp("window_start", { withTimezone: true }).notNull(),
    instanceId: text("instance_id").notNull(),
    count: integer("count").notNull(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    primaryKey({ columns: [t.connectionId, t.windowStart, t.instanceId] }),
    index("rate_limit_counts_window_idx").on(t.windowStart),
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
export type Exclusion = typeof exclusions.$inferSelect;
export type OutlierDecision = typeof outlierDecisions.$inferSelect;
export type PartitionAssessment = typeof partitionAssessments.$inferSelect;
export type Estimate = typeof estimates.$inferSelect;
export type IntervalVersion = typeof intervalVersions.$inferSelect;
export type IntervalPartition = typeof intervalPartitions.$inferSelect;
export type VersionState = (typeof VERSION_STATES)[number];
export type Signature = typeof signatures.$inferSelect;
export type SignatureMeaning = (typeof SIGNATURE_MEANINGS)[number];
export type OutboxMessage = typeof outbox.$inferSelect;
export type AdoptionCheck = typeof adoptionChecks.$inferSelect;
export type LisConnection = typeof lisConnections.$inferSelect;
export type ScoreLogRow = typeof scoreLog.$inferSelect;
