// Times in the tub's time zone, shared by the plan's server code and its screens. Words for
// people go through the app's one Intl formatter (./dates) in the reader's locale; loaders pass
// the locale from timeWords(request).locale.
import { DEFAULT_LOCALE, formatDateTime, formatDay, formatTime, formatWeekday, isTimeZone } from "./dates";

// Making an Intl formatter is slow next to using one (a list of a hundred treatments formats
// hundreds of times): one formatter per style and zone, kept.
const formatters = new Map<string, Intl.DateTimeFormat>();
function fmt(style: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const key = `${style}|${options.timeZone}`;
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat("en-GB", options);
    if (formatters.size >= 2000) formatters.clear();
    formatters.set(key, f);
  }
  return f;
}

function parts(d: Date, timeZone: string) {
  const f = fmt("parts", {
    timeZone,
    year: "numeric",
    month: "2-digit",
    day: "2-digit",
    hour: "2-digit",
    minute: "2-digit",
    second: "2-digit",
    hour12: false,
  });
  const out: Record<string, number> = {};
  for (const p of f.formatToParts(d)) if (p.type !== "literal") out[p.type] = Number(p.value);
  if (out.hour === 24) out.hour = 0;
  return out as { year: number; month: number; day: number; hour: number; minute: number; second: number };
}

/** The zone if the platform knows it, else UTC. */
export function safeZone(timeZone: string | null | undefined): string {
  if (timeZone === null || timeZone === undefined) return "UTC";
  return isTimeZone(timeZone) ? timeZone : "UTC";
}

/** "14:35" (en-GB), "2:35 PM" (en-US) in the time zone. */
export function clock(d: Date | string, timeZone: string, locale = DEFAULT_LOCALE): string {
  return formatTime(d, locale, safeZone(timeZone));
}

/** "3 Jun 2025, 14:35" (en-GB) in the time zone. */
export function dayAndClock(d: Date | string, timeZone: string, locale = DEFAULT_LOCALE): string {
  return formatDateTime(d, locale, safeZone(timeZone));
}

/** "3 Jun 2025" (en-GB) from a date-only string, with no zone shift. */
export function longDate(d: Date | string, locale = DEFAULT_LOCALE): string {
  return formatDay(typeof d === "string" ? d : d.toISOString(), locale);
}

/** The value of a datetime-local input for this instant in the time zone: "2025-06-03T14:35". */
export function toLocalInput(d: Date, timeZone: string): string {
  const p = parts(d, safeZone(timeZone));
  const z = (n: number) => String(n).padStart(2, "0");
  return `${p.year}-${z(p.month)}-${z(p.day)}T${z(p.hour)}:${z(p.minute)}`;
}

/** A wall-clock time in the time zone ("2025-06-03T14:35") as an instant; null when it is not a time. */
export function fromLocalInput(value: string, timeZone: string): Date | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(value.trim());
  if (!m) return null;
  const [y, mo, d, h, mi, s] = m.slice(1).map((x) => Number(x ?? 0));
  const wall = Date.UTC(y!, mo! - 1, d!, h!, mi!, s ?? 0);
  if (Number.isNaN(wall)) return null;
  const zone = safeZone(timeZone);
  let guess = wall;
  for (let i = 0; i < 3; i++) {
    const p = parts(new Date(guess), zone);
    const seen = Date.UTC(p.year, p.month - 1, p.day, p.hour, p.minute, p.second);
    guess += wall - seen;
  }
  return new Date(guess);
}

/** "2 h 05 min", "12 min", "under a minute". */
export function remainingWords(ms: number): string {
  if (ms <= 0) return "now";
  const totalMin = Math.floor(ms / 60_000);
  if (totalMin < 1) return "under a minute";
  const h = Math.floor(totalMin / 60);
  const m = totalMin % 60;
  return h > 0 ? `${h} h ${String(m).padStart(2, "0")} min` : `${m} min`;
}

/** "Wed 2 Dec" (en-GB) in the time zone. */
export function dayOnly(d: Date | string, timeZone: string, locale = DEFAULT_LOCALE): string {
  return formatWeekday(d, locale, safeZone(timeZone));
}
