CREATE TABLE "batch_review" (
	"id" text PRIMARY KEY NOT NULL,
	"batch_id" text NOT NULL,
	"action" text NOT NULL,
	"spec_id" text,
	"counts" jsonb,
	"comment" text,
	"actor_id" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "spec" (
	"id" text PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"family_id" text NOT NULL,
	"version" integer NOT NULL,
	"name" text NOT NULL,
	"body" jsonb NOT NULL,
	"changes" jsonb NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "batch_review" ADD CONSTRAINT "batch_review_batch_id_batch_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."batch"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "batch_review" ADD CONSTRAINT "batch_review_spec_id_spec_id_fk" FOREIGN KEY ("spec_id") REFERENCES "public"."spec"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "batch_review" ADD CONSTRAINT "batch_review_actor_id_user_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spec" ADD CONSTRAINT "spec_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "spec" ADD CONSTRAINT "spec_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "batch_review_batch_idx" ON "batch_review" USING btree ("batch_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "spec_family_version_idx" ON "spec" USING btree ("family_id","version");--> statement-breakpoint
CREATE INDEX "spec_org_idx" ON "spec" USING btree ("organization_id");