CREATE TABLE "original_file" (
	"id" text PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"batch_id" text NOT NULL,
	"file_name" text NOT NULL,
	"sha256" text NOT NULL,
	"size" integer NOT NULL,
	"content_type" text NOT NULL,
	"result" text,
	"code" text,
	"curve_id" text,
	"device_id" text,
	"uploaded_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"position" integer DEFAULT 0 NOT NULL,
	"deleted_at" timestamp with time zone,
	"deleted_by" text
);
--> statement-breakpoint
ALTER TABLE "curve" ADD COLUMN "file_size" integer;--> statement-breakpoint
ALTER TABLE "organization_setting" ADD COLUMN "retention_years" integer DEFAULT 10 NOT NULL;--> statement-breakpoint
ALTER TABLE "original_file" ADD CONSTRAINT "original_file_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "original_file" ADD CONSTRAINT "original_file_batch_id_batch_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."batch"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "original_file" ADD CONSTRAINT "original_file_uploaded_by_user_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "original_file" ADD CONSTRAINT "original_file_deleted_by_user_id_fk" FOREIGN KEY ("deleted_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "original_file_batch_idx" ON "original_file" USING btree ("batch_id","created_at","position");--> statement-breakpoint
CREATE INDEX "original_file_key_idx" ON "original_file" USING btree ("organization_id","batch_id","sha256");