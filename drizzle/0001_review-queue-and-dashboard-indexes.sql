CREATE INDEX "email_log_updated_idx" ON "email_log" USING btree ("updated_at");--> statement-breakpoint
CREATE INDEX "email_log_status_updated_idx" ON "email_log" USING btree ("status","updated_at");--> statement-breakpoint
CREATE INDEX "reading_current_idx" ON "reading" USING btree ("tub_id","taken_at") WHERE status in ('read', 'confirmed', 'manual') and (not needs_review or reviewed_at is not null);--> statement-breakpoint
CREATE INDEX "reading_waiting_idx" ON "reading" USING btree ("tub_id","taken_at") WHERE reviewed_at is null and needs_review;--> statement-breakpoint
-- A reading is unsure when any of its pads is: keep reading.needs_review in step with its pads,
-- so the review queue and the dashboard can use the partial indexes above.
UPDATE "reading" r SET "needs_review" = true WHERE NOT r."needs_review" AND EXISTS (SELECT 1 FROM "reading_pad" p WHERE p."reading_id" = r."id" AND p."needs_review");--> statement-breakpoint
CREATE FUNCTION "reading_pad_flags_reading"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF NEW."needs_review" THEN
    UPDATE "reading" SET "needs_review" = true WHERE "id" = NEW."reading_id" AND NOT "needs_review";
  END IF;
  RETURN NEW;
END;
$$;--> statement-breakpoint
CREATE TRIGGER "reading_pad_flags_reading" AFTER INSERT OR UPDATE OF "needs_review" ON "reading_pad" FOR EACH ROW WHEN (NEW."needs_review") EXECUTE FUNCTION "reading_pad_flags_reading"();
