CREATE TABLE "entry_submissions" (
	"client_key" uuid NOT NULL,
	"project_id" uuid NOT NULL,
	"entry_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "entry_submissions_project_id_client_key_pk" PRIMARY KEY("project_id","client_key")
);
--> statement-breakpoint
ALTER TABLE "entry_submissions" ADD CONSTRAINT "entry_submissions_project_id_projects_id_fk" FOREIGN KEY ("project_id") REFERENCES "public"."projects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "entry_submissions" ADD CONSTRAINT "entry_submissions_entry_id_inspection_entries_id_fk" FOREIGN KEY ("entry_id") REFERENCES "public"."inspection_entries"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "entry_submissions_entry_idx" ON "entry_submissions" USING btree ("entry_id");