CREATE TABLE "issued_sign_in_codes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"code_hash" text NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"tries" integer DEFAULT 0 NOT NULL,
	"used_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
DROP TABLE "sign_in_codes" CASCADE;--> statement-breakpoint
CREATE INDEX "issued_sign_in_codes_created_idx" ON "issued_sign_in_codes" USING btree ("created_at");