CREATE TABLE "entry_rolled_km" (
	"entry_id" uuid NOT NULL,
	"project_id" uuid NOT NULL,
	"ground_key" text NOT NULL,
	"rolled_km" double precision NOT NULL,
	CONSTRAINT "entry_rolled_km_entry_id_ground_key_pk" PRIMARY KEY("entry_id","ground_key")
);
--> statement-breakpoint
CREATE TABLE "forecast_settings" (
	"project_id" uuid PRIMARY KEY NOT NULL,
	"class_factors" jsonb NOT NULL,
	"gehring_site_factor" double precision NOT NULL,
	"prior_strength" double precision NOT NULL,
	"tip_width_mm" double precision NOT NULL,
	"overcut_margin_mm" double precision NOT NULL,
	"window_strokes" integer NOT NULL,
	"overrides" jsonb NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "entry_rolled_km" ADD CONSTRAINT "entry_rolled_km_entry_id_inspection_entries_id_fk" FOREIGN KEY ("entry_id") REFERENCES "public"."inspection_entries"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "entry_rolled_km" ADD CONSTRAINT "entry_rolled_km_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "forecast_settings" ADD CONSTRAINT "forecast_settings_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "entry_rolled_km_project_idx" ON "entry_rolled_km" USING btree ("project_id");