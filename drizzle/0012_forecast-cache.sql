CREATE TABLE "drive_data_versions" (
	"project_id" uuid PRIMARY KEY NOT NULL,
	"version" integer DEFAULT 0 NOT NULL,
	"changed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "forecast_cache" (
	"project_id" uuid PRIMARY KEY NOT NULL,
	"data_version" integer NOT NULL,
	"code_version" text NOT NULL,
	"computed_at" timestamp with time zone NOT NULL,
	"body" text NOT NULL,
	"explanations" jsonb NOT NULL
);
--> statement-breakpoint
ALTER TABLE "drive_data_versions" ADD CONSTRAINT "drive_data_versions_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "forecast_cache" ADD CONSTRAINT "forecast_cache_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;