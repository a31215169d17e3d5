// Where a measured value sits against its target band. Shared by the server (cards, overview)
// and the screens (tiles, trend points) so they always agree.
export type RangeStatus = "in" | "low" | "high" | "unknown";

/** "unknown" when the value or the band is missing, or the band is empty (nothing to aim for). */
export function rangeStatus(value: number | null | undefined, target: { min: number; max: number } | null | undefined): RangeStatus {
  if (value === null || value === undefined || !Number.isFinite(value) || !target) return "unknown";
  if (target.min === 0 && target.max === 0) return "unknown";
  if (value < target.min) return "low";
  if (value > target.max) return "high";
  return "in";
}

// One "en-CA" day formatter per zone (making one is slow next to using one), a bounded number.
const dayFormatters = new Map<string, Intl.DateTimeFormat>();
function dayFormatter(timeZone: string): Intl.DateTimeFormat {
  let f = dayFormatters.get(timeZone);
  if (!f) {
    try {
      f = new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" });
    } catch {
      f = dayFormatter("UTC");
    }
    if (dayFormatters.size >= 1000) dayFormatters.clear();
    dayFormatters.set(timeZone, f);
  }
  return f;
}

/** How long ago, in whole days, in words; worked out on the server so the page never shifts after load. */
export function daysAgo(then: Date, now: Date, timeZone: string) {
  const f = dayFormatter(timeZone);
  const day = (d: Date) => Date.parse(`${f.format(d)}T00:00:00Z`);
  const n = Math.round((day(now) - day(then)) / 86_400_000);
  return n <= 0 ? "today" : n === 1 ? "yesterday" : `${n} days ago`;
}
