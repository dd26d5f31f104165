-- Until now "attempts" counted failed sends only. Rows written before this keep their history:
-- the failures so far become "failures" (what the back-off and giving up count), and a message
-- that went out had one more send than it had failures.
UPDATE "mail_outbox" SET "failures" = "attempts" WHERE "status" <> 'sent';--> statement-breakpoint
UPDATE "mail_outbox" SET "attempts" = "attempts" + 1 WHERE "status" = 'sent';
