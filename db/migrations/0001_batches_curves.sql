CREATE TABLE "batch" (
	"id" text PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"name" text NOT NULL,
	"product_type" text,
	"supplier" text,
	"line" text,
	"lot" text,
	"batch_date" text,
	"cells" integer,
	"area_cm2" double precision,
	"nameplate_w" double precision,
	"description" text,
	"archived" boolean DEFAULT false NOT NULL,
	"state" text DEFAULT 'open' NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "curve" (
	"id" text PRIMARY KEY NOT NULL,
	"organization_id" text NOT NULL,
	"batch_id" text NOT NULL,
	"device_id" text NOT NULL,
	"file_name" text NOT NULL,
	"meta" jsonb NOT NULL,
	"voltage_v" jsonb NOT NULL,
	"current_a" jsonb NOT NULL,
	"notes" jsonb NOT NULL,
	"metrics" jsonb NOT NULL,
	"flags" jsonb NOT NULL,
	"stc" jsonb,
	"isc_a" double precision NOT NULL,
	"voc_v" double precision NOT NULL,
	"pmp_w" double precision NOT NULL,
	"ff" double precision NOT NULL,
	"efficiency" double precision,
	"n" double precision,
	"rs_ohm" double precision,
	"rsh_ohm" double precision,
	"stc_pmp_w" double precision,
	"flag_codes" text DEFAULT '' NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "fit" (
	"id" text PRIMARY KEY NOT NULL,
	"curve_id" text NOT NULL,
	"model" text NOT NULL,
	"current" boolean DEFAULT true NOT NULL,
	"result" jsonb NOT NULL,
	"conditions" jsonb NOT NULL,
	"reason" text NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "batch" ADD CONSTRAINT "batch_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "batch" ADD CONSTRAINT "batch_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "curve" ADD CONSTRAINT "curve_organization_id_organization_id_fk" FOREIGN KEY ("organization_id") REFERENCES "public"."organization"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "curve" ADD CONSTRAINT "curve_batch_id_batch_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."batch"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "curve" ADD CONSTRAINT "curve_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fit" ADD CONSTRAINT "fit_curve_id_curve_id_fk" FOREIGN KEY ("curve_id") REFERENCES "public"."curve"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fit" ADD CONSTRAINT "fit_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "batch_org_idx" ON "batch" USING btree ("organization_id","created_at");--> statement-breakpoint
CREATE INDEX "curve_batch_idx" ON "curve" USING btree ("batch_id","device_id");--> statement-breakpoint
CREATE INDEX "curve_org_idx" ON "curve" USING btree ("organization_id");--> statement-breakpoint
CREATE INDEX "fit_curve_idx" ON "fit" USING btree ("curve_id","current");