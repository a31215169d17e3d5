// Axis ticks a person can read: values on 1-2-5 steps (so 7.0, 7.2, 7.4, never 7.65), and time
// ticks on midnights of the tub's own time zone (days, weeks or months) or on whole hours
// when the period is short. The "nice numbers" idea follows Heckbert, "Nice numbers for graph
// labels", Graphics Gems (1990); the 1-2-5 steps are the ones d3-array's ticks() uses.

export type ValueTicks = { ticks: number[]; domain: [number, number]; decimals: number };

/** Step of about (span / count) rounded to 1, 2 or 5 × 10^k. */
export function niceStep(span: number, count: number) {
  const raw = span / Math.max(1, count);
  if (!(raw > 0) || !Number.isFinite(raw)) return 1;
  const power = Math.floor(Math.log10(raw));
  const unit = 10 ** power;
  const f = raw / unit;
  const m = f >= Math.sqrt(50) ? 10 : f >= Math.sqrt(10) ? 5 : f >= Math.sqrt(2) ? 2 : 1;
  return m * unit;
}

const decimalsOf = (step: number) => Math.max(0, -Math.floor(Math.log10(step) + 1e-9));

/** Ticks covering [lo, hi], at most about `count` of them, starting and ending on a tick. */
export function valueTicks(lo: number, hi: number, count = 5): ValueTicks {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return { ticks: [0, 1], domain: [0, 1], decimals: 0 };
  if (hi < lo) [lo, hi] = [hi, lo];
  if (hi === lo) {
    const pad = lo === 0 ? 1 : Math.abs(lo) * 0.1;
    lo -= pad;
    hi += pad;
  }
  const step = niceStep(hi - lo, count);
  const decimals = decimalsOf(step);
  const start = Math.floor(lo / step + 1e-9);
  const end = Math.ceil(hi / step - 1e-9);
  const ticks: number[] = [];
  for (let k = start; k <= end; k++) ticks.push(Number((k * step).toFixed(decimals)));
  return { ticks, domain: [ticks[0], ticks[ticks.length - 1]], decimals };
}

/** Offset of a time zone from UTC at an instant, in milliseconds. */
function zoneOffset(t: number, timeZone: string) {
  const parts = new Intl.DateTimeFormat("en-US", { timeZone, hourCycle: "h23", year: "numeric", month: "numeric", day: "numeric", hour: "numeric", minute: "numeric", second: "numeric" }).formatToParts(new Date(t));
  const get = (type: string) => Number(parts.find((p) => p.type === type)?.value);
  return Date.UTC(get("year"), get("month") - 1, get("day"), get("hour") % 24, get("minute"), get("second")) - Math.floor(t / 1000) * 1000;
}

/** The instant of local midnight, in the time zone, of the local day `dayIndex` days after 1970-01-01. */
function localMidnight(y: number, m: number, d: number, timeZone: string) {
  const guess = Date.UTC(y, m, d);
  const first = guess - zoneOffset(guess, timeZone);
  return guess - zoneOffset(first, timeZone);
}

function localDate(t: number, timeZone: string) {
  const parts = new Intl.DateTimeFormat("en-US", { timeZone, year: "numeric", month: "numeric", day: "numeric" }).formatToParts(new Date(t));
  const get = (type: string) => Number(parts.find((p) => p.type === type)?.value);
  return { y: get("year"), m: get("month") - 1, d: get("day") };
}

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

export type TimeTicks = { ticks: number[]; unit: "hour" | "day" | "month" };

/** Time ticks between lo and hi (ms), about `count` of them, on local midnights (or hours) of the zone. */
export function timeTicks(lo: number, hi: number, timeZone: string, count = 5): TimeTicks {
  const span = Math.max(hi - lo, HOUR);
  if (span <= 2 * DAY) {
    const stepH = [1, 2, 3, 6, 12].find((h) => span / (h * HOUR) <= count + 1) ?? 12;
    const ticks: number[] = [];
    // Hours are whole in every zone we meet for the ticks' purpose (half-hour zones shift labels by 30 min).
    for (let t = Math.ceil(lo / (stepH * HOUR)) * stepH * HOUR; t <= hi; t += stepH * HOUR) ticks.push(t);
    return { ticks, unit: "hour" };
  }
  if (span <= 120 * DAY) {
    const stepD = [1, 2, 7, 14, 28].find((d) => span / (d * DAY) <= count + 1) ?? 28;
    const ticks: number[] = [];
    let { y, m, d } = localDate(lo, timeZone);
    let t = localMidnight(y, m, d, timeZone);
    if (t < lo) {
      d += 1;
      t = localMidnight(y, m, d, timeZone);
    }
    // Weekly ticks fall on Mondays so the weeks line up with a calendar.
    if (stepD >= 7) {
      while (new Date(Date.UTC(y, m, d)).getUTCDay() !== 1) d += 1;
      t = localMidnight(y, m, d, timeZone);
    }
    while (t <= hi) {
      ticks.push(t);
      d += stepD;
      t = localMidnight(y, m, d, timeZone);
    }
    return { ticks, unit: "day" };
  }
  const months = span / (30.44 * DAY);
  const stepM = [1, 2, 3, 6, 12].find((s) => months / s <= count + 1) ?? 12;
  const ticks: number[] = [];
  let { y, m } = localDate(lo, timeZone);
  m = Math.ceil(m / stepM) * stepM;
  let t = localMidnight(y, m, 1, timeZone);
  if (t < lo) {
    m += stepM;
    t = localMidnight(y, m, 1, timeZone);
  }
  while (t <= hi) {
    ticks.push(t);
    m += stepM;
    t = localMidnight(y, m, 1, timeZone);
  }
  return { ticks, unit: "month" };
}
