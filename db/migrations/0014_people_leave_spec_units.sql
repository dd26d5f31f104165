ALTER TABLE "engine_specs" ADD COLUMN "retired_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "job_spec_overrides" ADD COLUMN "entered_unit" text;--> statement-breakpoint
ALTER TABLE "job_spec_overrides" ADD COLUMN "entered_text" jsonb;--> statement-breakpoint
ALTER TABLE "spec_values" ADD COLUMN "entered_unit" text;--> statement-breakpoint
ALTER TABLE "spec_values" ADD COLUMN "entered_text" jsonb;--> statement-breakpoint
ALTER TABLE "users" ADD COLUMN "last_sign_in_at" timestamp with time zone;