ALTER TABLE "batch" ADD COLUMN "irradiance_w_m2" double precision;--> statement-breakpoint
ALTER TABLE "batch" ADD COLUMN "alpha_pct_per_k" double precision;--> statement-breakpoint
ALTER TABLE "batch" ADD COLUMN "beta_pct_per_k" double precision;--> statement-breakpoint
ALTER TABLE "batch" ADD COLUMN "gamma_pct_per_k" double precision;--> statement-breakpoint
ALTER TABLE "batch" ADD COLUMN "rs_ohm" double precision;--> statement-breakpoint
ALTER TABLE "batch" ADD COLUMN "kappa_ohm_per_k" double precision;