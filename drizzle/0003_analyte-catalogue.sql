CREATE TABLE "analytes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"code" text NOT NULL,
	"name" text NOT NULL,
	"loinc" text,
	"unit" text NOT NULL,
	"decimals" integer NOT NULL,
	"specimen" text NOT NULL,
	"critical_low" double precision,
	"critical_high" double precision,
	"review_months" integer DEFAULT 24 NOT NULL,
	"molar_mass" double precision,
	"molar_mass_source" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"created_by" uuid,
	"updated_by" uuid,
	CONSTRAINT "analytes_code_format" CHECK ("analytes"."code" ~ '^[A-Z0-9]{1,16}$'),
	CONSTRAINT "analytes_loinc_format" CHECK ("analytes"."loinc" IS NULL OR "analytes"."loinc" ~ '^[0-9]{1,7}-[0-9]$'),
	CONSTRAINT "analytes_decimals_range" CHECK ("analytes"."decimals" BETWEEN 0 AND 6),
	CONSTRAINT "analytes_review_months_range" CHECK ("analytes"."review_months" BETWEEN 1 AND 120),
	CONSTRAINT "analytes_critical_order" CHECK ("analytes"."critical_low" IS NULL OR "analytes"."critical_high" IS NULL OR "analytes"."critical_low" < "analytes"."critical_high"),
	CONSTRAINT "analytes_molar_mass_positive" CHECK ("analytes"."molar_mass" IS NULL OR "analytes"."molar_mass" > 0),
	CONSTRAINT "analytes_molar_mass_sourced" CHECK (("analytes"."molar_mass" IS NULL) = ("analytes"."molar_mass_source" IS NULL))
);
--> statement-breakpoint
ALTER TABLE "analytes" ADD CONSTRAINT "analytes_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analytes" ADD CONSTRAINT "analytes_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "analytes_code_unique" ON "analytes" USING btree ("code");