// The scan: gathers each tub's facts from the database, asks the pure schedule
// which reminders are due at `now`, and queues one idempotent e-mail job per
// reminder (delayed past the owner's quiet hours). The worker runs it every
// few minutes with the real clock; tests run it with a chosen one.
import { and, eq, gte, inArray, lte, ne, sql } from "drizzle-orm";
import type PgBoss from "pg-boss";
import { emailLog, reading, readingPad, treatment, tub, user } from "../../db/schema";
import { db } from "../../lib/db.server";
import { reminderEmail, type WeekReading } from "./messages.server";
import { enqueueEmail } from "./outbox.server";
import { ensurePreferences, preferencesFor } from "./preferences.server";
import { RETEST_WINDOW_MS, remindersDue, type ScheduledReminder, type TubFacts } from "./schedule";

/** Tubs looked at per query: the scan walks every tub in pages of this size (by id), so no list grows with the business. */
export const SCAN_PAGE = 500;

type TubRow = typeof tub.$inferSelect & { latestReadingAt: Date | null };

/**
 * One page of active tubs after `afterId`, each with its latest usable reading
 * looked up per tub (a LATERAL probe of the (tub_id, taken_at) index: one
 * index step per tub, however long its history).
 */
async function tubPage(now: Date, afterId: string | null, tubIds?: string[]): Promise<TubRow[]> {
  const rows = await db.execute<Record<string, unknown>>(sql`
    select t.id, l.taken_at as latest_reading_at
      from ${tub} t
      left join lateral (
        select r.taken_at from ${reading} r
         where r.tub_id = t.id and r.status <> 'failed' and r.taken_at <= ${now.toISOString()}::timestamptz
         order by r.taken_at desc limit 1
      ) l on true
     where t.archived_at is null
       ${afterId ? sql`and t.id > ${afterId}` : sql``}
       ${tubIds ? sql`and t.id = any(${sql.param(tubIds)}::uuid[])` : sql``}
     order by t.id
     limit ${SCAN_PAGE}`);
  if (rows.rows.length === 0) return [];
  const latest = new Map(rows.rows.map((r) => [String(r.id), r.latest_reading_at ? new Date(String(r.latest_reading_at)) : null]));
  const full = await db.select().from(tub).where(inArray(tub.id, [...latest.keys()])).orderBy(tub.id);
  return full.map((t) => ({ ...t, latestReadingAt: latest.get(t.id) ?? null }));
}

/** What is due at `now` among one page of tubs. */
async function dueForTubs(now: Date, tubs: TubRow[]): Promise<ScheduledReminder[]> {
  if (tubs.length === 0) return [];
  const ids = tubs.map((t) => t.id);
  const treatments = await db
    .select({ id: treatment.id, tubId: treatment.tubId, productName: treatment.productName, retestAt: treatment.retestAt })
    .from(treatment)
    .where(and(inArray(treatment.tubId, ids), gte(treatment.retestAt, new Date(now.getTime() - RETEST_WINDOW_MS)), lte(treatment.retestAt, now)));
  const prefs = await preferencesFor([...new Set(tubs.map((t) => t.ownerId))]);
  const facts: TubFacts[] = tubs.map((t) => ({
    id: t.id, name: t.name, ownerId: t.ownerId, createdAt: t.createdAt, timeZone: t.timeZone, testEveryDays: t.testEveryDays,
    fillDate: t.fillDate, volumeLitres: t.volumeLitres, bathersPerDay: t.bathersPerDay, latestReadingAt: t.latestReadingAt,
  }));
  // Owners without saved preferences get the defaults in their tub's time zone.
  const quiet = new Map(
    facts.map((f) => {
      const p = prefs.get(f.ownerId);
      return [f.ownerId, p ?? { timeZone: f.timeZone, quietStartHour: 22, quietEndHour: 7, disabledKinds: [] as string[] }];
    }),
  );
  return remindersDue({ tubs: facts, treatments: treatments.map((t) => ({ ...t, retestAt: t.retestAt! })), prefs: quiet }, now);
}

/** Walks every active tub (or the given ones) page by page and hands each page's due reminders to `visit`. */
async function eachDuePage(now: Date, opts: { tubIds?: string[] }, visit: (due: ScheduledReminder[]) => Promise<void>) {
  for (let after: string | null = null; ; ) {
    const page = await tubPage(now, after, opts.tubIds);
    if (page.length === 0) return;
    await visit(await dueForTubs(now, page));
    if (page.length < SCAN_PAGE) return;
    after = page[page.length - 1].id;
  }
}

/** What is due at `now` (pure schedule over the database's facts). `tubIds` limits the scan to some tubs. */
export async function dueAt(now: Date, opts: { tubIds?: string[] } = {}): Promise<ScheduledReminder[]> {
  const all: ScheduledReminder[] = [];
  await eachDuePage(now, opts, async (due) => void all.push(...due));
  return all;
}

async function weekReadings(tubId: string, start: Date, end: Date): Promise<WeekReading[]> {
  const rows = await db
    .select({ takenAt: reading.takenAt, analyte: readingPad.analyte, confirmed: readingPad.confirmedValue, read: readingPad.readValue })
    .from(readingPad)
    .innerJoin(reading, eq(readingPad.readingId, reading.id))
    .where(and(eq(reading.tubId, tubId), ne(reading.status, "failed"), gte(reading.takenAt, start), lte(reading.takenAt, end)));
  return rows
    .map((r) => ({ takenAt: r.takenAt, analyte: r.analyte, value: (r.confirmed ?? r.read) as number }))
    .filter((r) => Number.isFinite(r.value));
}

export type ScanResult = { due: number; queued: number; delayed: number };

/** Finds what is due at `now` and queues each message once. Running it again queues nothing new. */
export async function runScan(boss: PgBoss, now: Date, opts: { tubIds?: string[] } = {}): Promise<ScanResult> {
  const result: ScanResult = { due: 0, queued: 0, delayed: 0 };
  await eachDuePage(now, opts, async (due) => {
    result.due += due.length;
    if (due.length === 0) return;
    // at most a few reminders per tub of this page, so this list is bounded by the page size
    const known = new Set(
      (await db.select({ key: emailLog.dedupeKey }).from(emailLog).where(inArray(emailLog.dedupeKey, due.map((d) => d.dedupeKey)))).map((r) => r.key),
    );
    for (const r of due) {
      if (known.has(r.dedupeKey)) continue;
      const [owner] = await db.select({ id: user.id, name: user.name, email: user.email }).from(user).where(eq(user.id, r.userId));
      if (!owner) continue;
      const pref = await ensurePreferences(owner.id);
      const week = r.kind === "weekly_summary" ? await weekReadings(r.tubId, new Date(String(r.detail.weekStart)), new Date(String(r.detail.weekEnd))) : [];
      const mail = await reminderEmail(r, { ...owner, unsubscribeToken: pref.unsubscribeToken, timeZone: pref.timeZone }, week);
      const later = r.sendAt.getTime() > now.getTime();
      const out = await enqueueEmail(mail, { boss, startAfter: later ? r.sendAt : undefined });
      if (out.queued) {
        result.queued++;
        if (later) result.delayed++;
      }
    }
  });
  return result;
}
