CREATE TYPE "public"."soc_source" AS ENUM('entered', 'resting_voltage', 'logbook');--> statement-breakpoint
CREATE TABLE "rig_state" (
	"rig_id" uuid PRIMARY KEY NOT NULL,
	"version" integer DEFAULT 0 NOT NULL,
	"mode_id" text,
	"switches" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"soc_pct" double precision,
	"soc_source" "soc_source",
	"soc_resting_v" double precision,
	"soc_taken_at" timestamp with time zone,
	"place" jsonb DEFAULT '{"kind":"home"}'::jsonb NOT NULL,
	"weather" jsonb DEFAULT '{"kind":"clear"}'::jsonb NOT NULL,
	"field_times" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_by" uuid,
	CONSTRAINT "rig_state_version_nonnegative" CHECK ("rig_state"."version" >= 0)
);
--> statement-breakpoint
CREATE TABLE "switch_changes" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"rig_id" uuid NOT NULL,
	"load_id" text NOT NULL,
	"on" boolean NOT NULL,
	"mode_id" text,
	"author_id" uuid,
	"client_time" timestamp with time zone,
	"server_time" timestamp with time zone DEFAULT now() NOT NULL,
	"applied" boolean DEFAULT true NOT NULL
);
--> statement-breakpoint
ALTER TABLE "rig_state" ADD CONSTRAINT "rig_state_rig_id_rigs_id_fk" FOREIGN KEY ("rig_id") REFERENCES "public"."rigs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rig_state" ADD CONSTRAINT "rig_state_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "switch_changes" ADD CONSTRAINT "switch_changes_rig_id_rigs_id_fk" FOREIGN KEY ("rig_id") REFERENCES "public"."rigs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "switch_changes" ADD CONSTRAINT "switch_changes_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "switch_changes_rig_time_idx" ON "switch_changes" USING btree ("rig_id","server_time");