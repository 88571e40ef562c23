-- A curve's measured points as json (their text kept as sent), not jsonb: storing an upload's
-- curves spent much of its time converting every number to jsonb's numeric form, and nothing
-- queries inside these arrays.
ALTER TABLE "curve" ALTER COLUMN "voltage_v" SET DATA TYPE json USING "voltage_v"::json;--> statement-breakpoint
ALTER TABLE "curve" ALTER COLUMN "current_a" SET DATA TYPE json USING "current_a"::json;
