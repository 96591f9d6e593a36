CREATE TABLE "photos" (
	"id" uuid PRIMARY KEY NOT NULL,
	"rig_id" uuid NOT NULL,
	"part_id" text,
	"part_kind" text,
	"place" text DEFAULT '' NOT NULL,
	"reading_id" uuid,
	"caption" text DEFAULT '' NOT NULL,
	"mime" text NOT NULL,
	"bytes" integer NOT NULL,
	"width" integer NOT NULL,
	"height" integer NOT NULL,
	"object_key" text NOT NULL,
	"thumb_key" text NOT NULL,
	"kept_location" boolean DEFAULT false NOT NULL,
	"author_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "photos_on_something" CHECK ("photos"."reading_id" IS NOT NULL OR "photos"."part_id" IS NOT NULL OR "photos"."place" <> ''),
	CONSTRAINT "photos_reading_or_part" CHECK ("photos"."reading_id" IS NULL OR ("photos"."part_id" IS NULL AND "photos"."place" = ''))
);
--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_rig_id_rigs_id_fk" FOREIGN KEY ("rig_id") REFERENCES "public"."rigs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_reading_id_readings_id_fk" FOREIGN KEY ("reading_id") REFERENCES "public"."readings"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "photos_rig_created_idx" ON "photos" USING btree ("rig_id","created_at");--> statement-breakpoint
CREATE INDEX "photos_reading_idx" ON "photos" USING btree ("reading_id");