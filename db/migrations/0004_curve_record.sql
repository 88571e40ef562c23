ALTER TABLE "curve" ADD COLUMN "record" text;--> statement-breakpoint
UPDATE "curve" SET "record" = json_build_array("id", "batch_id", "device_id", "metrics", ("meta"->>'cells')::int, ("meta"->>'area_cm2')::float8, "flag_codes", "stc_pmp_w", "fitted", "iph_a", "i0_a", "n", "rs_ohm", "rsh_ohm", "rmse_a")::text;
