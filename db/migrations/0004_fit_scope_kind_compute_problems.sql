CREATE TABLE "compute_problems" (
	"stage" text NOT NULL,
	"subject" text NOT NULL,
	"run_id" text NOT NULL,
	"forest_type" text,
	"region" text,
	"visit_id" bigint,
	"plot_key" text,
	"reason" text NOT NULL,
	"recorded_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "compute_problems_pk" PRIMARY KEY("stage","subject"),
	CONSTRAINT "compute_problems_stage_chk" CHECK ("compute_problems"."stage" in ('plot','fit','summary'))
);
--> statement-breakpoint
ALTER TABLE "curve_fits" ADD COLUMN "scope_kind" text DEFAULT 'region' NOT NULL;--> statement-breakpoint
-- Before this migration scope 'all' could only be the forest type as a whole (a region named 'all' failed to store).
UPDATE "curve_fits" SET "scope_kind" = 'forest_type' WHERE "scope" = 'all';--> statement-breakpoint
ALTER TABLE "curve_fits" DROP CONSTRAINT "curve_fits_pk";
--> statement-breakpoint
ALTER TABLE "curve_fits" ADD CONSTRAINT "curve_fits_pk" PRIMARY KEY("scope_kind","scope","forest_type","metric","axis","model");--> statement-breakpoint
ALTER TABLE "curve_fits" ADD CONSTRAINT "curve_fits_scope_kind_chk" CHECK ("curve_fits"."scope_kind" in ('forest_type','region'));