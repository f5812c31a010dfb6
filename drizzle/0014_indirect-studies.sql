ALTER TYPE "public"."study_kind" ADD VALUE 'indirect';--> statement-breakpoint
ALTER TABLE "interval_partitions" DROP CONSTRAINT "interval_partitions_method";--> statement-breakpoint
ALTER TABLE "donor_results" ADD COLUMN "collected_at" text;--> statement-breakpoint
ALTER TABLE "donor_results" ADD COLUMN "setting" text;--> statement-breakpoint
ALTER TABLE "donor_results" ADD COLUMN "flags" jsonb;--> statement-breakpoint
ALTER TABLE "interval_partitions" ADD CONSTRAINT "interval_partitions_method" CHECK ("interval_partitions"."method" IN ('nonparametric', 'parametric', 'robust', 'adopted', 'lms', 'indirect'));