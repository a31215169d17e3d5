// A service business's worth of data on the real database: the review queue lists every waiting
// reading in order, the dashboard stays right with tens of thousands of unreviewed readings, and
// every list answers a malformed or out-of-range page, sort or period in words, never with a 500.
// Data is made with SQL (generate_series), so each test takes seconds.
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { dashboard, reviewQueue } from "~/features/clients/clients.server";
import { db } from "~/lib/db.server";
import { callRoute, createTub, createUser, shareTub, type TestUser } from "../support/fixtures";
import { importRoute } from "../support/routes";

const sql = (text: string, params: unknown[] = []) => db.$client.query(text, params);
const asTech = (u: TestUser) => ({ id: u.id, role: u.role, name: "Technician" }) as never;

describe("the review queue", () => {
  let tech: TestUser, owner: TestUser;
  let tubIds: string[];
  let expected: string[];

  beforeAll(async () => {
    [tech, owner] = await Promise.all([createUser("technician"), createUser("owner")]);
    tubIds = [];
    for (let i = 0; i < 30; i++) {
      const t = await createTub(owner.id, { name: `Queue tub ${String(i).padStart(2, "0")}` });
      await shareTub(t.id, tech.id, owner.id);
      tubIds.push(t.id);
    }
    // 300 waiting readings, spread over the 30 tubs out of time order (a tub's readings interleave with others').
    await sql(
      `insert into reading (tub_id, taken_at, status, needs_review)
       select ($1::uuid[])[1 + (g * 7) % 30], timestamptz '2026-03-01 08:00Z' + ((g * 37) % 300) * interval '1 hour', 'read', true
         from generate_series(0, 299) g`,
      [tubIds],
    );
    // Not waiting: reviewed, sure, or confirmed by the owner; and a waiting reading of a tub not shared.
    await sql(
      `insert into reading (tub_id, taken_at, status, needs_review, reviewed_at)
       select ($1::uuid[])[1 + g % 30], timestamptz '2026-02-01Z' + g * interval '1 hour',
              (case when g % 3 = 0 then 'confirmed' else 'read' end)::reading_status, g % 2 = 0, case when g % 2 = 0 then now() end
         from generate_series(0, 89) g`,
      [tubIds],
    );
    const stranger = await createTub(owner.id, { name: "Not shared" });
    await sql(`insert into reading (tub_id, taken_at, status, needs_review) values ($1, '2026-01-01Z', 'read', true)`, [stranger.id]);
    // One reading whose reading row was not flagged, only a pad: it waits too.
    const [padOnly] = (await sql(`insert into reading (tub_id, taken_at, status) values ($1, '2026-03-20Z', 'read') returning id`, [tubIds[3]])).rows;
    await sql(`insert into reading_pad (reading_id, analyte, unit, read_value, needs_review, review_reason) values ($1, 'ph', 'pH', 7.9, true, 'Pale pad')`, [padOnly.id]);
    expected = (
      await sql(
        `select r.id from reading r where r.tub_id = any($1::uuid[]) and r.reviewed_at is null and r.needs_review order by r.taken_at, r.id`,
        [tubIds],
      )
    ).rows.map((r) => r.id);
  });

  it("lists every waiting reading, oldest first, page by page", async () => {
    expect(expected).toHaveLength(301);
    const first = await reviewQueue(asTech(tech));
    expect(first.page.total).toBe(301);
    const seen: string[] = [];
    for (let p = 1; p <= first.page.pages; p++) {
      const page = await reviewQueue(asTech(tech), { page: p });
      expect(page.items.length).toBeLessThanOrEqual(page.page.size);
      seen.push(...page.items.map((i) => i.id));
    }
    expect(seen).toEqual(expected);
    const times = seen.length;
    expect(new Set(seen).size).toBe(times);
  });

  it("the page shows the count and answers a bad page number with the first page", async () => {
    const mod = await importRoute("routes/clients/review.tsx");
    for (const page of ["abc", "0", "-3", "1e9", "99999", "2.5"]) {
      const r = await callRoute(mod.loader!, { url: `/clients/review?page=${page}`, user: tech });
      expect(r.status).toBe(200);
      const d = r.data as { page: { page: number; total: number }; items: { id: string }[] };
      expect(d.page.page).toBe(1);
      expect(d.page.total).toBe(301);
      expect(d.items[0].id).toBe(expected[0]);
    }
  });

  it("a one-tap confirm takes the reading out of the queue, counts it as the water and tells the owner", async () => {
    const mod = await importRoute("routes/clients/review.tsx");
    const readingId = expected[0];
    const [pad] = (await sql(`insert into reading_pad (reading_id, analyte, unit, read_value, needs_review) values ($1, 'free_chlorine', 'mg/L', 3, true) returning id`, [readingId])).rows;
    const r = await callRoute(mod.action!, { url: "/clients/review", user: tech, form: { readingId, intent: "confirm", page: "1" } });
    expect(r.status).toBe(302);
    const after = (await db.query.reading.findFirst({ where: eq(s.reading.id, readingId) }))!;
    expect(after.reviewedBy).toBe(tech.id);
    expect(after.status).toBe("confirmed");
    expect((await db.query.readingPad.findFirst({ where: eq(s.readingPad.id, pad.id) }))!.confirmedValue).toBe(3);
    const mail = await db.query.emailLog.findFirst({ where: eq(s.emailLog.dedupeKey, `reviewed:${readingId}`) });
    expect(mail?.to).toBe(owner.email);
    expect(mail?.subject).toMatch(/reviewed/);
    expect((await reviewQueue(asTech(tech))).page.total).toBe(300);
    // Reviewing twice is refused in words.
    const again = await callRoute(mod.action!, { url: "/clients/review", user: tech, form: { readingId, intent: "confirm" } });
    expect(again.status).toBe(409);
  });

  it("a correction by a tapped swatch or a typed value replaces the read value", async () => {
    const mod = await importRoute("routes/clients/review.tsx");
    const readingId = expected[1];
    const [a] = (await sql(`insert into reading_pad (reading_id, analyte, unit, read_value, needs_review) values ($1, 'ph', 'pH', 7.2, true) returning id`, [readingId])).rows;
    const [b] = (await sql(`insert into reading_pad (reading_id, analyte, unit, read_value) values ($1, 'free_chlorine', 'mg/L', 1) returning id`, [readingId])).rows;
    const bad = await callRoute(mod.action!, { url: "/clients/review", user: tech, form: { readingId, intent: "correct", [`pad_${a.id}`]: "lots" } });
    expect(bad.status).toBe(400);
    expect((bad.data as { form: string }).form).toMatch(/numbers/);
    const r = await callRoute(mod.action!, { url: "/clients/review", user: tech, form: { readingId, intent: "correct", [`swatch_${a.id}`]: "7.8", [`swatch_${b.id}`]: "3", [`pad_${b.id}`]: "2" } });
    expect(r.status).toBe(302);
    const pads = await db.select().from(s.readingPad).where(eq(s.readingPad.readingId, readingId));
    expect(pads.find((p) => p.id === a.id)).toMatchObject({ confirmedValue: 7.8, source: "corrected" });
    expect(pads.find((p) => p.id === b.id)).toMatchObject({ confirmedValue: 2, source: "corrected" });
  });
});

describe("the dashboard with 70,000 unreviewed readings", () => {
  let tech: TestUser, owner: TestUser;
  let busy: string, calm: string, fresh: string;

  beforeAll(async () => {
    [tech, owner] = await Promise.all([createUser("technician"), createUser("owner")]);
    busy = (await createTub(owner.id, { name: "Busy tub", testEveryDays: 7 })).id;
    calm = (await createTub(owner.id, { name: "Calm tub", testEveryDays: 7 })).id;
    fresh = (await createTub(owner.id, { name: "New tub" })).id;
    for (const t of [busy, calm, fresh]) await shareTub(t, tech.id, owner.id);
    const now = Date.now();
    // The busy tub's last sure reading (confirmed, free chlorine low), then 70,000 unsure readings
    // nobody has reviewed, each with a pad far out of range that must not count as the water.
    const [sure] = (await sql(`insert into reading (tub_id, taken_at, status, needs_review) values ($1, $2, 'confirmed', false) returning id`, [busy, new Date(now - 3 * 86_400_000)])).rows;
    await sql(
      `insert into reading_pad (reading_id, analyte, unit, read_value, confirmed_value, source) values
         ($1, 'free_chlorine', 'mg/L', 0.5, 0.5, 'confirmed'), ($1, 'ph', 'pH', 7.4, 7.4, 'confirmed')`,
      [sure.id],
    );
    await sql(
      `with r as (
         insert into reading (tub_id, taken_at, status, needs_review)
         select $1, $2::timestamptz + g * interval '1 second', 'read', true from generate_series(1, 70000) g
         returning id)
       insert into reading_pad (reading_id, analyte, unit, read_value, needs_review)
       select id, 'ph', 'pH', 8.8, true from r`,
      [busy, new Date(now - 2 * 86_400_000)],
    );
    // The calm tub: in range, tested yesterday, treated once.
    const [ok] = (await sql(`insert into reading (tub_id, taken_at, status) values ($1, $2, 'read') returning id`, [calm, new Date(now - 86_400_000)])).rows;
    await sql(`insert into reading_pad (reading_id, analyte, unit, read_value) values ($1, 'free_chlorine', 'mg/L', 3), ($1, 'ph', 'pH', 7.4)`, [ok.id]);
    await sql(`insert into treatment (tub_id, product_name, chemical, amount, unit, added_at) values ($1, 'Granular chlorine', 'dichlor', 12, 'g', $2)`, [calm, new Date(now - 86_400_000)]);
  }, 120_000);

  it("counts every waiting reading and shows the last sure reading as the water", async () => {
    const board = await dashboard(asTech(tech));
    expect(board.totals).toMatchObject({ tubs: 3, waiting: 70_000 });
    const [first, ...rest] = board.rows;
    expect(first.id).toBe(busy); // readings to review come first
    expect(first.waiting).toBe(70_000);
    expect(first.outOfRange).toEqual([expect.stringMatching(/^Free chlorine low \(0\.5 mg\/L/)]);
    expect(first.unsureNewerAt).not.toBeNull();
    expect(new Date(first.latestAt!).getTime()).toBeLessThan(new Date(first.unsureNewerAt!).getTime());
    expect(rest.map((r) => r.id)).toEqual([fresh, calm]); // never tested (overdue) before all-well
    const c = rest[1];
    expect(c).toMatchObject({ waiting: 0, outOfRange: [], overdue: false, unsureNewerAt: null });
    expect(c.lastTreatment).toMatchObject({ name: "Granular chlorine", amount: 12, unit: "g" });
  });

  it("filters to the tubs needing attention and searches names; bad pages give the first page", async () => {
    const mod = await importRoute("routes/clients/list.tsx");
    const ids = (r: { data: unknown }) => (r.data as { rows: { id: string }[] }).rows.map((x) => x.id);
    const attention = await callRoute(mod.loader!, { url: "/clients?show=attention", user: tech });
    expect(ids(attention)).toEqual([busy, fresh]);
    expect(ids(await callRoute(mod.loader!, { url: "/clients?q=calm", user: tech }))).toEqual([calm]);
    for (const q of ["page=abc", "page=-1", "page=500", "show=everything", "page=%00"]) {
      const r = await callRoute(mod.loader!, { url: `/clients?${q}`, user: tech });
      expect(r.status).toBe(200);
      expect(ids(r)).toHaveLength(3);
    }
  });

  it("the reading history pages, marks unsure readings and answers bad page or sort keys with the first page", async () => {
    const mod = await importRoute("routes/tubs/history.tsx");
    for (const q of ["page=abc", "page=0", "page=999999", "sort=drop&dir=sideways", "sort=__proto__"]) {
      const r = await callRoute(mod.loader!, { url: `/tubs/${busy}/history?${q}`, params: { tubId: busy }, user: tech });
      expect(r.status).toBe(200);
      const d = r.data as { page: number; total: number; rows: { needsReview: boolean }[] };
      expect(d.page).toBe(1);
      expect(d.total).toBe(70_001);
      expect(d.rows[0].needsReview).toBe(true);
    }
  });

  it("trends cover the chosen period only, and a bad period is refused in words", async () => {
    const mod = await importRoute("routes/api/tubs.trends.ts");
    const get = (q: string) => callRoute(mod.loader!, { url: `/api/tubs/${calm}/trends${q}`, params: { tubId: calm }, user: tech });
    const week = await get("?days=7");
    expect(week.status).toBe(200);
    const data = week.data as { period: { days: number }; parameters: { analyte: string; points: unknown[] }[]; treatments: unknown[] };
    expect(data.period.days).toBe(7);
    expect(data.parameters.map((p) => p.points.length)).toEqual([1, 1]);
    expect(data.treatments).toHaveLength(1);
    for (const q of ["?days=abc", "?days=0", "?days=99999", "?days=-4"]) {
      const r = await get(q);
      expect(r.status).toBe(400);
      expect((r.data as { message: string }).message).toMatch(/whole number of days/);
    }
  });

  it("a tub's changed targets count at the next visit (the kinds of tub met before are checked by the query)", async () => {
    const before = await dashboard(asTech(tech));
    expect(before.rows.find((r) => r.id === calm)).toMatchObject({ outOfRange: [] });
    // Free chlorine 3 mg/L is now below this tub's own range (invented range, for the check only).
    await sql(`update tub set targets = '{"free_chlorine": {"min": 4, "max": 6}}'::jsonb where id = $1`, [calm]);
    try {
      const after = await dashboard(asTech(tech));
      expect(after.rows.find((r) => r.id === calm)!.outOfRange).toEqual([expect.stringMatching(/^Free chlorine low \(3 mg\/L; aim 4–6\)/)]);
      expect(after.totals.outOfRange).toBe(before.totals.outOfRange + 1);
    } finally {
      await sql(`update tub set targets = '{}'::jsonb where id = $1`, [calm]);
    }
    const restored = await dashboard(asTech(tech));
    expect(restored.rows.find((r) => r.id === calm)).toMatchObject({ outOfRange: [] });
  });

  it("the CSV lists every reading with its pads in their columns (treatment columns empty)", async () => {
    const mod = await importRoute("routes/tubs/history-csv.ts");
    const r = await callRoute(mod.loader!, { url: `/tubs/${calm}/history.csv`, params: { tubId: calm }, user: tech });
    const text = await r.response!.text();
    const lines = text.trimEnd().split("\r\n");
    expect(lines[0]).toBe("record,time,status,by,confirmed_at,free_chlorine_read,free_chlorine_confirmed,free_chlorine_unit,ph_read,ph_confirmed,ph_unit,treatment_product,treatment_chemical,treatment_for,treatment_amount,treatment_unit,treatment_shock,treatment_note");
    const readings = lines.filter((l) => l.startsWith("reading,"));
    expect(readings).toHaveLength(1);
    expect(readings[0]).toMatch(/^reading,.*,read,,,3,,mg\/L,7\.4,,pH,,,,,,,$/);
    // The tub's one treatment has its own row, with the pad columns empty.
    expect(lines.filter((l) => l.startsWith("treatment,"))).toHaveLength(1);
  });
});

describe("lists an admin works through", () => {
  it("finds users by name or address, one page at a time", async () => {
    const admin = await createUser("admin");
    const target = await createUser("owner");
    const mod = await importRoute("routes/admin/users.tsx");
    const r = await callRoute(mod.loader!, { url: `/admin/users?q=${encodeURIComponent(target.email.toUpperCase())}`, user: admin });
    const d = r.data as { users: { id: string }[]; page: { total: number } };
    expect(d.users.map((u) => u.id)).toEqual([target.id]);
    expect(d.page.total).toBe(1);
    for (const q of ["page=zzz", "page=100000", "q=%25%25%25"]) {
      expect((await callRoute(mod.loader!, { url: `/admin/users?${q}`, user: admin })).status).toBe(200);
    }
    const log = await importRoute("routes/admin/email.tsx");
    const e = await callRoute(log.loader!, { url: "/admin/email?page=-2&status=sent", user: admin });
    expect(e.status).toBe(200);
    expect((e.data as { page: { page: number } }).page.page).toBe(1);
  });
});

describe("every list that grows with the business pages, and a bad page number is never a 500", () => {
  let tech: TestUser, owner: TestUser, admin: TestUser;
  let firstTub: string;
  const BAD = ["page=abc", "page=0", "page=-2", "page=2.5", "page=1e9", "page=99999", "page=%00", "page=" + "9".repeat(40)];

  beforeAll(async () => {
    [tech, owner, admin] = await Promise.all([createUser("technician"), createUser("owner"), createUser("admin")]);
    // 30 client tubs: two pages of the tub list and the dashboard (24 a page).
    const ids: string[] = [];
    for (let i = 0; i < 30; i++) {
      const t = await createTub(owner.id, { name: `Paged tub ${String(i).padStart(2, "0")}` });
      await shareTub(t.id, tech.id, owner.id);
      ids.push(t.id);
    }
    firstTub = ids[0];
  });

  it("the tub list: 24 a page, the rest on page 2, a bad page gives page 1", async () => {
    const mod = await importRoute("routes/tubs/list.tsx");
    const get = async (q: string) => {
      const r = await callRoute(mod.loader!, { url: `/tubs?${q}`, user: tech });
      expect(r.status, q).toBe(200);
      return r.data as { page: { page: number; total: number }; tubs: { id: string; name: string }[] };
    };
    const one = await get("page=1");
    const two = await get("page=2");
    expect(one.page.total).toBe(30);
    expect(one.tubs).toHaveLength(24);
    expect(two.tubs).toHaveLength(6);
    expect(new Set([...one.tubs, ...two.tubs].map((t) => t.id)).size).toBe(30);
    for (const q of BAD) {
      const d = await get(q);
      expect(d.page.page, q).toBe(1);
      expect(d.tubs.map((t) => t.id), q).toEqual(one.tubs.map((t) => t.id));
    }
  });

  it("the dashboard: the same pages in SQL order, a bad page or view gives the first page", async () => {
    const mod = await importRoute("routes/clients/list.tsx");
    const get = async (q: string) => {
      const r = await callRoute(mod.loader!, { url: `/clients?${q}`, user: tech });
      expect(r.status, q).toBe(200);
      return r.data as { page: { page: number; pages: number }; rows: { id: string; name: string }[]; totals: { tubs: number; overdue: number } };
    };
    const one = await get("page=1");
    const two = await get("page=2");
    expect(one.totals).toMatchObject({ tubs: 30, overdue: 30 });
    expect(one.page.pages).toBe(2);
    // Every tub is untested (overdue), so the order is by name.
    const names = [...one.rows, ...two.rows].map((r) => r.name);
    expect(names).toEqual(Array.from({ length: 30 }, (_, i) => `Paged tub ${String(i).padStart(2, "0")}`));
    for (const q of [...BAD, "show=%27;drop", "show=attention&page=7"]) {
      const d = await get(q);
      expect(d.page.page, q).toBe(1);
      expect(d.rows.map((r) => r.id), q).toEqual(one.rows.map((r) => r.id));
    }
  });

  it("the review queue, a tub's history, the e-mail log and the users list answer bad pages with page 1", async () => {
    const checks: [string, string, TestUser, (d: unknown) => number][] = [
      ["routes/clients/review.tsx", "/clients/review", tech, (d) => (d as { page: { page: number } }).page.page],
      ["routes/tubs/history.tsx", `/tubs/${firstTub}/history`, owner, (d) => (d as { page: number }).page],
      ["routes/admin/email.tsx", "/admin/email", admin, (d) => (d as { page: { page: number } }).page.page],
      ["routes/admin/users.tsx", "/admin/users", admin, (d) => (d as { page: { page: number } }).page.page],
    ];
    for (const [file, path, user, pageOfData] of checks) {
      const mod = await importRoute(file);
      for (const q of [...BAD, "sort=__proto__&dir=sideways", "status=nonsense&page=3"]) {
        const r = await callRoute(mod.loader!, { url: `${path}?${q}`, params: { tubId: firstTub }, user });
        expect(r.status, `${path}?${q}`).toBe(200);
        expect(pageOfData(r.data), `${path}?${q}`).toBe(1);
      }
    }
  });

  it("a tub's visit notes: 20 a page, newest visit first, a bad page gives page 1", async () => {
    // 45 visits a week apart, written with SQL: three pages.
    await sql(
      `insert into visit_note (tub_id, author_id, body, visited_at)
       select $1, $2, 'Visit ' || lpad(g::text, 2, '0'), timestamptz '2026-01-01 12:00Z' + g * interval '7 days'
       from generate_series(1, 45) g`,
      [firstTub, tech.id],
    );
    const mod = await importRoute("routes/tubs/notes.tsx");
    const get = async (q: string) => {
      const r = await callRoute(mod.loader!, { url: `/tubs/${firstTub}/notes?${q}`, params: { tubId: firstTub }, user: owner });
      expect(r.status, q).toBe(200);
      return r.data as { page: { page: number; pages: number; total: number }; notes: { body: string }[] };
    };
    const pages = [await get("page=1"), await get("page=2"), await get("page=3")];
    expect(pages[0].page).toEqual({ page: 1, pages: 3, total: 45 });
    expect(pages.map((p) => p.notes.length)).toEqual([20, 20, 5]);
    const bodies = pages.flatMap((p) => p.notes.map((n) => n.body));
    expect(bodies).toEqual(Array.from({ length: 45 }, (_, i) => `Visit ${String(45 - i).padStart(2, "0")}`));
    for (const q of BAD) {
      const d = await get(q);
      expect(d.page.page, q).toBe(1);
      expect(d.notes.map((n) => n.body), q).toEqual(pages[0].notes.map((n) => n.body));
    }
  });

  it("the dashboard and the review queue stop once the browser has gone away", async () => {
    const gone = AbortSignal.abort();
    // Both start at once, each with its outcome caught at once (one may stop while the other is awaited).
    const works = [dashboard(asTech(tech), { signal: gone }), reviewQueue(asTech(tech), { signal: gone })].map((w) => w.then(() => null, (e: unknown) => e));
    for (const work of works) {
      const stopped = await work;
      expect(stopped).toBeInstanceOf(Response);
      expect((stopped as Response).status).toBe(499);
    }
  });
});
