CREATE TABLE "lis_connections" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"name" text NOT NULL,
	"contact_email" text NOT NULL,
	"key_prefix" text NOT NULL,
	"key_sha256" text NOT NULL,
	"rate_per_minute" integer DEFAULT 6000 NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revoked_by" uuid,
	"revoked_at" timestamp with time zone,
	"last_used_at" timestamp with time zone,
	CONSTRAINT "lis_connections_key_sha256_format" CHECK ("lis_connections"."key_sha256" ~ '^[0-9a-f]{64}$'),
	CONSTRAINT "lis_connections_rate_range" CHECK ("lis_connections"."rate_per_minute" BETWEEN 1 AND 10000000),
	CONSTRAINT "lis_connections_revoked_pair" CHECK ("lis_connections"."revoked_by" IS NULL OR "lis_connections"."revoked_at" IS NOT NULL)
);
--> statement-breakpoint
CREATE TABLE "rate_limit_counts" (
	"connection_id" uuid NOT NULL,
	"window_start" timestamp with time zone NOT NULL,
	"instance_id" text NOT NULL,
	"count" integer NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "rate_limit_counts_connection_id_window_start_instance_id_pk" PRIMARY KEY("connection_id","window_start","instance_id")
);
--> statement-breakpoint
CREATE TABLE "score_log" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"scored_at" timestamp with time zone NOT NULL,
	"analyte_id" uuid NOT NULL,
	"version_id" uuid NOT NULL,
	"partition_id" uuid NOT NULL,
	"value" double precision NOT NULL,
	"censored" text,
	"flag" text NOT NULL,
	"z" double precision,
	"percentile" double precision,
	"caller_kind" text NOT NULL,
	"caller_id" uuid NOT NULL,
	"channel" text NOT NULL,
	CONSTRAINT "score_log_caller_kind" CHECK ("score_log"."caller_kind" IN ('user', 'lis')),
	CONSTRAINT "score_log_channel" CHECK ("score_log"."channel" IN ('app', 'api', 'fhir')),
	CONSTRAINT "score_log_censored" CHECK ("score_log"."censored" IS NULL OR "score_log"."censored" IN ('<', '>'))
);
--> statement-breakpoint
ALTER TABLE "lis_connections" ADD CONSTRAINT "lis_connections_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lis_connections" ADD CONSTRAINT "lis_connections_revoked_by_users_id_fk" FOREIGN KEY ("revoked_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "lis_connections_key_sha256_unique" ON "lis_connections" USING btree ("key_sha256");--> statement-breakpoint
CREATE UNIQUE INDEX "lis_connections_key_prefix_unique" ON "lis_connections" USING btree ("key_prefix");--> statement-breakpoint
CREATE INDEX "rate_limit_counts_window_idx" ON "rate_limit_counts" USING btree ("window_start");--> statement-breakpoint
CREATE INDEX "score_log_analyte_time_idx" ON "score_log" USING btree ("analyte_id","scored_at");--> statement-breakpoint
CREATE INDEX "score_log_caller_time_idx" ON "score_log" USING btree ("caller_id","scored_at");--> statement-breakpoint
CREATE INDEX "score_log_time_idx" ON "score_log" USING btree ("scored_at");