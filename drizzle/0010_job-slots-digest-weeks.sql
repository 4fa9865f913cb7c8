CREATE TABLE "digest_weeks" (
	"digest" text NOT NULL,
	"project_id" uuid NOT NULL,
	"iso_week" text NOT NULL,
	"mails" integer NOT NULL,
	"sent_at" timestamp with time zone DEFAULT now() NOT NULL,
	"resent" integer DEFAULT 0 NOT NULL,
	CONSTRAINT "digest_weeks_digest_project_id_iso_week_pk" PRIMARY KEY("digest","project_id","iso_week")
);
--> statement-breakpoint
ALTER TABLE "job_runs" ADD COLUMN "slot_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "digest_weeks" ADD CONSTRAINT "digest_weeks_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "job_runs_slot_key" ON "job_runs" USING btree ("job","slot_at") WHERE "job_runs"."outcome" in ('running', 'ok');