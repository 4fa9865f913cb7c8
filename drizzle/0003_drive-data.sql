CREATE TABLE "fitting_rolled_km" (
	"fitting_id" uuid NOT NULL,
	"project_id" uuid NOT NULL,
	"ground_key" text NOT NULL,
	"rolled_km" double precision NOT NULL,
	CONSTRAINT "fitting_rolled_km_fitting_id_ground_key_pk" PRIMARY KEY("fitting_id","ground_key")
);
--> statement-breakpoint
CREATE TABLE "geology_sections" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"chainage_from_m" double precision NOT NULL,
	"chainage_to_m" double precision NOT NULL,
	"ground_type_id" uuid NOT NULL,
	"water_head_m" double precision DEFAULT 0 NOT NULL,
	"stop_allowed" boolean DEFAULT true NOT NULL,
	"stop_reason" text DEFAULT '' NOT NULL
);
--> statement-breakpoint
CREATE TABLE "ground_types" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"ucs_mpa" double precision,
	"cai" double precision,
	"quartz_pct" double precision,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "import_mappings" (
	"project_id" uuid NOT NULL,
	"kind" text NOT NULL,
	"mapping" jsonb NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "import_mappings_project_id_kind_pk" PRIMARY KEY("project_id","kind")
);
--> statement-breakpoint
CREATE TABLE "rolled_distance_state" (
	"project_id" uuid PRIMARY KEY NOT NULL,
	"through_ring" integer NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "strokes" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"project_id" uuid NOT NULL,
	"ring_number" integer NOT NULL,
	"start_time" timestamp with time zone NOT NULL,
	"end_time" timestamp with time zone NOT NULL,
	"chainage_start_m" double precision NOT NULL,
	"chainage_end_m" double precision NOT NULL,
	"revolutions" double precision,
	"penetration_mm_per_rev" double precision,
	"rpm" double precision,
	"thrust_kn" double precision,
	"torque_knm" double precision,
	"extra" jsonb DEFAULT '{}'::jsonb NOT NULL
);
--> statement-breakpoint
ALTER TABLE "fitting_rolled_km" ADD CONSTRAINT "fitting_rolled_km_fitting_id_fittings_id_fk" FOREIGN KEY ("fitting_id") REFERENCES "public"."fittings"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fitting_rolled_km" ADD CONSTRAINT "fitting_rolled_km_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "geology_sections" ADD CONSTRAINT "geology_sections_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "geology_sections" ADD CONSTRAINT "geology_sections_ground_type_id_ground_types_id_fk" FOREIGN KEY ("ground_type_id") REFERENCES "public"."ground_types"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ground_types" ADD CONSTRAINT "ground_types_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "import_mappings" ADD CONSTRAINT "import_mappings_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rolled_distance_state" ADD CONSTRAINT "rolled_distance_state_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "strokes" ADD CONSTRAINT "strokes_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "fitting_rolled_km_project_idx" ON "fitting_rolled_km" USING btree ("project_id");--> statement-breakpoint
CREATE INDEX "geology_sections_project_idx" ON "geology_sections" USING btree ("project_id","chainage_from_m");--> statement-breakpoint
CREATE UNIQUE INDEX "ground_types_project_name_key" ON "ground_types" USING btree ("project_id","name");--> statement-breakpoint
CREATE UNIQUE INDEX "strokes_project_ring_key" ON "strokes" USING btree ("project_id","ring_number");--> statement-breakpoint
CREATE INDEX "strokes_project_time_idx" ON "strokes" USING btree ("project_id","start_time");