ALTER TABLE "plot_metrics" ADD COLUMN "reporting_dbh_min_cm" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "reporting_stems_ha" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "reporting_basal_area_m2_ha" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "reporting_agb_mg_ha" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "reporting_carbon_mg_ha" double precision;