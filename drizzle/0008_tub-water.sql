CREATE TABLE "tub_water" (
	"tub_id" uuid PRIMARY KEY NOT NULL,
	"reading_id" uuid,
	"taken_at" timestamp with time zone,
	"analytes" text[],
	"units" text[],
	"vals" double precision[],
	"waiting" integer DEFAULT 0 NOT NULL,
	"waiting_newest" timestamp with time zone,
	"treatment_name" text,
	"treatment_amount" double precision,
	"treatment_unit" text,
	"treated_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "tub_water" ADD CONSTRAINT "tub_water_tub_id_tub_id_fk" FOREIGN KEY ("tub_id") REFERENCES "public"."tub"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
-- Each tub's current water, as the dashboard shows it, computed from the tub's history with an
-- index probe or two per tub (reading_current_idx, reading_waiting_idx, the pads of one reading,
-- treatment_tub_added_idx). The triggers below copy it into tub_water whenever it may change.
CREATE VIEW "tub_water_now" AS
SELECT t."id" AS "tub_id", cur."id" AS "reading_id", cur."taken_at", pads."analytes", pads."units", pads."vals",
       coalesce(w."n", 0) AS "waiting", w."newest" AS "waiting_newest",
       tr."product_name" AS "treatment_name", tr."amount" AS "treatment_amount", tr."unit" AS "treatment_unit", tr."added_at" AS "treated_at"
  FROM "tub" t
  LEFT JOIN LATERAL (
    SELECT r."id", r."taken_at" FROM "reading" r
     WHERE r."tub_id" = t."id" AND r."status" IN ('read', 'confirmed', 'manual') AND (NOT r."needs_review" OR r."reviewed_at" IS NOT NULL)
     ORDER BY r."taken_at" DESC LIMIT 1
  ) cur ON true
  LEFT JOIN LATERAL (
    SELECT array_agg(p."analyte" ORDER BY p."analyte") AS "analytes", array_agg(p."unit" ORDER BY p."analyte") AS "units",
           array_agg(coalesce(p."confirmed_value", p."read_value") ORDER BY p."analyte") AS "vals"
      FROM "reading_pad" p WHERE p."reading_id" = cur."id"
  ) pads ON true
  LEFT JOIN LATERAL (
    SELECT count(*)::int AS "n", max(r."taken_at") AS "newest" FROM "reading" r WHERE r."tub_id" = t."id" AND r."reviewed_at" IS NULL AND r."needs_review"
  ) w ON true
  LEFT JOIN LATERAL (
    SELECT x."product_name", x."amount", x."unit", x."added_at" FROM "treatment" x WHERE x."tub_id" = t."id" ORDER BY x."added_at" DESC LIMIT 1
  ) tr ON true;
--> statement-breakpoint
-- One tub's row made right again. Two transactions changing the same tub at once take turns on
-- its row: the second waits for the first to commit, then reads (READ COMMITTED: each statement
-- of this function takes a fresh snapshot) what both have written, so the last to commit leaves
-- the row right.
CREATE FUNCTION "tub_water_refresh"("one" uuid) RETURNS void LANGUAGE plpgsql AS $$
BEGIN
  IF NOT EXISTS (SELECT 1 FROM "tub" WHERE "id" = "one") THEN
    RETURN;
  END IF;
  INSERT INTO "tub_water" ("tub_id") VALUES ("one") ON CONFLICT DO NOTHING;
  PERFORM 1 FROM "tub_water" WHERE "tub_id" = "one" FOR UPDATE;
  UPDATE "tub_water" w
     SET ("reading_id", "taken_at", "analytes", "units", "vals", "waiting", "waiting_newest", "treatment_name", "treatment_amount", "treatment_unit", "treated_at") =
         (SELECT v."reading_id", v."taken_at", v."analytes", v."units", v."vals", v."waiting", v."waiting_newest", v."treatment_name", v."treatment_amount", v."treatment_unit", v."treated_at"
            FROM "tub_water_now" v WHERE v."tub_id" = "one")
   WHERE w."tub_id" = "one";
END;
$$;
--> statement-breakpoint
-- After each statement on readings, their pads or treatments: the tubs it touched, one at a time
-- in the order of their ids (so two transactions touching the same tubs never wait on each other
-- in a circle). An update that changes nothing the dashboard shows refreshes nothing.
CREATE FUNCTION "tub_water_after_reading"() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  "one" uuid;
BEGIN
  IF TG_OP = 'INSERT' THEN
    FOR "one" IN SELECT DISTINCT n."tub_id" FROM "new_rows" n ORDER BY 1 LOOP PERFORM "tub_water_refresh"("one"); END LOOP;
  ELSIF TG_OP = 'DELETE' THEN
    FOR "one" IN SELECT DISTINCT o."tub_id" FROM "old_rows" o ORDER BY 1 LOOP PERFORM "tub_water_refresh"("one"); END LOOP;
  ELSE
    FOR "one" IN
      SELECT x FROM (
        SELECT unnest(ARRAY[n."tub_id", o."tub_id"]) AS x FROM "new_rows" n JOIN "old_rows" o ON o."id" = n."id"
         WHERE (n."tub_id", n."status", n."needs_review", n."reviewed_at", n."taken_at") IS DISTINCT FROM (o."tub_id", o."status", o."needs_review", o."reviewed_at", o."taken_at")
      ) changed GROUP BY x ORDER BY x
    LOOP
      PERFORM "tub_water_refresh"("one");
    END LOOP;
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE FUNCTION "tub_water_after_pad"() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  "one" uuid;
BEGIN
  IF TG_OP = 'INSERT' THEN
    FOR "one" IN SELECT DISTINCT r."tub_id" FROM "new_rows" n JOIN "reading" r ON r."id" = n."reading_id" ORDER BY 1 LOOP PERFORM "tub_water_refresh"("one"); END LOOP;
  ELSIF TG_OP = 'DELETE' THEN
    FOR "one" IN SELECT DISTINCT r."tub_id" FROM "old_rows" o JOIN "reading" r ON r."id" = o."reading_id" ORDER BY 1 LOOP PERFORM "tub_water_refresh"("one"); END LOOP;
  ELSE
    FOR "one" IN
      SELECT DISTINCT r."tub_id" FROM "new_rows" n JOIN "old_rows" o ON o."id" = n."id" JOIN "reading" r ON r."id" IN (n."reading_id", o."reading_id")
       WHERE (n."reading_id", n."analyte", n."unit", n."read_value", n."confirmed_value") IS DISTINCT FROM (o."reading_id", o."analyte", o."unit", o."read_value", o."confirmed_value")
       ORDER BY 1
    LOOP
      PERFORM "tub_water_refresh"("one");
    END LOOP;
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE FUNCTION "tub_water_after_treatment"() RETURNS trigger LANGUAGE plpgsql AS $$
DECLARE
  "one" uuid;
BEGIN
  IF TG_OP = 'INSERT' THEN
    FOR "one" IN SELECT DISTINCT n."tub_id" FROM "new_rows" n ORDER BY 1 LOOP PERFORM "tub_water_refresh"("one"); END LOOP;
  ELSIF TG_OP = 'DELETE' THEN
    FOR "one" IN SELECT DISTINCT o."tub_id" FROM "old_rows" o ORDER BY 1 LOOP PERFORM "tub_water_refresh"("one"); END LOOP;
  ELSE
    FOR "one" IN
      SELECT x FROM (
        SELECT unnest(ARRAY[n."tub_id", o."tub_id"]) AS x FROM "new_rows" n JOIN "old_rows" o ON o."id" = n."id"
         WHERE (n."tub_id", n."product_name", n."amount", n."unit", n."added_at") IS DISTINCT FROM (o."tub_id", o."product_name", o."amount", o."unit", o."added_at")
      ) changed GROUP BY x ORDER BY x
    LOOP
      PERFORM "tub_water_refresh"("one");
    END LOOP;
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE FUNCTION "tub_water_after_tub"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  INSERT INTO "tub_water" ("tub_id") SELECT n."id" FROM "new_rows" n ON CONFLICT DO NOTHING;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER "tub_water_after_reading_insert" AFTER INSERT ON "reading" REFERENCING NEW TABLE AS "new_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_reading"();--> statement-breakpoint
CREATE TRIGGER "tub_water_after_reading_update" AFTER UPDATE ON "reading" REFERENCING OLD TABLE AS "old_rows" NEW TABLE AS "new_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_reading"();--> statement-breakpoint
CREATE TRIGGER "tub_water_after_reading_delete" AFTER DELETE ON "reading" REFERENCING OLD TABLE AS "old_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_reading"();--> statement-breakpoint
CREATE TRIGGER "tub_water_after_pad_insert" AFTER INSERT ON "reading_pad" REFERENCING NEW TABLE AS "new_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_pad"();--> statement-breakpoint
CREATE TRIGGER "tub_water_after_pad_update" AFTER UPDATE ON "reading_pad" REFERENCING OLD TABLE AS "old_rows" NEW TABLE AS "new_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_pad"();--> statement-breakpoint
CREATE TRIGGER "tub_water_after_pad_delete" AFTER DELETE ON "reading_pad" REFERENCING OLD TABLE AS "old_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_pad"();--> statement-breakpoint
CREATE TRIGGER "tub_water_after_treatment_insert" AFTER INSERT ON "treatment" REFERENCING NEW TABLE AS "new_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_treatment"();--> statement-breakpoint
CREATE TRIGGER "tub_water_after_treatment_update" AFTER UPDATE ON "treatment" REFERENCING OLD TABLE AS "old_rows" NEW TABLE AS "new_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_treatment"();--> statement-breakpoint
CREATE TRIGGER "tub_water_after_treatment_delete" AFTER DELETE ON "treatment" REFERENCING OLD TABLE AS "old_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_treatment"();--> statement-breakpoint
CREATE TRIGGER "tub_water_after_tub_insert" AFTER INSERT ON "tub" REFERENCING NEW TABLE AS "new_rows" FOR EACH STATEMENT EXECUTE FUNCTION "tub_water_after_tub"();--> statement-breakpoint
-- Existing tubs: filled in after the triggers exist (creating them waits for writers in flight and
-- holds new ones back until this commits), so no change is missed between the two.
INSERT INTO "tub_water" ("tub_id", "reading_id", "taken_at", "analytes", "units", "vals", "waiting", "waiting_newest", "treatment_name", "treatment_amount", "treatment_unit", "treated_at")
SELECT "tub_id", "reading_id", "taken_at", "analytes", "units", "vals", "waiting", "waiting_newest", "treatment_name", "treatment_amount", "treatment_unit", "treated_at" FROM "tub_water_now";
