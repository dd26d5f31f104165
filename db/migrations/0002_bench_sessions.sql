ALTER TABLE "lapping_sessions" ADD COLUMN "device_id" text;--> statement-breakpoint
ALTER TABLE "lapping_sessions" ADD COLUMN "last_seen_at" timestamp with time zone DEFAULT now() NOT NULL;--> statement-breakpoint
ALTER TABLE "lapping_sessions" ADD COLUMN "recording_type" text;--> statement-breakpoint
ALTER TABLE "lapping_sessions" ADD COLUMN "recording_bytes" integer;