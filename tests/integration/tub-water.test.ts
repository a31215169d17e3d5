// Each tub's current water as the dashboard reads it (tub_water, kept by the triggers of
// drizzle/0008) on the real database: always what the tub's history says (the view
// tub_water_now computes it from the history), after every kind of change, with several
// writers at once, and for the history a database already had when the migration ran.
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import pg from "pg";
import { afterAll, describe, expect, it } from "vitest";
import { db } from "~/lib/db.server";
import { migrateDatabase } from "~/ops/migrate";
import { createTub, createUser } from "../support/fixtures";

const sql = (text: string, params: unknown[] = []) => db.$client.query(text, params);

/** The stored row and the one computed from the history, for these tubs, side by side. */
async function stored(tubIds: string[]) {
  const cols = `tub_id, reading_id, taken_at, analytes, units, vals, waiting, waiting_newest, treatment_name, treatment_amount, treatment_unit, treated_at`;
  const kept = (await sql(`select ${cols} from tub_water where tub_id = any($1::uuid[]) order by tub_id`, [tubIds])).rows;
  const now = (await sql(`select ${cols} from tub_water_now where tub_id = any($1::uuid[]) order by tub_id`, [tubIds])).rows;
  return { kept, now };
}

async function reading(tubId: string, at: Date, status: string, pads: [string, number, boolean?][], needsReview = false) {
  const [r] = (await sql(`insert into reading (tub_id, taken_at, status, needs_review) values ($1, $2, $3, $4) returning id`, [tubId, at, status, needsReview])).rows;
  for (const [analyte, v, unsure] of pads) {
    await sql(`insert into reading_pad (reading_id, analyte, unit, read_value, needs_review) values ($1, $2, 'mg/L', $3, $4)`, [r.id, analyte, v, unsure ?? false]);
  }
  return r.id as string;
}

describe("a tub's current water (tub_water)", () => {
  it("follows every change to readings, pads and treatments", async () => {
    const owner = await createUser("owner");
    const tub = (await createTub(owner.id)).id;
    const day = (n: number) => new Date(Date.UTC(2026, 5, n, 9));
    const expectRight = async () => {
      const { kept, now } = await stored([tub]);
      expect(kept).toEqual(now);
      return kept[0];
    };
    // A new tub: a row with nothing in it yet.
    expect(await expectRight()).toMatchObject({ reading_id: null, waiting: 0, treatment_name: null });
    const first = await reading(tub, day(1), "read", [["free_chlorine", 3], ["ph", 7.4]]);
    expect(await expectRight()).toMatchObject({ reading_id: first, analytes: ["free_chlorine", "ph"], vals: [3, 7.4], waiting: 0 });
    // A newer reading with an unsure pad waits for review and is not the water.
    const unsure = await reading(tub, day(2), "read", [["free_chlorine", 0.5, true], ["ph", 7.2]]);
    expect(await expectRight()).toMatchObject({ reading_id: first, waiting: 1, waiting_newest: day(2) });
    // Its review: a corrected value, then the reading counts as the water.
    await sql(`update reading_pad set confirmed_value = 1.5, source = 'corrected' where reading_id = $1 and analyte = 'free_chlorine'`, [unsure]);
    expect(await expectRight()).toMatchObject({ reading_id: first, waiting: 1 });
    await sql(`update reading set reviewed_at = now(), status = 'confirmed' where id = $1`, [unsure]);
    expect(await expectRight()).toMatchObject({ reading_id: unsure, vals: [1.5, 7.2], waiting: 0, waiting_newest: null });
    // A pending photo and a failed reading are never the water.
    await sql(`insert into reading (tub_id, taken_at, status) values ($1, $2, 'pending'), ($1, $3, 'failed')`, [tub, day(3), day(4)]);
    expect(await expectRight()).toMatchObject({ reading_id: unsure });
    // Treatments: the last one logged, after an edit and a removal.
    const [tr] = (await sql(`insert into treatment (tub_id, product_name, chemical, amount, unit, added_at) values ($1, 'Granular chlorine', 'dichlor', 12, 'g', $2) returning id`, [tub, day(2)])).rows;
    await sql(`insert into treatment (tub_id, product_name, chemical, amount, unit, added_at) values ($1, 'pH down', 'sodium bisulfate', 20, 'g', $2)`, [tub, day(1)]);
    expect(await expectRight()).toMatchObject({ treatment_name: "Granular chlorine", treatment_amount: 12 });
    await sql(`update treatment set amount = 14 where id = $1`, [tr.id]);
    expect(await expectRight()).toMatchObject({ treatment_amount: 14 });
    await sql(`delete from treatment where id = $1`, [tr.id]);
    expect(await expectRight()).toMatchObject({ treatment_name: "pH down" });
    // A pad removed, then the whole reading: the water goes back to the one before.
    await sql(`delete from reading_pad where reading_id = $1 and analyte = 'ph'`, [unsure]);
    expect(await expectRight()).toMatchObject({ reading_id: unsure, analytes: ["free_chlorine"] });
    await sql(`delete from reading where id = $1`, [unsure]);
    expect(await expectRight()).toMatchObject({ reading_id: first });
    // Removing the tub removes its row.
    await sql(`delete from tub where id = $1`, [tub]);
    expect((await sql(`select 1 from tub_water where tub_id = $1`, [tub])).rowCount).toBe(0);
  });

  it("stays right with many writers on the same tubs at once", async () => {
    const owner = await createUser("owner");
    const tubs = [(await createTub(owner.id)).id, (await createTub(owner.id)).id];
    const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 12 });
    try {
      // Twelve transactions at once, each writing a reading, its pad and a treatment to one of the
      // tubs (every third to both, in the same order) and holding its locks a moment before
      // committing, so their turns overlap.
      await Promise.all(
        Array.from({ length: 12 }, async (_, i) => {
          const c = await pool.connect();
          try {
            await c.query("begin");
            for (const tub of i % 3 === 2 ? tubs : [tubs[i % 2]]) {
              const at = new Date(Date.UTC(2026, 6, 1 + i, 9));
              const {
                rows: [r],
              } = await c.query(`insert into reading (tub_id, taken_at, status, needs_review) values ($1, $2, 'read', $3) returning id`, [tub, at, i % 3 === 0]);
              await c.query(`insert into reading_pad (reading_id, analyte, unit, read_value, needs_review) values ($1, 'ph', 'pH', $2, $3)`, [r.id, 7 + i / 10, i % 3 === 0]);
              await c.query(`insert into treatment (tub_id, product_name, chemical, amount, unit, added_at) values ($1, $2, 'dichlor', $3, 'g', $4)`, [tub, `Dose ${i}`, i, at]);
              await c.query("select pg_sleep(0.02)");
            }
            await c.query("commit");
          } finally {
            c.release();
          }
        }),
      );
    } finally {
      await pool.end();
    }
    const { kept, now } = await stored(tubs);
    expect(kept).toHaveLength(2);
    expect(kept).toEqual(now);
    // Unsure: writers 0, 3, 6 and 9, which wrote to tub 0, 1, 0 and 1.
    expect(kept.map((k) => k.waiting)).toEqual([2, 2]);
    // The last dose: writer 11's, which wrote to both.
    expect(kept.map((k) => k.treatment_name)).toEqual(["Dose 11", "Dose 11"]);
  });
});

describe("migration 0008 on a database with history", () => {
  const folder = mkdtempSync(path.join(tmpdir(), "dipwell-migrations-"));
  const name = `dipwell_migrate_${Date.now().toString(36)}`;
  const admin = new pg.Client({ connectionString: process.env.DATABASE_URL });
  afterAll(async () => {
    await admin.query(`drop database if exists "${name}" with (force)`).catch(() => {});
    await admin.end();
    rmSync(folder, { recursive: true, force: true });
  });

  it("fills in every existing tub's row from its history", async () => {
    await admin.connect();
    await admin.query(`create database "${name}"`);
    const url = new URL(process.env.DATABASE_URL!);
    url.pathname = `/${name}`;
    // The migrations up to 0007 first: the database as it was before this one.
    cpSync("drizzle", path.join(folder, "drizzle"), { recursive: true });
    const journalFile = path.join(folder, "drizzle", "meta", "_journal.json");
    const journal = JSON.parse(readFileSync(journalFile, "utf8"));
    const upTo = journal.entries.findIndex((e: { tag: string }) => e.tag.startsWith("0008_"));
    writeFileSync(journalFile, JSON.stringify({ ...journal, entries: journal.entries.slice(0, upTo) }));
    await migrateDatabase(url.toString(), folder);
    const c = new pg.Client({ connectionString: url.toString() });
    await c.connect();
    try {
      await c.query(`insert into "user" (id, name, email, role) values ('u1', 'Owner', 'owner@dipwell.test', 'owner')`);
      const tubs = (
        await c.query(`insert into tub (owner_id, name, volume_litres, sanitiser) select 'u1', 'Tub ' || g, 1200, 'chlorine' from generate_series(1, 3) g returning id`)
      ).rows.map((r) => r.id as string);
      // Tub 1: weekly readings, the newest unsure; tub 2: one reading and a treatment; tub 3: nothing.
      await c.query(
        `with r as (insert into reading (tub_id, taken_at, status, needs_review)
                    select $1, timestamptz '2026-01-01' + g * interval '7 days', 'read', g = 20 from generate_series(1, 20) g returning id, needs_review)
         insert into reading_pad (reading_id, analyte, unit, read_value, needs_review) select id, a, 'mg/L', 3, needs_review from r, unnest(array['free_chlorine', 'ph']) a`,
        [tubs[0]],
      );
      await c.query(`with r as (insert into reading (tub_id, taken_at, status) values ($1, '2026-03-01', 'manual') returning id)
                     insert into reading_pad (reading_id, analyte, unit, read_value) select id, 'ph', 'pH', 7.9 from r`, [tubs[1]]);
      await c.query(`insert into treatment (tub_id, product_name, chemical, amount, unit, added_at) values ($1, 'pH down', 'sodium bisulfate', 20, 'g', '2026-03-01 10:00')`, [tubs[1]]);
      await migrateDatabase(url.toString());
      const cols = `tub_id, reading_id, taken_at, analytes, units, vals, waiting, waiting_newest, treatment_name, treatment_amount, treatment_unit, treated_at`;
      const kept = (await c.query(`select ${cols} from tub_water order by tub_id`)).rows;
      const now = (await c.query(`select ${cols} from tub_water_now order by tub_id`)).rows;
      expect(kept).toHaveLength(3);
      expect(kept).toEqual(now);
      const byTub = new Map(kept.map((r) => [r.tub_id, r]));
      expect(byTub.get(tubs[0])).toMatchObject({ waiting: 1, analytes: ["free_chlorine", "ph"], taken_at: new Date("2026-05-14T00:00:00Z") });
      expect(byTub.get(tubs[1])).toMatchObject({ vals: [7.9], treatment_name: "pH down" });
      expect(byTub.get(tubs[2])).toMatchObject({ reading_id: null, waiting: 0 });
    } finally {
      await c.end();
    }
  });
});
