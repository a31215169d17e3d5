// `npm run seed:scale -- --tubs 500 --readings 500`: a realistic service business in the
// database named by DATABASE_URL, made with SQL (generate_series) in well under a minute:
// one technician who looks after every tub, one owner per tub, weekly readings going back
// years (most confirmed, some unsure and waiting for review), treatments and visit notes.
// Everything is invented ("Lantern Bay Spa Care"); the same arguments give the same data.
//
// Sign-ins made here (password SCALE_PASSWORD): the technician, an admin, and the owners
// (owner-0001@scale.lanternbay.test …).
import { readFileSync } from "node:fs";
import path from "node:path";
import { hashPassword } from "better-auth/crypto";
import pg from "pg";
import { migrateDatabase } from "./migrate";

export const SCALE_PASSWORD = "dipwell-scale";
export const SCALE_TECH_EMAIL = "tech@scale.lanternbay.test";
export const SCALE_ADMIN_EMAIL = "admin@scale.lanternbay.test";
const CHART_FILE = "demo-6pad.json";

export type ScaleOptions = { tubs: number; readings: number; databaseUrl: string; log?: (line: string) => void };

function argValue(args: string[], name: string, fallback: number) {
  const i = args.indexOf(`--${name}`);
  if (i < 0) return fallback;
  const v = Number(args[i + 1]);
  if (!Number.isInteger(v) || v < 1 || v > 100_000) throw new Error(`--${name} needs a whole number from 1 to 100000, e.g. --${name} 500.`);
  return v;
}

/** Builds the business; replaces an earlier scale seed in the same database. Returns what it made. */
export async function seedScale(opts: ScaleOptions) {
  const log = opts.log ?? (() => {});
  const started = Date.now();
  await migrateDatabase(opts.databaseUrl);
  const client = new pg.Client({ connectionString: opts.databaseUrl });
  await client.connect();
  const step = async (what: string, text: string, params: unknown[] = []) => {
    const t0 = Date.now();
    const r = await client.query(text, params);
    log(`  ${what}: ${r.rowCount ?? 0} rows, ${((Date.now() - t0) / 1000).toFixed(1)} s`);
    return r;
  };
  try {
    // Rows are written consistently here (a reading is flagged when a pad is), so the
    // per-row trigger that keeps that true for the app is not needed during the load.
    await client.query("set synchronous_commit = off");
    await client.query("begin");
    // An earlier scale seed goes first, child tables before parents and each in one set-based
    // delete, so the cascades find nothing left to do row by row (with the foreign-key triggers
    // on: rows of other tables that point at these go with them as usual).
    const scaleTubs = `select t.id from tub t join "user" u on u.id = t.owner_id where u.email like '%@scale.lanternbay.test'`;
    await step("earlier scale pads removed", `delete from reading_pad p using reading r where r.id = p.reading_id and r.tub_id in (${scaleTubs})`);
    await step("earlier scale treatments removed", `delete from treatment where tub_id in (${scaleTubs})`);
    await step("earlier scale readings removed", `delete from reading where tub_id in (${scaleTubs})`);
    await step("earlier scale tubs removed", `delete from tub where id in (${scaleTubs})`);
    // The people are kept and updated below (removing a person makes PostgreSQL look through every
    // reading for their name, row by row); only owners beyond this seed's tubs go.
    await step(
      "earlier scale owners beyond this size removed",
      `delete from "user" where email like '%@scale.lanternbay.test' and id not in ('scale-tech', 'scale-admin')
          and not (id ~ '^scale-owner-[0-9]{1,6}$' and substring(id from 13)::int <= $1::int)`,
      [opts.tubs],
    );
    await step("earlier scale chart removed", `delete from strip_chart where name = 'Scale test chart (invented colours)'`);
    await client.query("set local session_replication_role = replica").catch(() => log("  (not a superuser: triggers stay on, the load is slower)"));

    const hash = await hashPassword(SCALE_PASSWORD);
    const chart = JSON.parse(readFileSync(path.join(process.cwd(), "calibration", CHART_FILE), "utf8"));
    chart.name = "Scale test chart (invented colours)";
    const {
      rows: [{ chart_id: chartId, batch_id: batchId }],
    } = await client.query(
      `with c as (insert into strip_chart (name) values ($1) returning id)
       insert into strip_batch (chart_id, lot, expires_on) select id, 'SCALE-1', '2030-12-31' from c returning chart_id, id as batch_id`,
      [chart.name],
    );
    await client.query(
      `with v as (insert into chart_version (chart_id, batch_id, version, definition, source, note)
                  values ($1, $2, 1, $3::jsonb, 'import', 'Scale test data') returning id)
       update strip_batch set current_version_id = (select id from v) where id = $2`,
      [chartId, batchId, JSON.stringify(chart)],
    );

    await step(
      "users",
      `insert into "user" (id, name, email, email_verified, role)
       values ('scale-tech', 'Morgan (scale technician)', $1, true, 'technician'),
              ('scale-admin', 'Quinn (scale admin)', $2, true, 'admin')
       union all
       select 'scale-owner-' || g, 'Owner ' || g || ' (scale)', 'owner-' || lpad(g::text, 4, '0') || '@scale.lanternbay.test', true, 'owner'
         from generate_series(1, $3::int) g
       on conflict (id) do update set name = excluded.name, email = excluded.email, email_verified = true, role = excluded.role, banned = false`,
      [SCALE_TECH_EMAIL, SCALE_ADMIN_EMAIL, opts.tubs],
    );
    await step(
      "credentials",
      `insert into account (id, account_id, provider_id, user_id, password)
       select id || '-credential', id, 'credential', id, $1 from "user" where email like '%@scale.lanternbay.test'
       on conflict (id) do update set password = excluded.password`,
      [hash],
    );
    const zones = ["Europe/London", "America/Vancouver", "Australia/Sydney", "America/New_York", "Europe/Berlin"];
    await step(
      "tubs",
      `insert into tub (owner_id, name, volume_litres, sanitiser, time_zone, batch_id, test_every_days, fill_date, created_at)
       select 'scale-owner-' || g,
              (array['Garden', 'Deck', 'Cabin', 'Terrace', 'Courtyard', 'Lakeside', 'Orchard', 'Harbour'])[1 + g % 8] || ' tub ' || g,
              900 + (g * 37) % 900, 'chlorine', ($2::text[])[1 + g % 5], $3::uuid, 7,
              current_date - (g % 90), now() - interval '11 years'
         from generate_series(1, $1::int) g`,
      [opts.tubs, zones, batchId],
    );
    await step(
      "technician access",
      `insert into tub_access (tub_id, technician_id, granted_by)
       select t.id, 'scale-tech', t.owner_id from tub t join "user" u on u.id = t.owner_id where u.email like '%@scale.lanternbay.test'`,
    );
    // Weekly readings, the newest a few days old. About 3 % are unsure: most of those were
    // reviewed long ago; the newest unsure ones of some tubs still wait for the technician.
    // Bulk load: the secondary indexes of the two big tables are built once afterwards,
    // which is quicker than keeping them up to date row by row.
    const { rows: indexes } = await client.query<{ name: string; def: string }>(
      `select i.indexrelid::regclass::text as name, pg_get_indexdef(i.indexrelid) as def
         from pg_index i
        where i.indrelid in ('reading'::regclass, 'reading_pad'::regclass) and not i.indisprimary
          and not exists (select 1 from pg_constraint c where c.conindid = i.indexrelid)`,
    );
    for (const ix of indexes) await client.query(`drop index ${ix.name}`);
    // The pads' own keys too (no table points at a pad): 1.5 million random keys are quicker
    // sorted once than inserted one by one.
    const { rows: keys } = await client.query<{ name: string; def: string }>(
      `select c.conname as name, pg_get_constraintdef(c.oid) as def from pg_constraint c
        where c.conrelid = 'reading_pad'::regclass and c.contype in ('p', 'u')
          and not exists (select 1 from pg_constraint f where f.contype = 'f' and f.confrelid = c.conrelid)`,
    );
    for (const k of keys) await client.query(`alter table reading_pad drop constraint "${k.name}"`);
    await client.query("set local maintenance_work_mem = '256MB'");
    await step(
      "readings",
      `insert into reading (tub_id, batch_id, chart_version_id, taken_at, status, needs_review, reviewed_by, reviewed_at, confirmed_by, confirmed_at, created_by)
       select t.id, t.batch_id, s.current_version_id, x.at,
              (case when x.unsure and x.n <= 8 then 'read' when x.n % 9 = 4 then 'read' else 'confirmed' end)::reading_status,
              x.unsure,
              case when x.unsure and x.n > 8 then 'scale-tech' end,
              case when x.unsure and x.n > 8 then x.at + interval '1 day' end,
              case when not (x.unsure and x.n <= 8) and x.n % 9 <> 4 then t.owner_id end,
              case when not (x.unsure and x.n <= 8) and x.n % 9 <> 4 then x.at + interval '10 minutes' end,
              t.owner_id
         from tub t
         join strip_batch s on s.id = t.batch_id
         cross join lateral (
           select n, now() - interval '2 days' - (n - 1) * interval '7 days' - (hashtext(t.id::text) % 3000) * interval '1 second' as at,
                  (hashtext(t.id::text || n) % 100 + 100) % 100 < 3 as unsure
             from generate_series(1, $1::int) n
         ) x
        where t.batch_id = $2::uuid`,
      [opts.readings, batchId],
    );
    // Six pads a reading: values wander around the usual ranges (invented drift).
    await step(
      "pads",
      `insert into reading_pad (reading_id, analyte, unit, read_value, confidence, needs_review, review_reason, confirmed_value, source, swatch_index)
       select r.id, p.analyte, p.unit, p.v, case when r.needs_review and p.analyte = 'free_chlorine' then 0.35 else 0.9 end,
              r.needs_review and p.analyte = 'free_chlorine',
              case when r.needs_review and p.analyte = 'free_chlorine' then 'Please check Free chlorine: its colour is between two swatches.' end,
              case when r.status = 'confirmed' then p.v end,
              case when r.status = 'confirmed' then 'confirmed' else 'auto' end, 2
         from reading r
         join tub t on t.id = r.tub_id and t.batch_id = $1::uuid
         cross join lateral (select hashtext(r.id::text) as h, ((hashtext(r.id::text) % 1000 + 1000) % 1000) / 1000.0 as u) k
         cross join lateral (values
           ('free_chlorine', 'mg/L', round((0.5 + 5 * k.u)::numeric, 1)::float8),
           ('total_chlorine', 'mg/L', round((0.8 + 5 * k.u)::numeric, 1)::float8),
           ('ph', 'pH', round((7.0 + 1.2 * ((k.h >> 8) % 100 + 100) % 100 / 100.0)::numeric, 1)::float8),
           ('total_alkalinity', 'mg/L as CaCO3', (60 + ((k.h >> 4) % 100 + 100) % 100)::float8),
           ('total_hardness', 'mg/L as CaCO3', (120 + ((k.h >> 12) % 200 + 200) % 200)::float8),
           ('cyanuric_acid', 'mg/L', (((k.h >> 16) % 60 + 60) % 60)::float8)
         ) p(analyte, unit, v)`,
      [batchId],
    );
    const t0 = Date.now();
    for (const k of keys) await client.query(`alter table reading_pad add constraint "${k.name}" ${k.def}`);
    for (const ix of indexes) await client.query(ix.def);
    log(`  keys and indexes rebuilt: ${keys.length + indexes.length}, ${((Date.now() - t0) / 1000).toFixed(1)} s`);
    await step(
      "treatments",
      `insert into treatment (tub_id, reading_id, product_name, chemical, parameter, amount, unit, added_at, retest_at, added_by)
       select r.tub_id, r.id, 'Granular chlorine (dichlor)', 'dichlor', 'free_chlorine', 10 + (hashtext(r.id::text) % 10 + 10) % 10, 'g',
              r.taken_at + interval '20 minutes', r.taken_at + interval '20 minutes' + interval '30 minutes', 'scale-tech'
         from reading r join tub t on t.id = r.tub_id and t.batch_id = $1::uuid
        where (hashtext(r.id::text) % 6 + 6) % 6 = 0`,
      [batchId],
    );
    await step(
      "visit notes",
      `insert into visit_note (tub_id, author_id, body, visited_at)
       select t.id, 'scale-tech', 'Cleaned the filter cartridge; water clear. Visit ' || n || '.', now() - n * interval '30 days'
         from tub t cross join generate_series(1, 12) n where t.batch_id = $1::uuid`,
      [batchId],
    );
    // The dashboard's row per tub (tub_water), which the triggers would have kept during an
    // ordinary load, set once from the loaded history.
    await step(
      "current water per tub",
      `insert into tub_water (tub_id, reading_id, taken_at, analytes, units, vals, waiting, waiting_newest, treatment_name, treatment_amount, treatment_unit, treated_at)
       select v.tub_id, v.reading_id, v.taken_at, v.analytes, v.units, v.vals, v.waiting, v.waiting_newest, v.treatment_name, v.treatment_amount, v.treatment_unit, v.treated_at
         from tub_water_now v join tub t on t.id = v.tub_id and t.batch_id = $1::uuid
       on conflict (tub_id) do update set (reading_id, taken_at, analytes, units, vals, waiting, waiting_newest, treatment_name, treatment_amount, treatment_unit, treated_at) =
          (excluded.reading_id, excluded.taken_at, excluded.analytes, excluded.units, excluded.vals, excluded.waiting, excluded.waiting_newest,
           excluded.treatment_name, excluded.treatment_amount, excluded.treatment_unit, excluded.treated_at)`,
      [batchId],
    );
    await client.query("commit");
    // A business's tables of years' standing have been vacuumed many times over: their visibility
    // maps are set, so index-only scans stay index-only. Freshly bulk-loaded tables have none, and
    // the planner would then prefer whole-table scans that no real history would see.
    await client.query("vacuum (analyze) reading, reading_pad, treatment, visit_note, tub, tub_access, tub_water");
    const {
      rows: [counts],
    } = await client.query(
      `select (select count(*)::int from tub where batch_id = $1) as tubs,
              (select count(*)::int from reading r join tub t on t.id = r.tub_id where t.batch_id = $1) as readings,
              (select count(*)::int from reading r join tub t on t.id = r.tub_id where t.batch_id = $1 and r.needs_review and r.reviewed_at is null) as waiting`,
      [batchId],
    );
    return { ...counts, batchId, seconds: (Date.now() - started) / 1000 };
  } catch (error) {
    await client.query("rollback").catch(() => {});
    throw error;
  } finally {
    await client.end();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const args = process.argv.slice(2);
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) {
    console.error("Set DATABASE_URL to the database to fill, e.g. DATABASE_URL=postgres://dipwell@127.0.0.1:54329/dipwell npm run seed:scale -- --tubs 500 --readings 500");
    process.exit(2);
  }
  try {
    const tubs = argValue(args, "tubs", 500);
    const readings = argValue(args, "readings", 500);
    console.log(`Seeding ${tubs} tubs × ${readings} readings…`);
    const r = await seedScale({ tubs, readings, databaseUrl, log: console.log });
    console.log(`Done in ${r.seconds.toFixed(1)} s: ${r.tubs} tubs, ${r.readings} readings, ${r.waiting} waiting for review.`);
    console.log(`Sign in as ${SCALE_TECH_EMAIL} (or ${SCALE_ADMIN_EMAIL}) with the password ${SCALE_PASSWORD}.`);
  } catch (error) {
    console.error(error instanceof Error ? error.message : error);
    process.exit(1);
  }
}
