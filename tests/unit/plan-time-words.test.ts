// The plan's time words: in the tub's zone and the reader's locale, never a local time beside UTC.
// Clock formats are those of the Unicode CLDR data that Intl uses (en-GB 24-hour, en-US 12-hour).
import { describe, expect, it } from "vitest";
import { planTreatment } from "~/chemistry/plan";
import { base } from "~/chemistry/test-water";

const now = new Date("2026-06-01T18:00:00Z");
// 30 g of dichlor in 1500 L is a shock: a 12 h wait from 16:00 UTC (products.ts WAIT_HOURS, common practice).
const log = [{ productId: "dichlor-granules", chemical: "sodium_dichloroisocyanurate_dihydrate", amount: 30, unit: "g" as const, addedAt: "2026-06-01T16:00:00Z" }];
const water = { ...base, readings: { ...base.readings, free_chlorine: 0.5 } };

describe("plan time words", () => {
  it("a tub in Vancouver read in en-US: both times in the tub's zone, 12-hour, no UTC", () => {
    const p = planTreatment(water, { now, treatmentLog: log, timeZone: "America/Vancouver", locale: "en-US" });
    const w = p.steps[0]!.words;
    // 04:00 UTC on 2 June is 9:00 PM on 1 June in Vancouver (PDT, UTC−7); 16:00 UTC is 9:00 AM.
    expect(w).toMatch(/^Wait — retest after 9:00\sPM\. /);
    expect(w).toMatch(/was added at 9:00\sAM/);
    expect(w).not.toContain("UTC");
    expect(p.headline.title).toMatch(/9:00\sPM/);
  });

  it("en-GB by default; a dose from another day names the day", () => {
    const p = planTreatment(water, { now: new Date("2026-06-02T01:00:00Z"), treatmentLog: log, timeZone: "Europe/London" });
    const w = p.steps[0]!.words;
    // London is on BST (UTC+1) in June: retest 05:00, added 17:00 the day before.
    expect(w).toMatch(/^Wait — retest after 05:00\. /);
    expect(w).toMatch(/was added on Mon 1 Jun,? 17:00/);
  });
});
