CREATE TYPE "public"."cutter_status" AS ENUM('in_store', 'fitted', 'workshop', 'scrapped');--> statement-breakpoint
CREATE TYPE "public"."entry_action" AS ENUM('none', 'changed');--> statement-breakpoint
CREATE TYPE "public"."position_class" AS ENUM('centre', 'face', 'gauge');--> statement-breakpoint
CREATE TABLE "cutter_events" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"project_id" uuid NOT NULL,
	"cutter_id" uuid NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"kind" text NOT NULL,
	"position_id" uuid,
	"details" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"user_id" uuid
);
--> statement-breakpoint
CREATE TABLE "cutters" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"serial" text NOT NULL,
	"disc_size_in" double precision NOT NULL,
	"status" "cutter_status" DEFAULT 'in_store' NOT NULL,
	"rebuild_count" integer DEFAULT 0 NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "fittings" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"cutter_id" uuid NOT NULL,
	"position_id" uuid NOT NULL,
	"fitted_at" timestamp with time zone NOT NULL,
	"fitted_chainage_m" double precision NOT NULL,
	"fitted_ring" integer,
	"removed_at" timestamp with time zone,
	"removed_chainage_m" double precision,
	"removed_ring" integer,
	"removal_reason" text,
	"removal_conditions" text[]
);
--> statement-breakpoint
CREATE TABLE "inspection_entries" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"round_id" uuid NOT NULL,
	"position_id" uuid NOT NULL,
	"client_key" uuid NOT NULL,
	"fitting_id" uuid,
	"wear_mm" double precision,
	"conditions" text[] DEFAULT '{}'::text[] NOT NULL,
	"action" "entry_action" DEFAULT 'none' NOT NULL,
	"removed_cutter_id" uuid,
	"fitted_cutter_id" uuid,
	"change_reason" text,
	"note" text DEFAULT '' NOT NULL,
	"remeasured" boolean DEFAULT false NOT NULL,
	"recorded_at" timestamp with time zone DEFAULT now() NOT NULL,
	"recorded_by" uuid,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "inspection_rounds" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"started_at" timestamp with time zone NOT NULL,
	"chainage_m" double precision NOT NULL,
	"ring_number" integer,
	"crew" text DEFAULT '' NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"closed_at" timestamp with time zone,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "photos" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"entry_id" uuid NOT NULL,
	"client_key" uuid NOT NULL,
	"stored_name" text NOT NULL,
	"mime_type" text NOT NULL,
	"size_bytes" integer NOT NULL,
	"original_name" text DEFAULT '' NOT NULL,
	"uploaded_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "positions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"project_id" uuid NOT NULL,
	"number" integer NOT NULL,
	"track_radius_mm" double precision NOT NULL,
	"position_class" "position_class" NOT NULL,
	"disc_size_in" double precision NOT NULL,
	"tilt_deg" double precision,
	"wear_limit_mm" double precision NOT NULL,
	"twin_disc" boolean DEFAULT false NOT NULL,
	"angle_deg" double precision,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "projects" ADD COLUMN "ring_length_m" double precision DEFAULT 1.5 NOT NULL;--> statement-breakpoint
ALTER TABLE "cutter_events" ADD CONSTRAINT "cutter_events_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cutter_events" ADD CONSTRAINT "cutter_events_cutter_id_cutters_id_fk" FOREIGN KEY ("cutter_id") REFERENCES "public"."cutters"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cutter_events" ADD CONSTRAINT "cutter_events_position_id_positions_id_fk" FOREIGN KEY ("position_id") REFERENCES "public"."positions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cutter_events" ADD CONSTRAINT "cutter_events_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cutters" ADD CONSTRAINT "cutters_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fittings" ADD CONSTRAINT "fittings_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fittings" ADD CONSTRAINT "fittings_cutter_id_cutters_id_fk" FOREIGN KEY ("cutter_id") REFERENCES "public"."cutters"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fittings" ADD CONSTRAINT "fittings_position_id_positions_id_fk" FOREIGN KEY ("position_id") REFERENCES "public"."positions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_entries" ADD CONSTRAINT "inspection_entries_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_entries" ADD CONSTRAINT "inspection_entries_round_id_inspection_rounds_id_fk" FOREIGN KEY ("round_id") REFERENCES "public"."inspection_rounds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_entries" ADD CONSTRAINT "inspection_entries_position_id_positions_id_fk" FOREIGN KEY ("position_id") REFERENCES "public"."positions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_entries" ADD CONSTRAINT "inspection_entries_fitting_id_fittings_id_fk" FOREIGN KEY ("fitting_id") REFERENCES "public"."fittings"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_entries" ADD CONSTRAINT "inspection_entries_removed_cutter_id_cutters_id_fk" FOREIGN KEY ("removed_cutter_id") REFERENCES "public"."cutters"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_entries" ADD CONSTRAINT "inspection_entries_fitted_cutter_id_cutters_id_fk" FOREIGN KEY ("fitted_cutter_id") REFERENCES "public"."cutters"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_entries" ADD CONSTRAINT "inspection_entries_recorded_by_users_id_fk" FOREIGN KEY ("recorded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_rounds" ADD CONSTRAINT "inspection_rounds_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "inspection_rounds" ADD CONSTRAINT "inspection_rounds_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_entry_id_inspection_entries_id_fk" FOREIGN KEY ("entry_id") REFERENCES "public"."inspection_entries"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "positions" ADD CONSTRAINT "positions_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "cutter_events_cutter_idx" ON "cutter_events" USING btree ("cutter_id","at");--> statement-breakpoint
CREATE UNIQUE INDEX "cutters_project_serial_key" ON "cutters" USING btree ("project_id","serial");--> statement-breakpoint
CREATE INDEX "cutters_status_idx" ON "cutters" USING btree ("project_id","status");--> statement-breakpoint
CREATE UNIQUE INDEX "fittings_one_place_per_cutter" ON "fittings" USING btree ("cutter_id") WHERE removed_at is null;--> statement-breakpoint
CREATE UNIQUE INDEX "fittings_one_cutter_per_position" ON "fittings" USING btree ("position_id") WHERE removed_at is null;--> statement-breakpoint
CREATE INDEX "fittings_position_idx" ON "fittings" USING btree ("position_id","fitted_at");--> statement-breakpoint
CREATE UNIQUE INDEX "inspection_entries_client_key" ON "inspection_entries" USING btree ("project_id","client_key");--> statement-breakpoint
CREATE UNIQUE INDEX "inspection_entries_round_position" ON "inspection_entries" USING btree ("round_id","position_id");--> statement-breakpoint
CREATE INDEX "inspection_entries_fitting_idx" ON "inspection_entries" USING btree ("fitting_id");--> statement-breakpoint
CREATE INDEX "inspection_rounds_project_idx" ON "inspection_rounds" USING btree ("project_id","started_at");--> statement-breakpoint
CREATE UNIQUE INDEX "photos_client_key" ON "photos" USING btree ("project_id","client_key");--> statement-breakpoint
CREATE INDEX "photos_entry_idx" ON "photos" USING btree ("entry_id");--> statement-breakpoint
CREATE UNIQUE INDEX "positions_project_number_key" ON "positions" USING btree ("project_id","number");