// One way to show dates and times: Intl, in the user's locale (from the browser's
// Accept-Language, the same on the server and in the browser), in a known zone:
// - a tub's times in the tub's own zone, rendered on the server (no jump after load);
// - a person's own times (notifications, e-mail log) in the zone their browser
//   reported (cookie `dipwell_tz`); before it has reported one, only in the browser.
import { useSyncExternalStore } from "react";
import { useRouteLoaderData } from "react-router";

export const TZ_COOKIE = "dipwell_tz";
export const DEFAULT_LOCALE = "en-GB";

export type DateSettings = { locale: string; timeZone: string | null };

const zoneChecks = new Map<string, boolean>();
export function isTimeZone(zone: string | null | undefined): zone is string {
  if (!zone || zone.length > 64) return false;
  // Making a formatter to try a zone is slow (a page of times asks dozens of times): remember
  // the answers, a bounded number of them (the zone comes from a cookie too).
  let ok = zoneChecks.get(zone);
  if (ok === undefined) {
    try {
      new Intl.DateTimeFormat("en", { timeZone: zone });
      ok = true;
    } catch {
      ok = false;
    }
    if (zoneChecks.size >= 1000) zoneChecks.clear();
    zoneChecks.set(zone, ok);
  }
  return ok;
}

/** The first supported locale of an Accept-Language header. */
export function localeFrom(acceptLanguage: string | null | undefined): string {
  const wanted = (acceptLanguage ?? "")
    .split(",")
    .map((part) => part.split(";")[0].trim())
    .filter((tag) => tag && tag !== "*" && tag.length <= 35);
  for (const tag of wanted) {
    try {
      const [supported] = Intl.DateTimeFormat.supportedLocalesOf(tag);
      if (supported) return supported;
    } catch {
      // not a language tag
    }
  }
  return DEFAULT_LOCALE;
}

/** The zone the browser reported in its cookie, if it is a real zone. */
export function zoneFromCookie(cookie: string | null | undefined): string | null {
  const m = new RegExp(`(?:^|;\\s*)${TZ_COOKIE}=([^;]+)`).exec(cookie ?? "");
  if (!m) return null;
  let zone: string;
  try {
    zone = decodeURIComponent(m[1]);
  } catch {
    return null;
  }
  return isTimeZone(zone) ? zone : null;
}

export function dateSettingsFor(request: Request): DateSettings {
  return { locale: localeFrom(request.headers.get("accept-language")), timeZone: zoneFromCookie(request.headers.get("cookie")) };
}

const cache = new Map<string, Intl.DateTimeFormat>();
type Kind = "dateTime" | "date" | "time" | "weekday" | "hour" | "day" | "month";
const STYLES: Record<Kind, Intl.DateTimeFormatOptions> = {
  dateTime: { dateStyle: "medium", timeStyle: "short" },
  date: { dateStyle: "medium" },
  time: { timeStyle: "short" },
  weekday: { weekday: "short", day: "numeric", month: "short" },
  // chart ticks, as short as the step between them allows
  hour: { hour: "2-digit", minute: "2-digit" },
  day: { day: "numeric", month: "short" },
  month: { month: "short", year: "2-digit" },
};
function formatter(locale: string, timeZone: string, kind: Kind) {
  const key = `${locale}|${timeZone}|${kind}`;
  let f = cache.get(key);
  if (!f) {
    const style = STYLES[kind];
    f = new Intl.DateTimeFormat(locale, { ...style, timeZone });
    cache.set(key, f);
  }
  return f;
}

/** "2 Dec 2026, 14:05" (en-GB), "Dec 2, 2026, 2:05 PM" (en-US), ... */
export function formatDateTime(at: Date | string | number, locale: string, timeZone: string): string {
  return formatter(locale, isTimeZone(timeZone) ? timeZone : "UTC", "dateTime").format(new Date(at));
}

/** "2 Dec 2026" (en-GB). */
export function formatDate(at: Date | string | number, locale: string, timeZone: string): string {
  return formatter(locale, isTimeZone(timeZone) ? timeZone : "UTC", "date").format(new Date(at));
}

/** "14:05" (en-GB), "2:05 PM" (en-US). */
export function formatTime(at: Date | string | number, locale: string, timeZone: string): string {
  return formatter(locale, isTimeZone(timeZone) ? timeZone : "UTC", "time").format(new Date(at));
}

/** "Wed 2 Dec" (en-GB), "Wed, Dec 2" (en-US): a day this week or next. */
export function formatWeekday(at: Date | string | number, locale: string, timeZone: string): string {
  return formatter(locale, isTimeZone(timeZone) ? timeZone : "UTC", "weekday").format(new Date(at));
}

/** A chart tick on a time axis whose ticks are `unit` apart: "14:00", "3 Dec", "Dec 26". */
export function formatTick(at: Date | string | number, locale: string, timeZone: string, unit: "hour" | "day" | "month"): string {
  return formatter(locale, isTimeZone(timeZone) ? timeZone : "UTC", unit).format(new Date(at));
}

/** A calendar day stored as "YYYY-MM-DD" (or a timestamp meaning that day), with no time zone shift. */
export function formatDay(day: string | Date, locale: string): string {
  const iso = typeof day === "string" ? day.slice(0, 10) : day.toISOString().slice(0, 10);
  return formatter(locale, "UTC", "date").format(new Date(`${iso}T12:00:00Z`));
}

/** The locale and the user's zone, from the root loader (defaults in an error page). */
export function useDateSettings(): DateSettings {
  const root = useRouteLoaderData("root") as { dates?: DateSettings } | undefined;
  return root?.dates ?? { locale: DEFAULT_LOCALE, timeZone: null };
}

const noop = () => () => {};
/** False while the server renders and the browser hydrates; true afterwards. */
export function useHydrated(): boolean {
  return useSyncExternalStore(noop, () => true, () => false);
}

export function browserZone(): string {
  try {
    return Intl.DateTimeFormat().resolvedOptions().timeZone || "UTC";
  } catch {
    return "UTC";
  }
}

/** Remembers the browser's zone in a cookie, so the server can render the user's times. */
export function rememberBrowserZone() {
  const zone = browserZone();
  if (zoneFromCookie(document.cookie) !== zone) {
    document.cookie = `${TZ_COOKIE}=${encodeURIComponent(zone)}; path=/; max-age=31536000; samesite=lax`;
  }
}

/**
 * Times are turned into words on the server only, in loaders: the browser's own
 * time zone database can differ from the server's (a zone that changed its rules
 * recently shows an hour apart), so text formatted in both places would jump
 * after load and break hydration. Loaders call these and send the words.
 */
export function timeWords(request: Request) {
  const { locale, timeZone } = dateSettingsFor(request);
  return {
    locale,
    /** a tub's time, in the tub's zone */
    tub: (at: Date | string | number, zone: string) => formatDateTime(at, locale, zone),
    tubDate: (at: Date | string | number, zone: string) => formatDate(at, locale, zone),
    tubTime: (at: Date | string | number, zone: string) => formatTime(at, locale, zone),
    /** the user's own time, in their browser's zone (null until the browser has told us its zone) */
    own: (at: Date | string | number) => (timeZone ? formatDateTime(at, locale, timeZone) : null),
    ownDate: (at: Date | string | number) => (timeZone ? formatDate(at, locale, timeZone) : null),
  };
}
