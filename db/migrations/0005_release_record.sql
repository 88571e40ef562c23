CREATE TABLE "batch_release" (
	"id" text PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"batch_id" text NOT NULL,
	"revision" integer NOT NULL,
	"review_id" text NOT NULL,
	"spec_id" text,
	"spec_name" text NOT NULL,
	"spec_version" integer NOT NULL,
	"counts" jsonb NOT NULL,
	"devices" jsonb NOT NULL,
	"csv_file_name" text NOT NULL,
	"csv" text NOT NULL,
	"csv_sha256" text NOT NULL,
	"comment" text,
	"released_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "organization_setting" (
	"organization_id" text PRIMARY KEY NOT NULL,
	"separate_release" boolean DEFAULT true NOT NULL
);
--> statement-breakpoint
ALTER TABLE "curve" ADD COLUMN "file_sha256" text;--> statement-breakpoint
ALTER TABLE "batch_release" ADD CONSTRAINT "batch_release_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "batch_release" ADD CONSTRAINT "batch_release_batch_id_batch_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."batch"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "batch_release" ADD CONSTRAINT "batch_release_released_by_user_id_fk" FOREIGN KEY ("released_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "organization_setting" ADD CONSTRAINT "organization_setting_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "batch_release_batch_idx" ON "batch_release" USING btree ("batch_id","revision");