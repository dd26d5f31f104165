CREATE TYPE "public"."seat_check_kind" AS ENUM('contact_ring', 'marking_compound', 'leak_test');--> statement-breakpoint
CREATE TYPE "public"."seat_check_result" AS ENUM('pass', 'fail');--> statement-breakpoint
CREATE TABLE "seat_checks" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"seat_id" uuid NOT NULL,
	"kind" "seat_check_kind" NOT NULL,
	"result" "seat_check_result" NOT NULL,
	"port" "valve_kind",
	"contact_width_mm" real,
	"measurement_id" uuid,
	"note" text,
	"photo_id" uuid,
	"recorded_by_id" uuid NOT NULL,
	"recorded_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "seat_checks_port_for_leak_test" CHECK (("seat_checks"."kind" = 'leak_test') = ("seat_checks"."port" is not null)),
	CONSTRAINT "seat_checks_width_for_ring" CHECK ("seat_checks"."contact_width_mm" is null or ("seat_checks"."kind" = 'contact_ring' and "seat_checks"."contact_width_mm" > 0)),
	CONSTRAINT "seat_checks_note_length" CHECK ("seat_checks"."note" is null or length("seat_checks"."note") between 1 and 2000)
);
--> statement-breakpoint
ALTER TABLE "reviews" ADD COLUMN "checks_reason" text;--> statement-breakpoint
ALTER TABLE "seat_checks" ADD CONSTRAINT "seat_checks_seat_id_seats_id_fk" FOREIGN KEY ("seat_id") REFERENCES "public"."seats"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "seat_checks" ADD CONSTRAINT "seat_checks_measurement_id_measurements_id_fk" FOREIGN KEY ("measurement_id") REFERENCES "public"."measurements"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "seat_checks" ADD CONSTRAINT "seat_checks_photo_id_seat_photos_id_fk" FOREIGN KEY ("photo_id") REFERENCES "public"."seat_photos"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "seat_checks" ADD CONSTRAINT "seat_checks_recorded_by_id_users_id_fk" FOREIGN KEY ("recorded_by_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "seat_checks_seat_idx" ON "seat_checks" USING btree ("seat_id","kind","recorded_at");--> statement-breakpoint
ALTER TABLE "reviews" ADD CONSTRAINT "reviews_checks_reason_length" CHECK ("reviews"."checks_reason" is null or length("reviews"."checks_reason") between 1 and 2000);