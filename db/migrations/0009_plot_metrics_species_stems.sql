ALTER TABLE "plot_metrics" ADD COLUMN "species_stems" jsonb;--> statement-breakpoint
-- Visits computed before species_stems existed are due again, so the next run stores their species.
UPDATE "plot_visits" SET "stale" = true WHERE NOT "stale" AND "id" IN (SELECT "visit_id" FROM "plot_metrics");
