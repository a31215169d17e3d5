// Dates and times on screen, one format through Intl (app/lib/dates.ts).
import { browserZone, formatDate, formatDateTime, formatDay, useDateSettings, useHydrated } from "~/lib/dates";

type Props = { at: string | Date; date?: boolean; className?: string };

/** A tub's time, in the tub's zone: the same on the server and in the browser. */
export function TubTime({ at, zone, date, className }: Props & { zone: string }) {
  const { locale } = useDateSettings();
  const iso = new Date(at).toISOString();
  return <time dateTime={iso} className={className}>{date ? formatDate(iso, locale, zone) : formatDateTime(iso, locale, zone)}</time>;
}

/**
 * The user's own time, in their browser's zone. The server renders it when the
 * browser has told it the zone (cookie); otherwise only the browser does.
 */
export function LocalTime({ at, date, className }: Props) {
  const { locale, timeZone } = useDateSettings();
  const hydrated = useHydrated();
  const zone = timeZone ?? (hydrated ? browserZone() : null);
  const iso = new Date(at).toISOString();
  return (
    <time dateTime={iso} className={className}>
      {zone ? (date ? formatDate(iso, locale, zone) : formatDateTime(iso, locale, zone)) : ""}
    </time>
  );
}

/** A calendar day (a visit, a fill date): no zone, no shift. */
export function Day({ day, className }: { day: string | Date; className?: string }) {
  const { locale } = useDateSettings();
  const iso = (typeof day === "string" ? day : day.toISOString()).slice(0, 10);
  return <time dateTime={iso} className={className}>{formatDay(iso, locale)}</time>;
}
