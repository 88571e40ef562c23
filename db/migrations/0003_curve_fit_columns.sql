ALTER TABLE "curve" ADD COLUMN "iph_a" double precision;--> statement-breakpoint
ALTER TABLE "curve" ADD COLUMN "i0_a" double precision;--> statement-breakpoint
ALTER TABLE "curve" ADD COLUMN "rmse_a" double precision;--> statement-breakpoint
ALTER TABLE "curve" ADD COLUMN "fitted" boolean DEFAULT false NOT NULL;--> statement-breakpoint
UPDATE "curve" SET "iph_a" = (f."result"->>'iph_a')::double precision, "i0_a" = (f."result"->>'i0_a')::double precision, "rmse_a" = (f."result"->>'rmse_a')::double precision, "fitted" = coalesce((f."result"->>'converged')::boolean, false) FROM "fit" f WHERE f."curve_id" = "curve"."id" AND f."current" = true AND f."model" = 'single-diode';
