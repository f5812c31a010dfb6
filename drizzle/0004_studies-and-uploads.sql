CREATE TYPE "public"."censoring_side" AS ENUM('below', 'above');--> statement-breakpoint
CREATE TYPE "public"."study_status" AS ENUM('open', 'closed');--> statement-breakpoint
CREATE TYPE "public"."upload_status" AS ENUM('pending', 'committed', 'cancelled');--> statement-breakpoint
CREATE TABLE "donor_results" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"study_id" uuid NOT NULL,
	"upload_id" uuid NOT NULL,
	"row_number" integer NOT NULL,
	"donor_code" text NOT NULL,
	"sex" text NOT NULL,
	"age_years" double precision NOT NULL,
	"age_days" integer NOT NULL,
	"birth_date" text,
	"collected_on" text,
	"value" double precision NOT NULL,
	"censoring_side" "censoring_side",
	"censoring_inclusive" boolean,
	"original_value" double precision,
	"original_unit" text,
	CONSTRAINT "donor_results_sex" CHECK ("donor_results"."sex" IN ('F', 'M')),
	CONSTRAINT "donor_results_censoring" CHECK (("donor_results"."censoring_side" IS NULL) = ("donor_results"."censoring_inclusive" IS NULL))
);
--> statement-breakpoint
CREATE TABLE "studies" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"analyte_id" uuid NOT NULL,
	"title" text NOT NULL,
	"method" text,
	"specimen" text,
	"criteria" text,
	"collected_from" text,
	"collected_to" text,
	"status" "study_status" DEFAULT 'open' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"created_by" uuid
);
--> statement-breakpoint
CREATE TABLE "uploads" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"file_name" text NOT NULL,
	"sha256" text NOT NULL,
	"size_bytes" integer NOT NULL,
	"format" text NOT NULL,
	"status" "upload_status" DEFAULT 'pending' NOT NULL,
	"rows_total" integer NOT NULL,
	"rows_valid" integer NOT NULL,
	"rows_invalid" integer NOT NULL,
	"report" jsonb NOT NULL,
	"pending_rows" jsonb,
	"stored_rows" integer,
	"uploaded_by" uuid,
	"uploaded_at" timestamp with time zone DEFAULT now() NOT NULL,
	"decided_by" uuid,
	"decided_at" timestamp with time zone,
	CONSTRAINT "uploads_sha256_format" CHECK ("uploads"."sha256" ~ '^[0-9a-f]{64}$')
);
--> statement-breakpoint
ALTER TABLE "donor_results" ADD CONSTRAINT "donor_results_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "donor_results" ADD CONSTRAINT "donor_results_upload_id_uploads_id_fk" FOREIGN KEY ("upload_id") REFERENCES "public"."uploads"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "studies" ADD CONSTRAINT "studies_analyte_id_analytes_id_fk" FOREIGN KEY ("analyte_id") REFERENCES "public"."analytes"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "studies" ADD CONSTRAINT "studies_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "uploads" ADD CONSTRAINT "uploads_decided_by_users_id_fk" FOREIGN KEY ("decided_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "donor_results_study_idx" ON "donor_results" USING btree ("study_id","id");--> statement-breakpoint
CREATE INDEX "donor_results_upload_idx" ON "donor_results" USING btree ("upload_id");--> statement-breakpoint
CREATE INDEX "studies_analyte_idx" ON "studies" USING btree ("analyte_id");--> statement-breakpoint
CREATE INDEX "studies_created_idx" ON "studies" USING btree ("created_at");--> statement-breakpoint
CREATE INDEX "uploads_study_idx" ON "uploads" USING btree ("study_id","uploaded_at");--> statement-breakpoint
CREATE UNIQUE INDEX "uploads_committed_sha_unique" ON "uploads" USING btree ("study_id","sha256") WHERE "uploads"."status" = 'committed';