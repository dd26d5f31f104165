CREATE TYPE "public"."spec_source" AS ENUM('library', 'job_override', 'entered');--> statement-breakpoint
CREATE TABLE "engine_specs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"name" text NOT NULL,
	"source" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "engine_specs_shop_name_unique" UNIQUE("shop_id","name")
);
--> statement-breakpoint
CREATE TABLE "job_spec_overrides" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"job_id" uuid NOT NULL,
	"key" text NOT NULL,
	"min_value" real,
	"max_value" real,
	"limit_value" real,
	"nominal_value" real,
	"unit" text NOT NULL,
	"note" text,
	"reason" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "job_spec_overrides_job_key_unique" UNIQUE("job_id","key"),
	CONSTRAINT "job_spec_overrides_order" CHECK ("job_spec_overrides"."min_value" is null or "job_spec_overrides"."max_value" is null or "job_spec_overrides"."min_value" <= "job_spec_overrides"."max_value"),
	CONSTRAINT "job_spec_overrides_unit" CHECK ("job_spec_overrides"."unit" in ('mm', 'N·m', 'N'))
);
--> statement-breakpoint
CREATE TABLE "spec_values" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"engine_spec_id" uuid NOT NULL,
	"key" text NOT NULL,
	"min_value" real,
	"max_value" real,
	"limit_value" real,
	"nominal_value" real,
	"unit" text NOT NULL,
	"note" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "spec_values_spec_key_unique" UNIQUE("engine_spec_id","key"),
	CONSTRAINT "spec_values_order" CHECK ("spec_values"."min_value" is null or "spec_values"."max_value" is null or "spec_values"."min_value" <= "spec_values"."max_value"),
	CONSTRAINT "spec_values_unit" CHECK ("spec_values"."unit" in ('mm', 'N·m', 'N'))
);
--> statement-breakpoint
CREATE TABLE "torque_sheets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"head_id" uuid NOT NULL,
	"camshaft_id" uuid NOT NULL,
	"cap_count" integer NOT NULL,
	"bolts_per_cap" integer NOT NULL,
	"bolt_order" text[] NOT NULL,
	"order_source" text NOT NULL,
	"final_nm" real NOT NULL,
	"stage_fractions" real[] NOT NULL,
	"spec_source" "spec_source" DEFAULT 'entered' NOT NULL,
	"created_by_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "torque_sheets_camshaft_unique" UNIQUE("camshaft_id"),
	CONSTRAINT "torque_sheets_caps_range" CHECK ("torque_sheets"."cap_count" between 1 and 12),
	CONSTRAINT "torque_sheets_bolts_range" CHECK ("torque_sheets"."bolts_per_cap" between 1 and 2),
	CONSTRAINT "torque_sheets_final_range" CHECK ("torque_sheets"."final_nm" > 0 and "torque_sheets"."final_nm" <= 200),
	CONSTRAINT "torque_sheets_order_source" CHECK ("torque_sheets"."order_source" in ('centre-out', 'maker'))
);
--> statement-breakpoint
CREATE TABLE "torque_ticks" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"sheet_id" uuid NOT NULL,
	"stage" integer NOT NULL,
	"bolt_id" text NOT NULL,
	"ticked_by_id" uuid NOT NULL,
	"ticked_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "torque_ticks_sheet_stage_bolt_unique" UNIQUE("sheet_id","stage","bolt_id"),
	CONSTRAINT "torque_ticks_stage_range" CHECK ("torque_ticks"."stage" >= 1)
);
--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "engine_spec_id" uuid;--> statement-breakpoint
ALTER TABLE "measurements" ADD COLUMN "strip_id" text;--> statement-breakpoint
ALTER TABLE "measurements" ADD COLUMN "bore_mm" real;--> statement-breakpoint
ALTER TABLE "measurements" ADD COLUMN "journal_mm" real;--> statement-breakpoint
ALTER TABLE "measurements" ADD COLUMN "spec_source" "spec_source";--> statement-breakpoint
ALTER TABLE "valves" ADD COLUMN "lapped_in_seat_id" uuid;--> statement-breakpoint
ALTER TABLE "engine_specs" ADD CONSTRAINT "engine_specs_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "job_spec_overrides" ADD CONSTRAINT "job_spec_overrides_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spec_values" ADD CONSTRAINT "spec_values_engine_spec_id_engine_specs_id_fk" FOREIGN KEY ("engine_spec_id") REFERENCES "public"."engine_specs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "torque_sheets" ADD CONSTRAINT "torque_sheets_head_id_heads_id_fk" FOREIGN KEY ("head_id") REFERENCES "public"."heads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "torque_sheets" ADD CONSTRAINT "torque_sheets_camshaft_id_camshafts_id_fk" FOREIGN KEY ("camshaft_id") REFERENCES "public"."camshafts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "torque_sheets" ADD CONSTRAINT "torque_sheets_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "torque_ticks" ADD CONSTRAINT "torque_ticks_sheet_id_torque_sheets_id_fk" FOREIGN KEY ("sheet_id") REFERENCES "public"."torque_sheets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "torque_ticks" ADD CONSTRAINT "torque_ticks_ticked_by_id_users_id_fk" FOREIGN KEY ("ticked_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_engine_spec_id_engine_specs_id_fk" FOREIGN KEY ("engine_spec_id") REFERENCES "public"."engine_specs"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "valves" ADD CONSTRAINT "valves_lapped_in_seat_id_seats_id_fk" FOREIGN KEY ("lapped_in_seat_id") REFERENCES "public"."seats"("id") ON DELETE set null ON UPDATE no action;