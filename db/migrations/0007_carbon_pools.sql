ALTER TABLE "plot_metrics" ADD COLUMN "root_shoot_ratio" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "bgb_mg_ha" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "bgb_carbon_mg_ha" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "standing_dead_mg_ha" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "standing_dead_carbon_mg_ha" double precision;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD COLUMN "tree_carbon_mg_ha" double precision;--> statement-breakpoint
ALTER TABLE "plot_change" ADD COLUMN "bgb_net_change_mg_ha_yr" double precision;--> statement-breakpoint
ALTER TABLE "plot_change" ADD COLUMN "standing_dead_net_change_mg_ha_yr" double precision;--> statement-breakpoint
ALTER TABLE "plot_change" ADD COLUMN "tree_carbon_net_change_mg_ha_yr" double precision;