CREATE TYPE "public"."exclusion_source" AS ENUM('manual', 'outlier');--> statement-breakpoint
CREATE TYPE "public"."outlier_decision" AS ENUM('exclude', 'keep');--> statement-breakpoint
CREATE TYPE "public"."version_state" AS ENUM('draft', 'awaiting_signoff', 'in_force', 'superseded', 'withdrawn');--> statement-breakpoint
CREATE TABLE "estimates" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"sex" text,
	"age_from" double precision,
	"age_to" double precision,
	"options" jsonb NOT NULL,
	"seed" integer NOT NULL,
	"n" integer NOT NULL,
	"document" jsonb NOT NULL,
	"exclusion_ids" jsonb NOT NULL,
	"upload_hashes" jsonb NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "estimates_sex" CHECK ("estimates"."sex" IS NULL OR "estimates"."sex" IN ('F', 'M')),
	CONSTRAINT "estimates_age_order" CHECK ("estimates"."age_from" IS NULL OR "estimates"."age_to" IS NULL OR "estimates"."age_from" < "estimates"."age_to")
);
--> statement-breakpoint
CREATE TABLE "exclusions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"donor_result_id" bigint NOT NULL,
	"source" "exclusion_source" NOT NULL,
	"rule" text,
	"reason" text NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"undone_by" uuid,
	"undone_at" timestamp with time zone,
	CONSTRAINT "exclusions_reason_given" CHECK (length(btrim("exclusions"."reason")) > 0),
	CONSTRAINT "exclusions_rule_for_outlier" CHECK (("exclusions"."source" = 'outlier') = ("exclusions"."rule" IS NOT NULL)),
	CONSTRAINT "exclusions_undone_pair" CHECK (("exclusions"."undone_at" IS NULL) = ("exclusions"."undone_by" IS NULL))
);
--> statement-breakpoint
CREATE TABLE "interval_partitions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"version_id" uuid NOT NULL,
	"position" integer NOT NULL,
	"sex" text,
	"age_from_days" integer,
	"age_to_days" integer,
	"low" double precision,
	"high" double precision,
	"low_ci_lower" double precision,
	"low_ci_upper" double precision,
	"high_ci_lower" double precision,
	"high_ci_upper" double precision,
	"method" text NOT NULL,
	"n" integer NOT NULL,
	"model" jsonb NOT NULL,
	"estimate_id" uuid,
	CONSTRAINT "interval_partitions_sex" CHECK ("interval_partitions"."sex" IS NULL OR "interval_partitions"."sex" IN ('F', 'M')),
	CONSTRAINT "interval_partitions_age_order" CHECK ("interval_partitions"."age_from_days" IS NULL OR "interval_partitions"."age_to_days" IS NULL OR "interval_partitions"."age_from_days" < "interval_partitions"."age_to_days"),
	CONSTRAINT "interval_partitions_has_limit" CHECK ("interval_partitions"."low" IS NOT NULL OR "interval_partitions"."high" IS NOT NULL),
	CONSTRAINT "interval_partitions_limit_order" CHECK ("interval_partitions"."low" IS NULL OR "interval_partitions"."high" IS NULL OR "interval_partitions"."low" <= "interval_partitions"."high"),
	CONSTRAINT "interval_partitions_method" CHECK ("interval_partitions"."method" IN ('nonparametric', 'parametric', 'robust')),
	CONSTRAINT "interval_partitions_n_positive" CHECK ("interval_partitions"."n" > 0)
);
--> statement-breakpoint
CREATE TABLE "interval_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"analyte_id" uuid NOT NULL,
	"number" integer NOT NULL,
	"state" "version_state" DEFAULT 'draft' NOT NULL,
	"study_id" uuid,
	"unit" text NOT NULL,
	"decimals" integer NOT NULL,
	"critical_low" double precision,
	"critical_high" double precision,
	"note" text,
	"return_comment" text,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_by" uuid,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"submitted_by" uuid,
	"submitted_at" timestamp with time zone,
	"effective_from" timestamp with time zone,
	"effective_to" timestamp with time zone,
	CONSTRAINT "interval_versions_number_positive" CHECK ("interval_versions"."number" > 0),
	CONSTRAINT "interval_versions_critical_order" CHECK ("interval_versions"."critical_low" IS NULL OR "interval_versions"."critical_high" IS NULL OR "interval_versions"."critical_low" < "interval_versions"."critical_high")
);
--> statement-breakpoint
CREATE TABLE "outlier_decisions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"donor_result_id" bigint NOT NULL,
	"decision" "outlier_decision" NOT NULL,
	"rule" text NOT NULL,
	"reason" text NOT NULL,
	"evidence" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"exclusion_id" uuid,
	"decided_by" uuid,
	"decided_at" timestamp with time zone DEFAULT now() NOT NULL,
	"undone_by" uuid,
	"undone_at" timestamp with time zone,
	CONSTRAINT "outlier_decisions_reason_given" CHECK (length(btrim("outlier_decisions"."reason")) > 0),
	CONSTRAINT "outlier_decisions_exclusion_link" CHECK (("outlier_decisions"."decision" = 'exclude') = ("outlier_decisions"."exclusion_id" IS NOT NULL)),
	CONSTRAINT "outlier_decisions_undone_pair" CHECK (("outlier_decisions"."undone_at" IS NULL) = ("outlier_decisions"."undone_by" IS NULL))
);
--> statement-breakpoint
CREATE TABLE "partition_assessments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"request" jsonb NOT NULL,
	"result" jsonb NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "studies" ADD COLUMN "partition_plan" jsonb;--> statement-breakpoint
ALTER TABLE "studies" ADD COLUMN "closed_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "studies" ADD COLUMN "closed_by" uuid;--> statement-breakpoint
ALTER TABLE "estimates" ADD CONSTRAINT "estimates_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "estimates" ADD CONSTRAINT "estimates_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "exclusions" ADD CONSTRAINT "exclusions_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "exclusions" ADD CONSTRAINT "exclusions_donor_result_id_donor_results_id_fk" FOREIGN KEY ("donor_result_id") REFERENCES "public"."donor_results"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "exclusions" ADD CONSTRAINT "exclusions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "exclusions" ADD CONSTRAINT "exclusions_undone_by_users_id_fk" FOREIGN KEY ("undone_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_partitions" ADD CONSTRAINT "interval_partitions_version_id_interval_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."interval_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_partitions" ADD CONSTRAINT "interval_partitions_estimate_id_estimates_id_fk" FOREIGN KEY ("estimate_id") REFERENCES "public"."estimates"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD CONSTRAINT "interval_versions_analyte_id_analytes_id_fk" FOREIGN KEY ("analyte_id") REFERENCES "public"."analytes"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD CONSTRAINT "interval_versions_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD CONSTRAINT "interval_versions_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD CONSTRAINT "interval_versions_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD CONSTRAINT "interval_versions_submitted_by_users_id_fk" FOREIGN KEY ("submitted_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlier_decisions" ADD CONSTRAINT "outlier_decisions_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlier_decisions" ADD CONSTRAINT "outlier_decisions_donor_result_id_donor_results_id_fk" FOREIGN KEY ("donor_result_id") REFERENCES "public"."donor_results"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlier_decisions" ADD CONSTRAINT "outlier_decisions_exclusion_id_exclusions_id_fk" FOREIGN KEY ("exclusion_id") REFERENCES "public"."exclusions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlier_decisions" ADD CONSTRAINT "outlier_decisions_decided_by_users_id_fk" FOREIGN KEY ("decided_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outlier_decisions" ADD CONSTRAINT "outlier_decisions_undone_by_users_id_fk" FOREIGN KEY ("undone_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "partition_assessments" ADD CONSTRAINT "partition_assessments_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "partition_assessments" ADD CONSTRAINT "partition_assessments_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "estimates_study_idx" ON "estimates" USING btree ("study_id","created_at");--> statement-breakpoint
CREATE INDEX "exclusions_study_idx" ON "exclusions" USING btree ("study_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "exclusions_active_unique" ON "exclusions" USING btree ("donor_result_id") WHERE "exclusions"."undone_at" IS NULL;--> statement-breakpoint
CREATE UNIQUE INDEX "interval_partitions_position_unique" ON "interval_partitions" USING btree ("version_id","position");--> statement-breakpoint
CREATE UNIQUE INDEX "interval_versions_number_unique" ON "interval_versions" USING btree ("analyte_id","number");--> statement-breakpoint
CREATE UNIQUE INDEX "interval_versions_one_in_force" ON "interval_versions" USING btree ("analyte_id") WHERE "interval_versions"."state" = 'in_force';--> statement-breakpoint
CREATE INDEX "interval_versions_state_idx" ON "interval_versions" USING btree ("state","analyte_id");--> statement-breakpoint
CREATE INDEX "outlier_decisions_study_idx" ON "outlier_decisions" USING btree ("study_id","decided_at");--> statement-breakpoint
CREATE UNIQUE INDEX "outlier_decisions_active_unique" ON "outlier_decisions" USING btree ("donor_result_id") WHERE "outlier_decisions"."undone_at" IS NULL;--> statement-breakpoint
CREATE INDEX "partition_assessments_study_idx" ON "partition_assessments" USING btree ("study_id","created_at");--> statement-breakpoint
ALTER TABLE "studies" ADD CONSTRAINT "studies_closed_by_users_id_fk" FOREIGN KEY ("closed_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;