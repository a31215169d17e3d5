// Which reminders are due at time `now`: pure functions of the tub's facts and
// the clock, so the scan job, the tests and any other caller agree exactly.
// No database, no HTTP, no reading of the real clock here.
import { drainIntervalDays } from "../../chemistry/volume";

export const REMINDER_KINDS = ["retest", "test_due", "drain_due", "weekly_summary"] as const;
export type ReminderKind = (typeof REMINDER_KINDS)[number];

/** Every kind of message a user can switch off, with the words the settings page shows. */
export const MESSAGE_KINDS = {
  retest: "Time to retest after a treatment",
  test_due: "A water test is due (from the tub's routine)",
  drain_due: "Time to drain and refill",
  weekly_summary: "Weekly summary of each tub",
  invitation: "Invitations to look after a tub",
  reviewed: "A technician reviewed one of your readings",
} as const;
export type MessageKind = keyof typeof MESSAGE_KINDS;
export const isMessageKind = (k: string): k is MessageKind => Object.hasOwn(MESSAGE_KINDS, k);

const DAY = 24 * 60 * 60 * 1000;

/** A retest reminder is worth sending for this long after the wait ends; later it is stale. */
export const RETEST_WINDOW_MS = 2 * DAY;
/** A weekly summary goes out within this long after the week ends, or not at all. */
export const WEEKLY_WINDOW_MS = DAY;
/** Weekly summaries cover the week ending Monday at this local hour. */
export const WEEKLY_HOUR = 8;

export type Quiet = { timeZone: string; quietStartHour: number; quietEndHour: number };

export type TubFacts = {
  id: string;
  name: string;
  ownerId: string;
  createdAt: Date;
  timeZone: string;
  testEveryDays: number;
  /** "YYYY-MM-DD", the day the tub was last filled */
  fillDate: string | null;
  volumeLitres: number;
  bathersPerDay: number;
  latestReadingAt: Date | null;
};

export type RetestFacts = { id: string; tubId: string; productName: string; retestAt: Date };

export type DueReminder = {
  kind: ReminderKind;
  tubId: string;
  userId: string;
  /** when the reminder became due */
  dueAt: Date;
  /** one message per event, whatever retries, scans or restarts happen */
  dedupeKey: string;
  /** what the message needs to say */
  detail: Record<string, string | number>;
};

// ---------------------------------------------------------------- time zones

type LocalParts = { year: number; month: number; day: number; hour: number; minute: number; second: number; weekday: number };

const formatters = new Map<string, Intl.DateTimeFormat>();
function formatter(timeZone: string) {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat("en-US", {
      timeZone, hourCycle: "h23", year: "numeric", month: "numeric", day: "numeric",
      hour: "numeric", minute: "numeric", second: "numeric", weekday: "short",
    });
    formatters.set(timeZone, f);
  }
  return f;
}

const WEEKDAYS = ["Sun", "Mon", "Tue", "Wed", "Thu", "Fri", "Sat"];

/** The wall-clock date and time at `date` in `timeZone` (weekday 0 = Sunday). */
export function localParts(date: Date, timeZone: string): LocalParts {
  const parts = Object.fromEntries(formatter(timeZone).formatToParts(date).map((p) => [p.type, p.value]));
  return {
    year: Number(parts.year), month: Number(parts.month), day: Number(parts.day),
    hour: Number(parts.hour), minute: Number(parts.minute), second: Number(parts.second),
    weekday: WEEKDAYS.indexOf(parts.weekday),
  };
}

/** The instant when the wall clock in `timeZone` shows the given date and time (month 1-12; overflow rolls over). */
export function zonedTime(timeZone: string, year: number, month: number, day: number, hour = 0, minute = 0): Date {
  const wanted = Date.UTC(year, month - 1, day, hour, minute);
  let guess = wanted;
  for (let i = 0; i < 3; i++) {
    const p = localParts(new Date(guess), timeZone);
    const shown = Date.UTC(p.year, p.month - 1, p.day, p.hour, p.minute, p.second);
    const diff = wanted - shown;
    if (diff === 0) break;
    guess += diff;
  }
  return new Date(guess);
}

export function isValidTimeZone(tz: string) {
  try {
    new Intl.DateTimeFormat("en-US", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

// ---------------------------------------------------------------- quiet hours

/** True when the wall clock at `at` in the user's zone lies in their quiet hours [start, end). */
export function inQuietHours(at: Date, q: Quiet): boolean {
  const { quietStartHour: s, quietEndHour: e } = q;
  if (s === e) return false;
  const h = localParts(at, q.timeZone).hour;
  return s < e ? h >= s && h < e : h >= s || h < e;
}

/** When a message due at `due` may go: `due` itself, or the end of the quiet hours it falls in. */
export function deliveryTime(due: Date, q: Quiet): Date {
  if (!inQuietHours(due, q)) return due;
  const p = localParts(due, q.timeZone);
  // Before the end hour the quiet spell ends today; otherwise (late evening) tomorrow.
  const dayOffset = p.hour < q.quietEndHour ? 0 : 1;
  return zonedTime(q.timeZone, p.year, p.month, p.day + dayOffset, q.quietEndHour, 0);
}

// ---------------------------------------------------------------- the reminders

/** Retest reminders: a treatment's wait has ended (retestAt ≤ now) and it is not stale yet. */
export function dueRetests(tub: Pick<TubFacts, "id" | "ownerId" | "name">, treatments: RetestFacts[], now: Date): DueReminder[] {
  return treatments
    .filter((t) => t.tubId === tub.id && t.retestAt.getTime() <= now.getTime() && now.getTime() - t.retestAt.getTime() < RETEST_WINDOW_MS)
    .map((t) => ({
      kind: "retest" as const, tubId: tub.id, userId: tub.ownerId, dueAt: t.retestAt,
      dedupeKey: `retest:${t.id}`, detail: { tubName: tub.name, productName: t.productName },
    }));
}

/** When the tub's routine asks for the next test: testEveryDays after the latest reading (or after the tub was added). */
export function testDueAt(tub: Pick<TubFacts, "createdAt" | "latestReadingAt" | "testEveryDays">): Date {
  const base = tub.latestReadingAt ?? tub.createdAt;
  return new Date(base.getTime() + Math.max(1, tub.testEveryDays) * DAY);
}

export function dueTest(tub: TubFacts, now: Date): DueReminder | null {
  const dueAt = testDueAt(tub);
  if (dueAt.getTime() > now.getTime()) return null;
  return {
    kind: "test_due", tubId: tub.id, userId: tub.ownerId, dueAt,
    dedupeKey: `test_due:${tub.id}:${dueAt.toISOString()}`,
    detail: { tubName: tub.name, everyDays: tub.testEveryDays, lastTestedAt: tub.latestReadingAt?.toISOString() ?? "" },
  };
}

/** Drain and refill: drainIntervalDays(volume, bathers) after the fill date, from midnight in the tub's zone. */
export function drainDueAt(tub: Pick<TubFacts, "fillDate" | "timeZone" | "volumeLitres" | "bathersPerDay">): { dueAt: Date; days: number } | null {
  if (!tub.fillDate || !(tub.volumeLitres > 0) || !(tub.bathersPerDay > 0)) return null;
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(tub.fillDate);
  if (!m) return null;
  const days = drainIntervalDays(tub.volumeLitres, tub.bathersPerDay);
  return { dueAt: zonedTime(tub.timeZone, Number(m[1]), Number(m[2]), Number(m[3]) + days, 0, 0), days };
}

export function dueDrain(tub: TubFacts, now: Date): DueReminder | null {
  const d = drainDueAt(tub);
  if (!d || d.dueAt.getTime() > now.getTime()) return null;
  return {
    kind: "drain_due", tubId: tub.id, userId: tub.ownerId, dueAt: d.dueAt,
    dedupeKey: `drain_due:${tub.id}:${tub.fillDate}`,
    detail: { tubName: tub.name, fillDate: tub.fillDate!, intervalDays: d.days },
  };
}

/** The end of the most recent summary week at or before `now`: Monday WEEKLY_HOUR:00 in `timeZone`. */
export function lastWeekEnd(now: Date, timeZone: string): Date {
  const p = localParts(now, timeZone);
  const back = (p.weekday + 6) % 7; // days since Monday
  let end = zonedTime(timeZone, p.year, p.month, p.day - back, WEEKLY_HOUR, 0);
  if (end.getTime() > now.getTime()) end = zonedTime(timeZone, p.year, p.month, p.day - back - 7, WEEKLY_HOUR, 0);
  return end;
}

/** A weekly summary for each tub that existed when the week ended, sent within a day of the week's end. */
export function dueWeeklySummary(tub: TubFacts, userTimeZone: string, now: Date): DueReminder | null {
  const end = lastWeekEnd(now, userTimeZone);
  if (now.getTime() - end.getTime() >= WEEKLY_WINDOW_MS) return null;
  if (tub.createdAt.getTime() >= end.getTime()) return null;
  const start = new Date(end.getTime() - 7 * DAY);
  const p = localParts(end, userTimeZone);
  const label = `${p.year}-${String(p.month).padStart(2, "0")}-${String(p.day).padStart(2, "0")}`;
  return {
    kind: "weekly_summary", tubId: tub.id, userId: tub.ownerId, dueAt: end,
    dedupeKey: `weekly_summary:${tub.id}:${label}`,
    detail: { tubName: tub.name, weekStart: start.toISOString(), weekEnd: end.toISOString(), weekEndLabel: label },
  };
}

export type ScheduledReminder = DueReminder & { sendAt: Date };

/**
 * Everything due at `now` for these tubs, each with when it may be sent (after
 * the owner's quiet hours) — kinds the owner switched off are left out.
 */
export function remindersDue(
  input: {
    tubs: TubFacts[];
    treatments: RetestFacts[];
    prefs: Map<string, Quiet & { disabledKinds: string[] }>;
  },
  now: Date,
): ScheduledReminder[] {
  const out: ScheduledReminder[] = [];
  for (const tub of input.tubs) {
    const pref = input.prefs.get(tub.ownerId) ?? { timeZone: tub.timeZone, quietStartHour: 22, quietEndHour: 7, disabledKinds: [] };
    const due = [
      ...dueRetests(tub, input.treatments, now),
      dueTest(tub, now),
      dueDrain(tub, now),
      dueWeeklySummary(tub, pref.timeZone, now),
    ].filter((r): r is DueReminder => r !== null && !pref.disabledKinds.includes(r.kind));
    for (const r of due) out.push({ ...r, sendAt: deliveryTime(now, pref) });
  }
  return out;
}
