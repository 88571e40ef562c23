ALTER TABLE "curve" ADD COLUMN "status" text DEFAULT 'done' NOT NULL;--> statement-breakpoint
ALTER TABLE "curve" ADD COLUMN "status_reason" text;