CREATE TYPE "public"."branch_kind" AS ENUM('as_built', 'draft');--> statement-breakpoint
CREATE TYPE "public"."rig_role" AS ENUM('owner', 'crew', 'guest');--> statement-breakpoint
CREATE TABLE "model_branches" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"rig_id" uuid NOT NULL,
	"kind" "branch_kind" NOT NULL,
	"name" text NOT NULL,
	"head_revision" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "model_branches_head_nonnegative" CHECK ("model_branches"."head_revision" >= 0)
);
--> statement-breakpoint
CREATE TABLE "model_revisions" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"branch_id" uuid NOT NULL,
	"revision" integer NOT NULL,
	"schema_version" integer NOT NULL,
	"document" jsonb NOT NULL,
	"message" text DEFAULT '' NOT NULL,
	"author_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "model_revisions_revision_positive" CHECK ("model_revisions"."revision" >= 1)
);
--> statement-breakpoint
CREATE TABLE "rig_members" (
	"rig_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"role" "rig_role" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "rig_members_rig_id_user_id_pk" PRIMARY KEY("rig_id","user_id")
);
--> statement-breakpoint
CREATE TABLE "rigs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"name" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"name" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "users_email_shape" CHECK ("users"."email" ~ '^[^@\s]+@[^@\s]+$')
);
--> statement-breakpoint
ALTER TABLE "model_branches" ADD CONSTRAINT "model_branches_rig_id_rigs_id_fk" FOREIGN KEY ("rig_id") REFERENCES "public"."rigs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "model_revisions" ADD CONSTRAINT "model_revisions_branch_id_model_branches_id_fk" FOREIGN KEY ("branch_id") REFERENCES "public"."model_branches"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "model_revisions" ADD CONSTRAINT "model_revisions_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rig_members" ADD CONSTRAINT "rig_members_rig_id_rigs_id_fk" FOREIGN KEY ("rig_id") REFERENCES "public"."rigs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rig_members" ADD CONSTRAINT "rig_members_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "model_branches_one_as_built" ON "model_branches" USING btree ("rig_id") WHERE "model_branches"."kind" = 'as_built';--> statement-breakpoint
CREATE INDEX "model_branches_rig_idx" ON "model_branches" USING btree ("rig_id");--> statement-breakpoint
CREATE UNIQUE INDEX "model_revisions_branch_revision_key" ON "model_revisions" USING btree ("branch_id","revision");--> statement-breakpoint
CREATE INDEX "rig_members_user_idx" ON "rig_members" USING btree ("user_id");--> statement-breakpoint
CREATE UNIQUE INDEX "users_email_lower_key" ON "users" USING btree (lower("email"));