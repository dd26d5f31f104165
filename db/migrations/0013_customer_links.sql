CREATE TABLE "customer_links" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"job_id" uuid NOT NULL,
	"token_hash" text NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"revoked_at" timestamp with time zone,
	"revoked_by_id" uuid,
	"created_by_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "customer_links_token_hash_unique" UNIQUE("token_hash"),
	CONSTRAINT "customer_links_expiry_after_creation" CHECK ("customer_links"."expires_at" > "customer_links"."created_at"),
	CONSTRAINT "customer_links_revoked_by" CHECK (("customer_links"."revoked_at" is null) = ("customer_links"."revoked_by_id" is null))
);
--> statement-breakpoint
ALTER TABLE "mail_outbox" ADD COLUMN "attachment_name" text;--> statement-breakpoint
ALTER TABLE "mail_outbox" ADD COLUMN "attachment_type" text;--> statement-breakpoint
ALTER TABLE "mail_outbox" ADD COLUMN "attachment" "bytea";--> statement-breakpoint
ALTER TABLE "reviews" ADD COLUMN "incomplete_items" text[];--> statement-breakpoint
ALTER TABLE "reviews" ADD COLUMN "incomplete_reason" text;--> statement-breakpoint
ALTER TABLE "customer_links" ADD CONSTRAINT "customer_links_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "customer_links" ADD CONSTRAINT "customer_links_revoked_by_id_users_id_fk" FOREIGN KEY ("revoked_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "customer_links" ADD CONSTRAINT "customer_links_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "customer_links_job_idx" ON "customer_links" USING btree ("job_id","created_at");--> statement-breakpoint
ALTER TABLE "mail_outbox" ADD CONSTRAINT "mail_outbox_attachment_whole" CHECK (("mail_outbox"."attachment" is null) = ("mail_outbox"."attachment_name" is null) and ("mail_outbox"."attachment" is null) = ("mail_outbox"."attachment_type" is null));--> statement-breakpoint
ALTER TABLE "reviews" ADD CONSTRAINT "reviews_incomplete_reason_length" CHECK ("reviews"."incomplete_reason" is null or length("reviews"."incomplete_reason") between 1 and 2000);--> statement-breakpoint
ALTER TABLE "reviews" ADD CONSTRAINT "reviews_incomplete_reason_with_items" CHECK (("reviews"."incomplete_reason" is null) = ("reviews"."incomplete_items" is null));