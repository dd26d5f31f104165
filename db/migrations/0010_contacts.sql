ALTER TABLE "customers" ADD COLUMN "contact_name" text;--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "address" text;--> statement-breakpoint
ALTER TABLE "shops" ADD COLUMN "phone" text;