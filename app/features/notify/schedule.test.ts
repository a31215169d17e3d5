// The reminder clock: every check passes `now` explicitly. Time-zone offsets
// come from the IANA time zone database (Europe/Berlin: UTC+1 in winter, UTC+2
// from the last Sunday of March, 01:00 UTC; America/New_York: UTC-5 / UTC-4).
import { describe, expect, it } from "vitest";
import { drainIntervalDays, litresFromUsGallons } from "../../chemistry";
import {
  deliveryTime, drainDueAt, dueDrain, dueRetests, dueTest, dueWeeklySummary, inQuietHours, lastWeekEnd,
  localParts, remindersDue, testDueAt, zonedTime, type TubFacts,
} from "./schedule";

const at = (iso: string) => new Date(iso);
const MIN = 60_000;

const tub = (over: Partial<TubFacts> = {}): TubFacts => ({
  id: "t1", name: "Garden tub", ownerId: "u1", createdAt: at("2025-01-01T00:00:00Z"), timeZone: "UTC",
  testEveryDays: 2, fillDate: null, volumeLitres: 1200, bathersPerDay: 2, latestReadingAt: null, ...over,
});

describe("time zones (IANA tz database)", () => {
  it("reads the wall clock in a zone", () => {
    expect(localParts(at("2025-01-15T12:00:00Z"), "Europe/Berlin")).toMatchObject({ hour: 13, day: 15, weekday: 3 });
    expect(localParts(at("2025-07-15T12:00:00Z"), "Europe/Berlin").hour).toBe(14);
    expect(localParts(at("2025-07-15T12:00:00Z"), "America/New_York").hour).toBe(8);
  });
  it("finds the instant of a wall-clock time, across the spring change", () => {
    expect(zonedTime("Europe/Berlin", 2025, 1, 15, 7).toISOString()).toBe("2025-01-15T06:00:00.000Z");
    expect(zonedTime("Europe/Berlin", 2025, 3, 31, 7).toISOString()).toBe("2025-03-31T05:00:00.000Z");
    expect(zonedTime("America/New_York", 2025, 12, 32, 7).toISOString()).toBe("2026-01-01T12:00:00.000Z"); // day overflow rolls over
  });
});

describe("quiet hours", () => {
  const q = { timeZone: "Europe/Berlin", quietStartHour: 22, quietEndHour: 7 };
  it("spans midnight", () => {
    expect(inQuietHours(at("2025-01-15T20:59:00Z"), q)).toBe(false); // 21:59 Berlin
    expect(inQuietHours(at("2025-01-15T21:00:00Z"), q)).toBe(true); // 22:00
    expect(inQuietHours(at("2025-01-16T05:59:00Z"), q)).toBe(true); // 06:59
    expect(inQuietHours(at("2025-01-16T06:00:00Z"), q)).toBe(false); // 07:00
  });
  it("delays a message due in quiet hours to their end, in the user's zone", () => {
    expect(deliveryTime(at("2025-01-15T22:30:00Z"), q).toISOString()).toBe("2025-01-16T06:00:00.000Z"); // 23:30 → 07:00 next day
    expect(deliveryTime(at("2025-01-16T02:00:00Z"), q).toISOString()).toBe("2025-01-16T06:00:00.000Z"); // 03:00 → 07:00 same day
    expect(deliveryTime(at("2025-01-15T12:00:00Z"), q).toISOString()).toBe("2025-01-15T12:00:00.000Z");
  });
  it("handles a same-day spell and no quiet hours", () => {
    const day = { timeZone: "UTC", quietStartHour: 13, quietEndHour: 15 };
    expect(deliveryTime(at("2025-01-15T14:10:00Z"), day).toISOString()).toBe("2025-01-15T15:00:00.000Z");
    const none = { timeZone: "UTC", quietStartHour: 0, quietEndHour: 0 };
    expect(deliveryTime(at("2025-01-15T03:00:00Z"), none).toISOString()).toBe("2025-01-15T03:00:00.000Z");
  });
});

describe("retest after a treatment's wait", () => {
  const t = [{ id: "x1", tubId: "t1", productName: "Sodium bicarbonate", retestAt: at("2025-02-01T10:00:00Z") }];
  it("is not due a minute before the wait ends, due at the end, stale after two days", () => {
    expect(dueRetests(tub(), t, new Date(t[0].retestAt.getTime() - MIN))).toHaveLength(0);
    expect(dueRetests(tub(), t, t[0].retestAt)).toMatchObject([{ kind: "retest", dedupeKey: "retest:x1" }]);
    expect(dueRetests(tub(), t, at("2025-02-03T10:00:00Z"))).toHaveLength(0);
  });
});

describe("test due from the tub's routine", () => {
  it("counts testEveryDays from the latest reading", () => {
    const t = tub({ latestReadingAt: at("2025-02-01T18:00:00Z"), testEveryDays: 3 });
    expect(testDueAt(t).toISOString()).toBe("2025-02-04T18:00:00.000Z");
    expect(dueTest(t, at("2025-02-04T17:59:00Z"))).toBeNull();
    expect(dueTest(t, at("2025-02-04T18:00:00Z"))?.dedupeKey).toBe("test_due:t1:2025-02-04T18:00:00.000Z");
  });
  it("a new reading moves the due time (and the key)", () => {
    const a = dueTest(tub({ latestReadingAt: at("2025-02-01T00:00:00Z") }), at("2025-03-01T00:00:00Z"))!;
    const b = dueTest(tub({ latestReadingAt: at("2025-02-10T00:00:00Z") }), at("2025-03-01T00:00:00Z"))!;
    expect(a.dedupeKey).not.toBe(b.dedupeKey);
  });
});

describe("drain and refill", () => {
  it("uses the chemistry engine's interval from the fill date, midnight in the tub's zone", () => {
    // 400 US gal, 4 bathers/day → 33 days (Maine App. B worked value, checked in app/chemistry/volume.test.ts)
    const t = tub({ fillDate: "2025-01-01", volumeLitres: litresFromUsGallons(400), bathersPerDay: 4, timeZone: "Europe/Berlin" });
    expect(drainIntervalDays(t.volumeLitres, t.bathersPerDay)).toBe(33);
    expect(drainDueAt(t)!.dueAt.toISOString()).toBe("2025-02-02T23:00:00.000Z"); // 3 Feb 00:00 Berlin
    expect(dueDrain(t, at("2025-02-02T22:59:00Z"))).toBeNull();
    expect(dueDrain(t, at("2025-02-02T23:00:00Z"))?.dedupeKey).toBe("drain_due:t1:2025-01-01");
    expect(dueDrain(tub(), at("2030-01-01T00:00:00Z"))).toBeNull(); // no fill date, no reminder
  });
});

describe("weekly summary", () => {
  it("ends the week on Monday 08:00 in the user's zone and goes within a day", () => {
    // 2025-02-03 is a Monday.
    expect(lastWeekEnd(at("2025-02-03T07:00:00Z"), "Europe/Berlin").toISOString()).toBe("2025-02-03T07:00:00.000Z");
    expect(lastWeekEnd(at("2025-02-03T06:59:00Z"), "Europe/Berlin").toISOString()).toBe("2025-01-27T07:00:00.000Z");
    expect(dueWeeklySummary(tub(), "Europe/Berlin", at("2025-02-03T06:59:00Z"))).toBeNull();
    expect(dueWeeklySummary(tub(), "Europe/Berlin", at("2025-02-03T07:00:00Z"))?.dedupeKey).toBe("weekly_summary:t1:2025-02-03");
    expect(dueWeeklySummary(tub(), "Europe/Berlin", at("2025-02-04T07:00:00Z"))).toBeNull();
    expect(dueWeeklySummary(tub({ createdAt: at("2025-02-03T07:30:00Z") }), "Europe/Berlin", at("2025-02-03T08:00:00Z"))).toBeNull();
  });
});

describe("remindersDue", () => {
  it("leaves out kinds the owner switched off and delays quiet-hour ones", () => {
    const t = tub({ latestReadingAt: at("2025-02-01T20:00:00Z"), fillDate: "2024-01-01" });
    const now = at("2025-02-05T22:00:00Z"); // 23:00 Berlin, a Wednesday
    const prefs = new Map([["u1", { timeZone: "Europe/Berlin", quietStartHour: 22, quietEndHour: 7, disabledKinds: ["drain_due"] }]]);
    const due = remindersDue({ tubs: [t], treatments: [], prefs }, now);
    expect(due.map((d) => d.kind)).toEqual(["test_due"]);
    expect(due[0].sendAt.toISOString()).toBe("2025-02-06T06:00:00.000Z");
  });
});
