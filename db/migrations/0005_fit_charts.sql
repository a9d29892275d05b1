CREATE TABLE "fit_charts" (
	"forest_type" text NOT NULL,
	"metric" text NOT NULL,
	"axis" text NOT NULL,
	"chart" jsonb NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "fit_charts_pk" PRIMARY KEY("forest_type","metric","axis")
);
