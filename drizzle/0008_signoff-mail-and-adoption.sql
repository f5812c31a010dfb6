CREATE TYPE "public"."adoption_decision" AS ENUM('accepted', 'second_set_needed', 'not_verified');--> statement-breakpoint
CREATE TYPE "public"."outbox_status" AS ENUM('queued', 'sent', 'failed');--> statement-breakpoint
CREATE TYPE "public"."signature_meaning" AS ENUM('approved_for_clinical_use', 'reviewed_still_valid', 'withdrawn_from_use');--> statement-breakpoint
CREATE TABLE "adoption_checks" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"analyte_id" uuid NOT NULL,
	"sex" text,
	"lower" double precision,
	"upper" double precision,
	"source" text NOT NULL,
	"first_values" jsonb NOT NULL,
	"second_values" jsonb,
	"policy" jsonb NOT NULL,
	"decision" "adoption_decision" NOT NULL,
	"reasoning" jsonb NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "adoption_checks_sex" CHECK ("adoption_checks"."sex" IS NULL OR "adoption_checks"."sex" IN ('F', 'M')),
	CONSTRAINT "adoption_checks_has_limit" CHECK ("adoption_checks"."lower" IS NOT NULL OR "adoption_checks"."upper" IS NOT NULL),
	CONSTRAINT "adoption_checks_limit_order" CHECK ("adoption_checks"."lower" IS NULL OR "adoption_checks"."upper" IS NULL OR "adoption_checks"."lower" < "adoption_checks"."upper")
);
--> statement-breakpoint
CREATE TABLE "outbox" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"kind" text NOT NULL,
	"recipients" jsonb NOT NULL,
	"subject" text NOT NULL,
	"text" text NOT NULL,
	"html" text,
	"entity_type" text,
	"entity_id" text,
	"status" "outbox_status" DEFAULT 'queued' NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"next_attempt_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_error" text,
	"provider_id" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"sent_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "signatures" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"version_id" uuid NOT NULL,
	"signer_id" uuid NOT NULL,
	"signer_name" text NOT NULL,
	"signer_role" "user_role" NOT NULL,
	"meaning" "signature_meaning" NOT NULL,
	"comment" text,
	"canonical_content" text NOT NULL,
	"content_sha256" text NOT NULL,
	"signed_at" timestamp with time zone DEFAULT now() NOT NULL,
	"session_id" text,
	CONSTRAINT "signatures_sha256_format" CHECK ("signatures"."content_sha256" ~ '^[0-9a-f]{64}$')
);
--> statement-breakpoint
CREATE TABLE "signing_failures" (
	"user_id" uuid PRIMARY KEY NOT NULL,
	"failures" integer NOT NULL,
	"last_failure_at" timestamp with time zone NOT NULL,
	"locked_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "interval_partitions" DROP CONSTRAINT "interval_partitions_method";--> statement-breakpoint
ALTER TABLE "interval_versions" ADD COLUMN "review_by" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD COLUMN "returned_by" uuid;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD COLUMN "returned_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD COLUMN "withdrawn_by" uuid;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD COLUMN "withdrawn_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD COLUMN "withdrawn_reason" text;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD COLUMN "adoption_check_id" uuid;--> statement-breakpoint
ALTER TABLE "adoption_checks" ADD CONSTRAINT "adoption_checks_analyte_id_analytes_id_fk" FOREIGN KEY ("analyte_id") REFERENCES "public"."analytes"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "adoption_checks" ADD CONSTRAINT "adoption_checks_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signatures" ADD CONSTRAINT "signatures_version_id_interval_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."interval_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signatures" ADD CONSTRAINT "signatures_signer_id_users_id_fk" FOREIGN KEY ("signer_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "signing_failures" ADD CONSTRAINT "signing_failures_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "adoption_checks_analyte_idx" ON "adoption_checks" USING btree ("analyte_id","created_at");--> statement-breakpoint
CREATE INDEX "outbox_due_idx" ON "outbox" USING btree ("status","next_attempt_at");--> statement-breakpoint
CREATE INDEX "outbox_created_idx" ON "outbox" USING btree ("created_at");--> statement-breakpoint
CREATE INDEX "outbox_entity_idx" ON "outbox" USING btree ("entity_type","entity_id");--> statement-breakpoint
CREATE INDEX "signatures_version_idx" ON "signatures" USING btree ("version_id","signed_at");--> statement-breakpoint
CREATE INDEX "signatures_session_idx" ON "signatures" USING btree ("session_id","signer_id");--> statement-breakpoint
ALTER TABLE "interval_versions" ADD CONSTRAINT "interval_versions_returned_by_users_id_fk" FOREIGN KEY ("returned_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD CONSTRAINT "interval_versions_withdrawn_by_users_id_fk" FOREIGN KEY ("withdrawn_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_versions" ADD CONSTRAINT "interval_versions_adoption_check_id_adoption_checks_id_fk" FOREIGN KEY ("adoption_check_id") REFERENCES "public"."adoption_checks"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "interval_partitions" ADD CONSTRAINT "interval_partitions_method" CHECK ("interval_partitions"."method" IN ('nonparametric', 'parametric', 'robust', 'adopted'));