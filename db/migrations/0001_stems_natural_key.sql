ALTER TABLE "stems" DROP CONSTRAINT "stems_visit_tree_uq";--> statement-breakpoint
ALTER TABLE "stems" DROP COLUMN "id";--> statement-breakpoint
ALTER TABLE "stems" ADD CONSTRAINT "stems_pkey" PRIMARY KEY("visit_id","tree_id");
