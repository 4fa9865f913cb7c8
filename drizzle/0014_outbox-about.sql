ALTER TABLE "outbox" ADD COLUMN "about_stop_id" uuid;--> statement-breakpoint
ALTER TABLE "outbox" ADD COLUMN "about_user_id" uuid;--> statement-breakpoint
ALTER TABLE "outbox" ADD CONSTRAINT "outbox_about_stop_id_stops_id_fk" FOREIGN KEY ("about_stop_id") REFERENCES "public"."stops"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "outbox" ADD CONSTRAINT "outbox_about_user_id_users_id_fk" FOREIGN KEY ("about_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "outbox_created_idx" ON "outbox" USING btree ("created_at");