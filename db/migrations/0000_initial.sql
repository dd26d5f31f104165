CREATE TYPE "public"."bank_arrangement" AS ENUM('inline', 'v');--> statement-breakpoint
CREATE TYPE "public"."job_status" AS ENUM('queued', 'at_bench', 'awaiting_audit', 'signed_off', 'collected');--> statement-breakpoint
CREATE TYPE "public"."lapping_stage" AS ENUM('coarse', 'fine');--> statement-breakpoint
CREATE TYPE "public"."measurement_kind" AS ENUM('journal_clearance', 'cap_torque', 'seat_contact_width', 'valve_stem_diameter', 'stem_guide_clearance', 'installed_spring_height', 'spring_load', 'deck_flatness');--> statement-breakpoint
CREATE TYPE "public"."seat_state" AS ENUM('waiting', 'lapping', 'settled', 'stalled', 'approved', 'sent_back');--> statement-breakpoint
CREATE TYPE "public"."user_role" AS ENUM('technician', 'supervisor', 'admin');--> statement-breakpoint
CREATE TYPE "public"."valve_kind" AS ENUM('intake', 'exhaust');--> statement-breakpoint
CREATE TABLE "audit_entries" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"actor_id" uuid,
	"action" text NOT NULL,
	"entity_type" text NOT NULL,
	"entity_id" text NOT NULL,
	"job_id" uuid,
	"before" jsonb,
	"after" jsonb
);
--> statement-breakpoint
CREATE TABLE "camshafts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"head_id" uuid NOT NULL,
	"position" integer NOT NULL,
	"label" text NOT NULL,
	"journal_count" integer NOT NULL,
	CONSTRAINT "camshafts_head_position_unique" UNIQUE("head_id","position"),
	CONSTRAINT "camshafts_position_range" CHECK ("camshafts"."position" >= 1),
	CONSTRAINT "camshafts_journal_count_range" CHECK ("camshafts"."journal_count" between 1 and 12)
);
--> statement-breakpoint
CREATE TABLE "customers" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"name" text NOT NULL,
	"email" text,
	"phone" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "customers_shop_name_unique" UNIQUE("shop_id","name")
);
--> statement-breakpoint
CREATE TABLE "heads" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"job_id" uuid NOT NULL,
	"label" text NOT NULL,
	"arrangement" "bank_arrangement" DEFAULT 'inline' NOT NULL,
	"cylinder_count" integer NOT NULL,
	"intake_valves_per_cylinder" integer NOT NULL,
	"exhaust_valves_per_cylinder" integer NOT NULL,
	"camshaft_count" integer NOT NULL,
	"journals_per_camshaft" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "heads_job_label_unique" UNIQUE("job_id","label"),
	CONSTRAINT "heads_cylinder_count_range" CHECK ("heads"."cylinder_count" between 1 and 16),
	CONSTRAINT "heads_intake_valves_range" CHECK ("heads"."intake_valves_per_cylinder" between 1 and 3),
	CONSTRAINT "heads_exhaust_valves_range" CHECK ("heads"."exhaust_valves_per_cylinder" between 1 and 3),
	CONSTRAINT "heads_camshaft_count_range" CHECK ("heads"."camshaft_count" between 0 and 4),
	CONSTRAINT "heads_journals_range" CHECK ("heads"."journals_per_camshaft" between 0 and 12),
	CONSTRAINT "heads_v_needs_even_cylinders" CHECK ("heads"."arrangement" = 'inline' or "heads"."cylinder_count" % 2 = 0)
);
--> statement-breakpoint
CREATE TABLE "jobs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"number" text NOT NULL,
	"customer_id" uuid NOT NULL,
	"engine_description" text NOT NULL,
	"status" "job_status" DEFAULT 'queued' NOT NULL,
	"assigned_technician_id" uuid,
	"promised_on" date,
	"notes" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "jobs_number_unique" UNIQUE("number")
);
--> statement-breakpoint
CREATE TABLE "journals" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"camshaft_id" uuid NOT NULL,
	"position" integer NOT NULL,
	CONSTRAINT "journals_camshaft_position_unique" UNIQUE("camshaft_id","position"),
	CONSTRAINT "journals_position_range" CHECK ("journals"."position" >= 1)
);
--> statement-breakpoint
CREATE TABLE "lapping_sessions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"seat_id" uuid NOT NULL,
	"stage" "lapping_stage" NOT NULL,
	"technician_id" uuid NOT NULL,
	"sample_rate_hz" integer,
	"noise_floor_db" real,
	"started_at" timestamp with time zone DEFAULT now() NOT NULL,
	"ended_at" timestamp with time zone,
	"recording_key" text,
	CONSTRAINT "lapping_sessions_sample_rate_range" CHECK ("lapping_sessions"."sample_rate_hz" is null or "lapping_sessions"."sample_rate_hz" between 8000 and 192000),
	CONSTRAINT "lapping_sessions_end_after_start" CHECK ("lapping_sessions"."ended_at" is null or "lapping_sessions"."ended_at" >= "lapping_sessions"."started_at")
);
--> statement-breakpoint
CREATE TABLE "measurements" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"head_id" uuid NOT NULL,
	"kind" "measurement_kind" NOT NULL,
	"seat_id" uuid,
	"journal_id" uuid,
	"value" real NOT NULL,
	"entered_unit" text NOT NULL,
	"spec_min" real,
	"spec_max" real,
	"service_limit" real,
	"method" text,
	"note" text,
	"recorded_by_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "measurements_value_nonnegative" CHECK ("measurements"."value" >= 0),
	CONSTRAINT "measurements_spec_order" CHECK ("measurements"."spec_min" is null or "measurements"."spec_max" is null or "measurements"."spec_min" <= "measurements"."spec_max")
);
--> statement-breakpoint
CREATE TABLE "seats" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"head_id" uuid NOT NULL,
	"cylinder" integer NOT NULL,
	"kind" "valve_kind" NOT NULL,
	"position" integer NOT NULL,
	"state" "seat_state" DEFAULT 'waiting' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "seats_head_position_unique" UNIQUE("head_id","cylinder","kind","position"),
	CONSTRAINT "seats_cylinder_range" CHECK ("seats"."cylinder" >= 1),
	CONSTRAINT "seats_position_range" CHECK ("seats"."position" between 1 and 3)
);
--> statement-breakpoint
CREATE TABLE "shops" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"name" text NOT NULL,
	"address" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "shops_name_unique" UNIQUE("name")
);
--> statement-breakpoint
CREATE TABLE "strokes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"session_id" uuid NOT NULL,
	"client_id" uuid NOT NULL,
	"index" integer NOT NULL,
	"start_s" real NOT NULL,
	"end_s" real NOT NULL,
	"onset_db" real NOT NULL,
	"body_db" real NOT NULL,
	"contrast_db" real NOT NULL,
	"flags" text[] DEFAULT '{}'::text[] NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "strokes_session_client_unique" UNIQUE("session_id","client_id"),
	CONSTRAINT "strokes_index_range" CHECK ("strokes"."index" >= 1),
	CONSTRAINT "strokes_times" CHECK ("strokes"."start_s" >= 0 and "strokes"."end_s" > "strokes"."start_s"),
	CONSTRAINT "strokes_contrast_range" CHECK ("strokes"."contrast_db" between -60 and 60)
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"email" text NOT NULL,
	"name" text NOT NULL,
	"role" "user_role" DEFAULT 'technician' NOT NULL,
	"password_hash" text NOT NULL,
	"active" boolean DEFAULT true NOT NULL,
	"failed_sign_ins" integer DEFAULT 0 NOT NULL,
	"locked_until" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "users_email_unique" UNIQUE("email"),
	CONSTRAINT "users_email_lowercase" CHECK ("users"."email" = lower("users"."email")),
	CONSTRAINT "users_failed_sign_ins_range" CHECK ("users"."failed_sign_ins" >= 0)
);
--> statement-breakpoint
CREATE TABLE "valves" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"head_id" uuid NOT NULL,
	"seat_id" uuid,
	"tag" text NOT NULL,
	"part_number" text,
	"serial" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "valves_head_tag_unique" UNIQUE("head_id","tag"),
	CONSTRAINT "valves_seat_unique" UNIQUE("seat_id")
);
--> statement-breakpoint
ALTER TABLE "audit_entries" ADD CONSTRAINT "audit_entries_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_entries" ADD CONSTRAINT "audit_entries_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "camshafts" ADD CONSTRAINT "camshafts_head_id_heads_id_fk" FOREIGN KEY ("head_id") REFERENCES "public"."heads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "customers" ADD CONSTRAINT "customers_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "heads" ADD CONSTRAINT "heads_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_assigned_technician_id_users_id_fk" FOREIGN KEY ("assigned_technician_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "journals" ADD CONSTRAINT "journals_camshaft_id_camshafts_id_fk" FOREIGN KEY ("camshaft_id") REFERENCES "public"."camshafts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lapping_sessions" ADD CONSTRAINT "lapping_sessions_seat_id_seats_id_fk" FOREIGN KEY ("seat_id") REFERENCES "public"."seats"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lapping_sessions" ADD CONSTRAINT "lapping_sessions_technician_id_users_id_fk" FOREIGN KEY ("technician_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_head_id_heads_id_fk" FOREIGN KEY ("head_id") REFERENCES "public"."heads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_seat_id_seats_id_fk" FOREIGN KEY ("seat_id") REFERENCES "public"."seats"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_journal_id_journals_id_fk" FOREIGN KEY ("journal_id") REFERENCES "public"."journals"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurements" ADD CONSTRAINT "measurements_recorded_by_id_users_id_fk" FOREIGN KEY ("recorded_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "seats" ADD CONSTRAINT "seats_head_id_heads_id_fk" FOREIGN KEY ("head_id") REFERENCES "public"."heads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "strokes" ADD CONSTRAINT "strokes_session_id_lapping_sessions_id_fk" FOREIGN KEY ("session_id") REFERENCES "public"."lapping_sessions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "users" ADD CONSTRAINT "users_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "valves" ADD CONSTRAINT "valves_head_id_heads_id_fk" FOREIGN KEY ("head_id") REFERENCES "public"."heads"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "valves" ADD CONSTRAINT "valves_seat_id_seats_id_fk" FOREIGN KEY ("seat_id") REFERENCES "public"."seats"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "audit_entries_entity_idx" ON "audit_entries" USING btree ("entity_type","entity_id");--> statement-breakpoint
CREATE INDEX "audit_entries_job_idx" ON "audit_entries" USING btree ("job_id");--> statement-breakpoint
CREATE INDEX "audit_entries_actor_idx" ON "audit_entries" USING btree ("actor_id","at");--> statement-breakpoint
CREATE INDEX "jobs_status_idx" ON "jobs" USING btree ("status");--> statement-breakpoint
CREATE INDEX "jobs_technician_idx" ON "jobs" USING btree ("assigned_technician_id");--> statement-breakpoint
CREATE INDEX "lapping_sessions_seat_idx" ON "lapping_sessions" USING btree ("seat_id","stage");--> statement-breakpoint
CREATE INDEX "measurements_head_idx" ON "measurements" USING btree ("head_id","kind");--> statement-breakpoint
CREATE INDEX "strokes_session_idx" ON "strokes" USING btree ("session_id","index");