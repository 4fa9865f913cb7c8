CREATE TABLE "password_reset_requests" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"email" text NOT NULL,
	"ip" text NOT NULL
);
--> statement-breakpoint
ALTER TABLE "sign_in_attempts" ADD COLUMN "device_id" text;--> statement-breakpoint
CREATE INDEX "password_reset_requests_email_idx" ON "password_reset_requests" USING btree ("email","at");--> statement-breakpoint
CREATE INDEX "password_reset_requests_ip_idx" ON "password_reset_requests" USING btree ("ip","at");