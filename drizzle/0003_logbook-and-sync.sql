CREATE TYPE "public"."reading_source" AS ENUM('hand', 'csv', 'device');--> statement-breakpoint
CREATE TABLE "readings" (
	"id" uuid PRIMARY KEY NOT NULL,
	"rig_id" uuid NOT NULL,
	"author_id" uuid,
	"taken_at" timestamp with time zone NOT NULL,
	"bank_voltage_v" real,
	"current_a" real,
	"soc_pct" real,
	"temperature_c" real,
	"solar_wh_today" real,
	"note" text DEFAULT '' NOT NULL,
	"source" "reading_source" DEFAULT 'hand' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"deleted_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "sync_changes" (
	"cursor" bigserial PRIMARY KEY NOT NULL,
	"change_id" uuid NOT NULL,
	"rig_id" uuid NOT NULL,
	"kind" text NOT NULL,
	"entity_id" text NOT NULL,
	"author_id" uuid,
	"client_time" timestamp with time zone,
	"server_time" timestamp with time zone DEFAULT now() NOT NULL,
	"payload" jsonb
);
--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_rig_id_rigs_id_fk" FOREIGN KEY ("rig_id") REFERENCES "public"."rigs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sync_changes" ADD CONSTRAINT "sync_changes_rig_id_rigs_id_fk" FOREIGN KEY ("rig_id") REFERENCES "public"."rigs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sync_changes" ADD CONSTRAINT "sync_changes_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "readings_rig_taken_idx" ON "readings" USING btree ("rig_id","taken_at");--> statement-breakpoint
CREATE UNIQUE INDEX "sync_changes_change_key" ON "sync_changes" USING btree ("change_id");--> statement-breakpoint
CREATE INDEX "sync_changes_rig_cursor_idx" ON "sync_changes" USING btree ("rig_id","cursor");