CREATE TABLE "measurement_setup" (
	"id" text PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"name" text NOT NULL,
	"components" jsonb NOT NULL,
	"is_default" boolean DEFAULT false NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "batch" ADD COLUMN "setup_id" text;--> statement-breakpoint
ALTER TABLE "measurement_setup" ADD CONSTRAINT "measurement_setup_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurement_setup" ADD CONSTRAINT "measurement_setup_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "measurement_setup_org_idx" ON "measurement_setup" USING btree ("organization_id");--> statement-breakpoint
ALTER TABLE "batch" ADD CONSTRAINT "batch_setup_id_measurement_setup_id_fk" FOREIGN KEY ("setup_id") REFERENCES "public"."measurement_setup"("id") ON DELETE set null ON UPDATE no action;