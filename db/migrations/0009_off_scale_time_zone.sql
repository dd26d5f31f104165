ALTER TABLE "measurements" ADD COLUMN "off_scale" boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE "shops" ADD COLUMN "time_zone" text DEFAULT 'Europe/London' NOT NULL;