CREATE TABLE "forest_types" (
	"code" text PRIMARY KEY NOT NULL,
	"climate" text NOT NULL,
	CONSTRAINT "forest_types_code_chk" CHECK ("forest_types"."code" ~ '^[A-Za-z0-9_.-]{1,40}$'),
	CONSTRAINT "forest_types_climate_chk" CHECK ("forest_types"."climate" in ('dry','moist','wet'))
);
--> statement-breakpoint
CREATE TABLE "regions" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "regions_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"name" text NOT NULL,
	CONSTRAINT "regions_name_unique" UNIQUE("name"),
	CONSTRAINT "regions_name_chk" CHECK (char_length("regions"."name") between 1 and 80)
);
--> statement-breakpoint
CREATE TABLE "species" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "species_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"version_id" integer NOT NULL,
	"name" text NOT NULL,
	"genus" text NOT NULL,
	"family" text NOT NULL,
	"guild" text NOT NULL,
	"wood_density" double precision,
	CONSTRAINT "species_version_name_uq" UNIQUE("version_id","name"),
	CONSTRAINT "species_guild_chk" CHECK ("species"."guild" in ('pioneer','light_demander','shade_tolerant')),
	CONSTRAINT "species_wood_density_chk" CHECK ("species"."wood_density" is null or "species"."wood_density" between 0.1 and 1.5),
	CONSTRAINT "species_name_chk" CHECK (char_length("species"."name") between 3 and 200)
);
--> statement-breakpoint
CREATE TABLE "species_synonyms" (
	"version_id" integer NOT NULL,
	"synonym" text NOT NULL,
	"species_id" integer NOT NULL,
	CONSTRAINT "species_synonyms_uq" UNIQUE("version_id","synonym")
);
--> statement-breakpoint
CREATE TABLE "species_versions" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "species_versions_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"source" text NOT NULL,
	"content_hash" text NOT NULL,
	"n_species" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "batch_issues" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"batch_id" uuid NOT NULL,
	"severity" text NOT NULL,
	"rule" text NOT NULL,
	"file" text NOT NULL,
	"line" integer,
	"column" text,
	"value" text,
	"message" text NOT NULL,
	CONSTRAINT "batch_issues_severity_chk" CHECK ("batch_issues"."severity" in ('error','warning'))
);
--> statement-breakpoint
CREATE TABLE "batch_unresolved_names" (
	"batch_id" uuid NOT NULL,
	"name" text NOT NULL,
	"level" text NOT NULL,
	"stems" integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE "batches" (
	"id" uuid PRIMARY KEY NOT NULL,
	"state" text DEFAULT 'received' NOT NULL,
	"content_hash" text NOT NULL,
	"files" jsonb NOT NULL,
	"options" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"submitted_by" text DEFAULT 'cli' NOT NULL,
	"plots_rows" integer DEFAULT 0 NOT NULL,
	"trees_rows" integer DEFAULT 0 NOT NULL,
	"plots_loaded" integer DEFAULT 0 NOT NULL,
	"stems_loaded" integer DEFAULT 0 NOT NULL,
	"rows_skipped" integer DEFAULT 0 NOT NULL,
	"n_errors" integer DEFAULT 0 NOT NULL,
	"n_warnings" integer DEFAULT 0 NOT NULL,
	"bytes_total" bigint DEFAULT 0 NOT NULL,
	"bytes_read" bigint DEFAULT 0 NOT NULL,
	"rows_checked" integer DEFAULT 0 NOT NULL,
	"rows_loaded" integer DEFAULT 0 NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"failure_reason" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"loaded_at" timestamp with time zone,
	CONSTRAINT "batches_state_chk" CHECK ("batches"."state" in ('received','validating','rejected','loaded','computed','failed'))
);
--> statement-breakpoint
CREATE TABLE "plot_visits" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"plot_id" bigint NOT NULL,
	"survey_date" date NOT NULL,
	"batch_id" uuid NOT NULL,
	"area_ha" double precision NOT NULL,
	"dbh_min_cm" double precision DEFAULT 10 NOT NULL,
	"subplot_area_ha" double precision DEFAULT 0 NOT NULL,
	"subplot_dbh_min_cm" double precision DEFAULT 5 NOT NULL,
	"logging_class" smallint NOT NULL,
	"fire_class" smallint NOT NULL,
	"stale" boolean DEFAULT true NOT NULL,
	"loaded_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "plot_visits_plot_date_uq" UNIQUE("plot_id","survey_date"),
	CONSTRAINT "plot_visits_area_chk" CHECK ("plot_visits"."area_ha" > 0 and "plot_visits"."area_ha" <= 25),
	CONSTRAINT "plot_visits_subplot_chk" CHECK ("plot_visits"."subplot_area_ha" >= 0 and "plot_visits"."subplot_area_ha" < "plot_visits"."area_ha"),
	CONSTRAINT "plot_visits_dbh_min_chk" CHECK ("plot_visits"."dbh_min_cm" > 0 and "plot_visits"."subplot_dbh_min_cm" > 0),
	CONSTRAINT "plot_visits_logging_chk" CHECK ("plot_visits"."logging_class" between 0 and 3),
	CONSTRAINT "plot_visits_fire_chk" CHECK ("plot_visits"."fire_class" between 0 and 3),
	CONSTRAINT "plot_visits_date_chk" CHECK ("plot_visits"."survey_date" >= date '1800-01-01')
);
--> statement-breakpoint
CREATE TABLE "plots" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"plot_key" text NOT NULL,
	"region_id" integer NOT NULL,
	"forest_type" text NOT NULL,
	"latitude" double precision NOT NULL,
	"longitude" double precision NOT NULL,
	"elevation_m" double precision,
	CONSTRAINT "plots_plot_key_unique" UNIQUE("plot_key"),
	CONSTRAINT "plots_key_chk" CHECK ("plots"."plot_key" ~ '^[A-Za-z0-9_.-]{1,64}$'),
	CONSTRAINT "plots_lat_chk" CHECK ("plots"."latitude" between -90 and 90),
	CONSTRAINT "plots_lon_chk" CHECK ("plots"."longitude" between -180 and 180)
);
--> statement-breakpoint
CREATE TABLE "stems" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"visit_id" bigint NOT NULL,
	"tree_id" text NOT NULL,
	"species" text,
	"dbh_cm" double precision NOT NULL,
	"height_m" double precision,
	"status" text NOT NULL,
	"stump_cause" text,
	"fire_damage" smallint DEFAULT 0 NOT NULL,
	"in_subplot" boolean DEFAULT false NOT NULL,
	CONSTRAINT "stems_visit_tree_uq" UNIQUE("visit_id","tree_id"),
	CONSTRAINT "stems_tree_id_chk" CHECK (char_length("stems"."tree_id") between 1 and 64),
	CONSTRAINT "stems_dbh_chk" CHECK ("stems"."dbh_cm" > 0 and "stems"."dbh_cm" <= 500),
	CONSTRAINT "stems_height_chk" CHECK ("stems"."height_m" is null or ("stems"."height_m" > 1.3 and "stems"."height_m" <= 100)),
	CONSTRAINT "stems_status_chk" CHECK ("stems"."status" in ('live','dead','stump')),
	CONSTRAINT "stems_stump_cause_chk" CHECK (("stems"."status" = 'stump' and "stems"."stump_cause" in ('logged','natural','unknown')) or ("stems"."status" <> 'stump' and "stems"."stump_cause" is null)),
	CONSTRAINT "stems_fire_chk" CHECK ("stems"."fire_damage" between 0 and 3)
);
--> statement-breakpoint
CREATE TABLE "height_models" (
	"forest_type" text PRIMARY KEY NOT NULL,
	"form" text NOT NULL,
	"coefficients" jsonb NOT NULL,
	"stats" jsonb NOT NULL,
	"fitted_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "plot_metrics" (
	"visit_id" bigint PRIMARY KEY NOT NULL,
	"species_version_id" integer,
	"stems_ha" double precision,
	"basal_area_m2_ha" double precision,
	"qmd_cm" double precision,
	"agb_mg_ha" double precision,
	"carbon_mg_ha" double precision,
	"n_identified" integer,
	"richness" integer,
	"shannon" double precision,
	"simpson" double precision,
	"inv_simpson" double precision,
	"pielou" double precision,
	"fisher_alpha" double precision,
	"rarefied_50" double precision,
	"chao1" double precision,
	"pioneer_ba_share" double precision,
	"light_demander_ba_share" double precision,
	"shade_tolerant_ba_share" double precision,
	"unassigned_ba_share" double precision,
	"logging_removed_ba_frac" double precision,
	"logging_score" double precision,
	"fire_score" double precision,
	"disturbance_index" double precision,
	"diagnostics" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "curve_fits" (
	"scope" text NOT NULL,
	"forest_type" text NOT NULL,
	"metric" text NOT NULL,
	"axis" text NOT NULL,
	"model" text NOT NULL,
	"n" integer NOT NULL,
	"b0" double precision,
	"b1" double precision,
	"b2" double precision,
	"se_b0" double precision,
	"se_b1" double precision,
	"se_b2" double precision,
	"p_b1" double precision,
	"p_b2" double precision,
	"r2" double precision,
	"adj_r2" double precision,
	"aicc" double precision,
	"peak_x" double precision,
	"peak_ci_low" double precision,
	"peak_ci_high" double precision,
	"verdict" text NOT NULL,
	"details" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "curve_fits_pk" PRIMARY KEY("scope","forest_type","metric","axis","model")
);
--> statement-breakpoint
CREATE TABLE "region_summaries" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "region_summaries_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"region_id" integer NOT NULL,
	"version" integer NOT NULL,
	"etag" text NOT NULL,
	"payload" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "region_summaries_version_uq" UNIQUE("region_id","version")
);
--> statement-breakpoint
CREATE TABLE "strata" (
	"region_id" integer NOT NULL,
	"forest_type" text NOT NULL,
	"forest_area_ha" double precision NOT NULL,
	"batch_id" uuid,
	CONSTRAINT "strata_pk" PRIMARY KEY("region_id","forest_type"),
	CONSTRAINT "strata_area_chk" CHECK ("strata"."forest_area_ha" > 0)
);
--> statement-breakpoint
CREATE TABLE "access_tokens" (
	"id" uuid PRIMARY KEY NOT NULL,
	"token_hash" text NOT NULL,
	"role" text NOT NULL,
	"regions" text[] DEFAULT '{}'::text[] NOT NULL,
	"label" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revoked_at" timestamp with time zone,
	CONSTRAINT "access_tokens_token_hash_unique" UNIQUE("token_hash"),
	CONSTRAINT "access_tokens_role_chk" CHECK ("access_tokens"."role" in ('admin','uploader','reader'))
);
--> statement-breakpoint
CREATE TABLE "audit_log" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"actor" text NOT NULL,
	"action" text NOT NULL,
	"target" text,
	"details" jsonb DEFAULT '{}'::jsonb NOT NULL
);
--> statement-breakpoint
CREATE TABLE "recompute_runs" (
	"id" text PRIMARY KEY NOT NULL,
	"trigger" text NOT NULL,
	"state" text DEFAULT 'queued' NOT NULL,
	"visits" integer DEFAULT 0 NOT NULL,
	"details" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"started_at" timestamp with time zone DEFAULT now() NOT NULL,
	"finished_at" timestamp with time zone,
	CONSTRAINT "recompute_runs_state_chk" CHECK ("recompute_runs"."state" in ('queued','running','done','failed'))
);
--> statement-breakpoint
CREATE TABLE "stale_work" (
	"kind" text NOT NULL,
	"key" text NOT NULL,
	"since" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "stale_work_pk" PRIMARY KEY("kind","key"),
	CONSTRAINT "stale_work_kind_chk" CHECK ("stale_work"."kind" in ('fits','summary'))
);
--> statement-breakpoint
ALTER TABLE "species" ADD CONSTRAINT "species_version_id_species_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."species_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "species_synonyms" ADD CONSTRAINT "species_synonyms_version_id_species_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."species_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "species_synonyms" ADD CONSTRAINT "species_synonyms_species_id_species_id_fk" FOREIGN KEY ("species_id") REFERENCES "public"."species"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "batch_issues" ADD CONSTRAINT "batch_issues_batch_id_batches_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."batches"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "batch_unresolved_names" ADD CONSTRAINT "batch_unresolved_names_batch_id_batches_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."batches"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plot_visits" ADD CONSTRAINT "plot_visits_plot_id_plots_id_fk" FOREIGN KEY ("plot_id") REFERENCES "public"."plots"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plot_visits" ADD CONSTRAINT "plot_visits_batch_id_batches_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."batches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plots" ADD CONSTRAINT "plots_region_id_regions_id_fk" FOREIGN KEY ("region_id") REFERENCES "public"."regions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plots" ADD CONSTRAINT "plots_forest_type_forest_types_code_fk" FOREIGN KEY ("forest_type") REFERENCES "public"."forest_types"("code") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "stems" ADD CONSTRAINT "stems_visit_id_plot_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."plot_visits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD CONSTRAINT "plot_metrics_visit_id_plot_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."plot_visits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "plot_metrics" ADD CONSTRAINT "plot_metrics_species_version_id_species_versions_id_fk" FOREIGN KEY ("species_version_id") REFERENCES "public"."species_versions"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "region_summaries" ADD CONSTRAINT "region_summaries_region_id_regions_id_fk" FOREIGN KEY ("region_id") REFERENCES "public"."regions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "strata" ADD CONSTRAINT "strata_region_id_regions_id_fk" FOREIGN KEY ("region_id") REFERENCES "public"."regions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "strata" ADD CONSTRAINT "strata_batch_id_batches_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."batches"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "species_synonyms_species_idx" ON "species_synonyms" USING btree ("species_id");--> statement-breakpoint
CREATE INDEX "batch_issues_batch_idx" ON "batch_issues" USING btree ("batch_id","severity","rule");--> statement-breakpoint
CREATE UNIQUE INDEX "batch_unresolved_uq" ON "batch_unresolved_names" USING btree ("batch_id","name");--> statement-breakpoint
CREATE UNIQUE INDEX "batches_live_content_uq" ON "batches" USING btree ("content_hash") WHERE "batches"."state" not in ('rejected','failed');--> statement-breakpoint
CREATE INDEX "batches_state_idx" ON "batches" USING btree ("state");--> statement-breakpoint
CREATE INDEX "plot_visits_batch_idx" ON "plot_visits" USING btree ("batch_id");--> statement-breakpoint
CREATE INDEX "plot_visits_stale_idx" ON "plot_visits" USING btree ("stale") WHERE "plot_visits"."stale";--> statement-breakpoint
CREATE INDEX "plots_region_idx" ON "plots" USING btree ("region_id");--> statement-breakpoint
CREATE INDEX "plots_forest_type_idx" ON "plots" USING btree ("forest_type");--> statement-breakpoint
CREATE INDEX "audit_log_at_idx" ON "audit_log" USING btree ("at");