// Trend axes: value ticks on 1-2-5 steps and time ticks on local midnights.
// Reference for the value ticks: d3-array's ticks() (a general-purpose charting library on npm,
// here through recharts' own dependency victory-vendor), which uses the same 1-2-5 steps.
import { ticks as d3Ticks } from "victory-vendor/d3-array";
import { describe, expect, it } from "vitest";
import { niceStep, timeTicks, valueTicks } from "~/components/reading/trend-scale";

describe("value ticks", () => {
  it("never shows 7.65 or 230.7: pH and alkalinity ranges get round steps", () => {
    const ph = valueTicks(6.9, 8.3);
    expect(ph.ticks).toEqual([6.8, 7, 7.2, 7.4, 7.6, 7.8, 8, 8.2, 8.4]);
    expect(ph.decimals).toBe(1);
    const ta = valueTicks(0, 230.7);
    expect(ta.ticks).toEqual([0, 50, 100, 150, 200, 250]);
    for (const t of [...ph.ticks, ...ta.ticks]) expect(String(t)).toMatch(/^\d+(\.\d)?$/);
  });

  it("agrees with d3-array's ticks inside the range (the same 1-2-5 rule)", () => {
    for (const [lo, hi] of [[0, 10], [0, 5.4], [6.4, 8.2], [40, 230.7], [0, 1], [0.2, 0.9], [80, 120], [0, 1200]]) {
      const ours = valueTicks(lo, hi).ticks.filter((t) => t >= lo - 1e-9 && t <= hi + 1e-9);
      expect(ours).toEqual(d3Ticks(lo, hi, 5).map((t) => Number(t.toFixed(6))));
    }
  });

  it("covers the data: the first tick is at or below the lowest value, the last at or above the highest", () => {
    const v = valueTicks(1.3, 5.4);
    expect(v.domain[0]).toBeLessThanOrEqual(1.3);
    expect(v.domain[1]).toBeGreaterThanOrEqual(5.4);
    expect(niceStep(10, 5)).toBe(2);
  });

  it("a single value still gets an axis around it", () => {
    const v = valueTicks(7.4, 7.4);
    expect(v.domain[0]).toBeLessThan(7.4);
    expect(v.domain[1]).toBeGreaterThan(7.4);
  });
});

describe("time ticks", () => {
  const day = 86_400_000;
  it("fall on local midnights of the tub's zone, not the server's", () => {
    const lo = Date.parse("2026-03-02T10:00:00Z");
    const hi = lo + 6 * day;
    const { ticks, unit } = timeTicks(lo, hi, "America/Vancouver");
    expect(unit).toBe("day");
    for (const t of ticks) {
      const local = new Intl.DateTimeFormat("en-GB", { timeZone: "America/Vancouver", hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).format(t);
      expect(local).toBe("00:00");
    }
    expect(ticks.length).toBeGreaterThanOrEqual(4);
  });

  it("keep midnights across a daylight-saving change (Vancouver, 8 March 2026; time zone database)", () => {
    const lo = Date.parse("2026-03-05T12:00:00Z");
    const { ticks } = timeTicks(lo, lo + 6 * day, "America/Vancouver");
    const hours = ticks.map((t) => new Intl.DateTimeFormat("en-GB", { timeZone: "America/Vancouver", hour: "2-digit", hourCycle: "h23" }).format(t));
    expect(new Set(hours)).toEqual(new Set(["00"]));
  });

  it("two readings on one day get hour ticks, so they sit apart", () => {
    const lo = Date.parse("2026-03-02T08:00:00Z");
    const { ticks, unit } = timeTicks(lo, lo + 9 * 3_600_000, "Europe/London");
    expect(unit).toBe("hour");
    expect(ticks.length).toBeGreaterThanOrEqual(3);
  });

  it("a year gets month ticks on the first of the month", () => {
    const lo = Date.parse("2025-01-10T00:00:00Z");
    const { ticks, unit } = timeTicks(lo, lo + 365 * day, "Europe/London");
    expect(unit).toBe("month");
    for (const t of ticks) expect(new Intl.DateTimeFormat("en-GB", { timeZone: "Europe/London", day: "numeric" }).format(t)).toBe("1");
  });
});
