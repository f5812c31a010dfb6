CREATE TYPE "public"."study_kind" AS ENUM('direct', 'age_curve');--> statement-breakpoint
ALTER TABLE "interval_partitions" DROP CONSTRAINT "interval_partitions_has_limit";--> statement-breakpoint
ALTER TABLE "interval_partitions" DROP CONSTRAINT "interval_partitions_method";--> statement-breakpoint
ALTER TABLE "studies" ADD COLUMN "kind" "study_kind" DEFAULT 'direct' NOT NULL;--> statement-breakpoint
ALTER TABLE "interval_partitions" ADD CONSTRAINT "interval_partitions_lms_model" CHECK (("interval_partitions"."method" = 'lms') = ("interval_partitions"."model"->>'kind' = 'lms'));--> statement-breakpoint
ALTER TABLE "interval_partitions" ADD CONSTRAINT "interval_partitions_has_limit" CHECK ("interval_partitions"."method" = 'lms' OR "interval_partitions"."low" IS NOT NULL OR "interval_partitions"."high" IS NOT NULL);--> statement-breakpoint
ALTER TABLE "interval_partitions" ADD CONSTRAINT "interval_partitions_method" CHECK ("interval_partitions"."method" IN ('nonparametric', 'parametric', 'robust', 'adopted', 'lms'));