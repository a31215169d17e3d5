// The scan: gathers each tub's facts from the database, asks the pure schedule
// which reminders are due at `now`, and queues one idempotent e-mail job per
// reminder (delayed past the owner's quiet hours). The worker runs it every
// few minutes with the real clock; tests run it with a chosen one.
import { and, eq, gte, inArray, isNull, lte, ne, sql } from "drizzle-orm";
import type PgBoss from "pg-boss";
import { emailLog, reading, readingPad, treatment, tub, user } from "../../db/schema";
import { db } from "../../lib/db.server";
import { reminderEmail, type WeekReading } from "./messages.server";
import { enqueueEmail } from "./outbox.server";
import { ensurePreferences, preferencesFor } from "./preferences.server";
import { RETEST_WINDOW_MS, remindersDue, type ScheduledReminder, type TubFacts } from "./schedule";

/** What is due at `now` (pure schedule over the database's facts). `tubIds` limits the scan to some tubs. */
export async function dueAt(now: Date, opts: { tubIds?: string[] } = {}): Promise<ScheduledReminder[]> {
  const where = opts.tubIds ? and(isNull(tub.archivedAt), inArray(tub.id, opts.tubIds)) : isNull(tub.archivedAt);
  const tubs = await db.select().from(tub).where(where);
  if (tubs.length === 0) return [];
  const ids = tubs.map((t) => t.id);
  const latest = await db
    .select({ tubId: reading.tubId, at: sql<Date>`max(${reading.takenAt})`.mapWith(reading.takenAt) })
    .from(reading)
    .where(and(inArray(reading.tubId, ids), ne(reading.status, "failed"), lte(reading.takenAt, now)))
    .groupBy(reading.tubId);
  const latestBy = new Map(latest.map((l) => [l.tubId, l.at]));
  const treatments = await db
    .select({ id: treatment.id, tubId: treatment.tubId, productName: treatment.productName, retestAt: treatment.retestAt })
    .from(treatment)
    .where(and(inArray(treatment.tubId, ids), gte(treatment.retestAt, new Date(now.getTime() - RETEST_WINDOW_MS)), lte(treatment.retestAt, now)));
  const prefs = await preferencesFor([...new Set(tubs.map((t) => t.ownerId))]);
  const facts: TubFacts[] = tubs.map((t) => ({
    id: t.id, name: t.name, ownerId: t.ownerId, createdAt: t.createdAt, timeZone: t.timeZone, testEveryDays: t.testEveryDays,
    fillDate: t.fillDate, volumeLitres: t.volumeLitres, bathersPerDay: t.bathersPerDay, latestReadingAt: latestBy.get(t.id) ?? null,
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
  const due = await dueAt(now, opts);
  if (due.length === 0) return { due: 0, queued: 0, delayed: 0 };
  const known = new Set(
    (await db.select({ key: emailLog.dedupeKey }).from(emailLog).where(inArray(emailLog.dedupeKey, due.map((d) => d.dedupeKey)))).map((r) => r.key),
  );
  let queued = 0, delayed = 0;
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
      queued++;
      if (later) delayed++;
    }
  }
  return { due: due.length, queued, delayed };
}
