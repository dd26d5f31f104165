ALTER TABLE "reviews" DROP CONSTRAINT "reviews_comment_length";--> statement-breakpoint
ALTER TABLE "reviews" ALTER COLUMN "comment" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "mail_outbox" ADD COLUMN "failures" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "reviews" ADD CONSTRAINT "reviews_comment_length" CHECK ("reviews"."comment" is null or length("reviews"."comment") between 1 and 2000);