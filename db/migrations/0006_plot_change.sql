CREATE TABLE "plot_change" (
	"plot_id" bigint NOT NULL,
	"visit_from_id" bigint NOT NULL,
	"visit_to_id" bigint NOT NULL,
	"species_version_id" integer,
	"years" double precision NOT NULL,
	"dbh_threshold_cm" double precision NOT NULL,
	"n_start" integer NOT NULL,
	"n_survivors" integer NOT NULL,
	"n_died" integer NOT NULL,
	"n_removed" integer NOT NULL,
	"n_recruits" integer NOT NULL,
	"mortality_rate" double precision,
	"recruitment_rate" double precision,
	"mortality_annual" double precision,
	"recruitment_annual" double precision,
	"dbh_increment_cm_yr" double precision,
	"ba_change_m2_ha_yr" double precision NOT NULL,
	"agb_growth_mg_ha_yr" double precision NOT NULL,
	"agb_recruitment_mg_ha_yr" double precision NOT NULL,
	"agb_loss_mg_ha_yr" double precision NOT NULL,
	"agb_net_change_mg_ha_yr" double precision NOT NULL,
	"carbon_net_change_mg_ha_yr" double precision NOT NULL,
	"n_absent" integer NOT NULL,
	"ba_growth_m2_ha_yr" double precision NOT NULL,
	"ba_recruitment_m2_ha_yr" double precision NOT NULL,
	"ba_loss_m2_ha_yr" double precision NOT NULL,
	"agb_died_mg_ha_yr" double precision NOT NULL,
	"agb_removed_mg_ha_yr" double precision NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "plot_change_pk" PRIMARY KEY("visit_from_id","visit_to_id")
);
--> statement-breakpoint
ALTER TABLE "compute_problems" DROP CONSTRAINT "compute_problems_stage_chk";--> statement-breakpoint
ALTER TABLE "plot_change" ADD CONSTRAINT "plot_change_plot_id_plots_id_fk" FOREIGN KEY ("plot_id") REFERENCES "public"."plots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plot_change" ADD CONSTRAINT "plot_change_visit_from_id_plot_visits_id_fk" FOREIGN KEY ("visit_from_id") REFERENCES "public"."plot_visits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plot_change" ADD CONSTRAINT "plot_change_visit_to_id_plot_visits_id_fk" FOREIGN KEY ("visit_to_id") REFERENCES "public"."plot_visits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plot_change" ADD CONSTRAINT "plot_change_species_version_id_species_versions_id_fk" FOREIGN KEY ("species_version_id") REFERENCES "public"."species_versions"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "plot_change_plot_idx" ON "plot_change" USING btree ("plot_id");--> statement-breakpoint
ALTER TABLE "compute_problems" ADD CONSTRAINT "compute_problems_stage_chk" CHECK ("compute_problems"."stage" in ('plot','fit','summary','change'));