ALTER TABLE "plot_metrics" ADD COLUMN "agb_height_measured_share" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "agb_height_modelled_share" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "agb_no_height_share" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "agb_wd_species_share" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "agb_wd_genus_share" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "agb_wd_family_share" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "agb_wd_plot_share" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "agb_wd_default_share" double precision;--> statement-breakpoint
-- Visits computed before the biomass method shares existed are due again, so the next run fills them.
UPDATE "plot_visits" SET "stale" = true WHERE NOT "stale" AND "id" IN (SELECT "visit_id" FROM "plot_metrics");--> statement-breakpoint
ALTER TABLE "region_summaries" ADD COLUMN "plot_keys" text[];