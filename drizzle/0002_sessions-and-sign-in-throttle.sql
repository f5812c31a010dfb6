CREATE TABLE "sign_in_account_failures" (
	"email" text NOT NULL,
	"address" text NOT NULL,
	"failures" integer NOT NULL,
	"last_failure_at" timestamp with time zone NOT NULL,
	"blocked_until" timestamp with time zone,
	CONSTRAINT "sign_in_account_failures_email_address_pk" PRIMARY KEY("email","address")
);
--> statement-breakpoint
CREATE TABLE "sign_in_address_failures" (
	"address" text PRIMARY KEY NOT NULL,
	"failures" integer NOT NULL,
	"last_failure_at" timestamp with time zone NOT NULL,
	"blocked_until" timestamp with time zone
);
--> statement-breakpoint
DROP TABLE "sign_in_failures" CASCADE;--> statement-breakpoint
ALTER TABLE "users" ADD COLUMN "session_version" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "users" ADD COLUMN "must_change_password" boolean DEFAULT false NOT NULL;--> statement-breakpoint
CREATE INDEX "sign_in_account_failures_last_idx" ON "sign_in_account_failures" USING btree ("last_failure_at");--> statement-breakpoint
CREATE INDEX "sign_in_address_failures_last_idx" ON "sign_in_address_failures" USING btree ("last_failure_at");