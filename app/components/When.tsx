// Dates and times on screen, one format through Intl (app/lib/dates.ts). The words
// come from the loader (formatted on the server, so they never change after load);
// only a person's own time before their browser has told us its zone is
// formatted in the browser, after hydration.
import { browserZone, formatDate, formatDateTime, formatDay, useDateSettings, useHydrated } from "~/lib/dates";

/** The user's own time: the server's words, or the browser's once it runs. */
export function LocalTime({ at, text, date, className }: { at: string | Date; text: string | null; date?: boolean; className?: string }) {
  const { locale } = useDateSettings();
  const hydrated = useHydrated();
  const iso = new Date(at).toISOString();
  const words = text ?? (hydrated ? (date ? formatDate(iso, locale, browserZone()) : formatDateTime(iso, locale, browserZone())) : "");
  return <time dateTime={iso} className={className}>{words}</time>;
}

/** A calendar day (a visit, a fill date): no zone, no shift. */
export function Day({ day, className }: { day: string | Date; className?: string }) {
  const { locale } = useDateSettings();
  const iso = (typeof day === "string" ? day : day.toISOString()).slice(0, 10);
  return <time dateTime={iso} className={className}>{formatDay(iso, locale)}</time>;
}
