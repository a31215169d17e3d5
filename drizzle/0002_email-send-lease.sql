ALTER TABLE "email_log" ADD COLUMN "lease_until" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "email_log" ADD COLUMN "job_id" uuid;--> statement-breakpoint
ALTER TABLE "email_log" ADD COLUMN "message_id" text;--> statement-breakpoint
ALTER TABLE "email_log" ADD COLUMN "smtp_response" text;--> statement-breakpoint
CREATE INDEX "email_log_sending_lease_idx" ON "email_log" USING btree ("lease_until") WHERE "email_log"."status" = 'sending';