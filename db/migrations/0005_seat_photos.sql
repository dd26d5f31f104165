CREATE TABLE "seat_photos" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"seat_id" uuid NOT NULL,
	"key" text NOT NULL,
	"type" text NOT NULL,
	"bytes" integer NOT NULL,
	"taken_by_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "seat_photos_key_unique" UNIQUE("key"),
	CONSTRAINT "seat_photos_bytes_positive" CHECK ("seat_photos"."bytes" > 0)
);
--> statement-breakpoint
ALTER TABLE "seat_photos" ADD CONSTRAINT "seat_photos_seat_id_seats_id_fk" FOREIGN KEY ("seat_id") REFERENCES "public"."seats"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "seat_photos" ADD CONSTRAINT "seat_photos_taken_by_id_users_id_fk" FOREIGN KEY ("taken_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "seat_photos_seat_idx" ON "seat_photos" USING btree ("seat_id","created_at");