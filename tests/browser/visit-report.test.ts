// A technician's printable visit report, the history CSV with treatments, and times in the
// reader's locale on the plan, first-fill and treatment screens, on a phone and a desktop.
// Demo data only (Lantern Bay Spa Care scenario, invented people and tubs).
import { randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { BASE_URL, DESKTOP, launch, PHONE, screenshot, signIn } from "../support/browser";
import { createTub, createUser, PASSWORD, shareTub } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

const context = (size: "phone" | "desktop", locale: string, timezoneId: string) =>
  browser.newContext({
    baseURL: BASE_URL, locale, timezoneId, acceptDownloads: true,
    ...(size === "phone" ? { viewport: PHONE, deviceScaleFactor: 2, isMobile: true, hasTouch: true } : { viewport: DESKTOP, deviceScaleFactor: 1 }),
  });

async function scenario() {
  const owner = await createUser("owner");
  const tech = await createUser("technician");
  const tub = await createTub(owner.id, { name: `Lantern Bay cove tub ${randomUUID().slice(0, 4)}`, timeZone: "America/Vancouver", fillDate: "2026-11-02", bathersPerDay: 2 });
  await shareTub(tub.id, tech.id, owner.id);
  const hoursAgo = (h: number) => new Date(Date.now() - h * 3600_000);
  const [older] = await db.insert(s.reading).values({ tubId: tub.id, status: "confirmed", takenAt: hoursAgo(50), confirmedAt: hoursAgo(50), confirmedBy: tech.id }).returning();
  await db.insert(s.readingPad).values([
    { readingId: older.id, analyte: "free_chlorine", unit: "mg/L", readValue: 3, source: "reader" },
    { readingId: older.id, analyte: "ph", unit: "pH", readValue: 7.4, source: "reader" },
    { readingId: older.id, analyte: "total_alkalinity", unit: "mg/L", readValue: 90, source: "reader" },
  ]);
  const [latest] = await db.insert(s.reading).values({ tubId: tub.id, status: "confirmed", takenAt: hoursAgo(2), confirmedAt: hoursAgo(2), confirmedBy: tech.id }).returning();
  await db.insert(s.readingPad).values([
    { readingId: latest.id, analyte: "free_chlorine", unit: "mg/L", readValue: 0.5, source: "reader" },
    { readingId: latest.id, analyte: "ph", unit: "pH", readValue: 7.9, source: "reader" },
    { readingId: latest.id, analyte: "total_alkalinity", unit: "mg/L", readValue: 80, source: "reader" },
  ]);
  await db.insert(s.treatment).values({ tubId: tub.id, productName: "Lantern Bay chlorine granules", chemical: "sodium_dichloroisocyanurate_dihydrate", parameter: "free_chlorine", amount: 14, unit: "g", addedAt: hoursAgo(49), retestAt: hoursAgo(48), addedBy: tech.id, note: "Pre-dissolved in a bucket of warm water" });
  await db.insert(s.visitNote).values({ tubId: tub.id, authorId: tech.id, body: "Filter cartridge rinsed; cover strap tightened.", visitedAt: hoursAgo(49) });
  return { owner, tech, tub };
}

describe("visit report, CSV and locale times", () => {
  for (const size of ["phone", "desktop"] as const) {
    it(`a technician prints a visit report and downloads the history (${size})`, async () => {
      const { tech, tub } = await scenario();
      const ctx = await context(size, "en-GB", "Europe/London");
      const page = await ctx.newPage();
      await signIn(page, tech.email, PASSWORD);
      await page.goto(`/tubs/${tub.id}`);
      await page.getByRole("link", { name: "Visit report" }).click();
      await page.waitForURL(`**/tubs/${tub.id}/report`);
      const report = page.getByTestId("visit-report");
      await report.getByRole("heading", { name: /Visit report/ }).waitFor();
      // Readings newest first, each value against its range in words.
      const rows = page.getByTestId("report-readings").locator("tbody tr");
      expect(await rows.count()).toBe(2);
      expect(await rows.first().innerText()).toMatch(/0\.5[\s\S]*Low/);
      expect(await page.getByTestId("report-treatments").innerText()).toContain("Lantern Bay chlorine granules");
      expect(await page.getByTestId("report-notes").innerText()).toContain("Filter cartridge rinsed");
      // The current plan, with a dose and its cautions.
      const plan = await page.getByTestId("report-plan").innerText();
      expect(plan).toMatch(/Add chemical to water, never water to chemical/);
      await screenshot(page, `70-visit-report-${size}`);
      // The printed page: no site header, navigation or buttons.
      await page.emulateMedia({ media: "print" });
      expect(await page.locator("header").first().isVisible()).toBe(false);
      expect(await page.getByRole("button", { name: "Print this report" }).isVisible()).toBe(false);
      expect(await report.getByRole("heading", { name: /Visit report/ }).isVisible()).toBe(true);
      await screenshot(page, `71-visit-report-print-${size}`);
      await page.emulateMedia({ media: "screen" });

      // The history CSV has the treatment in its own row.
      await page.goto(`/tubs/${tub.id}/history`);
      const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download readings and treatments (CSV)" }).click()]);
      const csv = readFileSync((await download.path())!, "utf8");
      const lines = csv.trimEnd().split("\r\n");
      expect(lines[0]).toMatch(/^record,time,/);
      expect(lines.filter((l) => l.startsWith("reading,"))).toHaveLength(2);
      expect(lines.find((l) => l.startsWith("treatment,"))).toContain("Lantern Bay chlorine granules");
      await ctx.close();
    });

    it(`plan, first fill and treatments show times in the reader's locale (${size})`, async () => {
      const { owner, tub } = await scenario();
      // A dose logged just now: the plan, the log and the first-fill routine all show the lock's end.
      await db.insert(s.treatment).values({ tubId: tub.id, productName: "Lantern Bay chlorine granules", chemical: "sodium_dichloroisocyanurate_dihydrate", parameter: "free_chlorine", amount: 10, unit: "g", addedAt: new Date(Date.now() - 5 * 60_000), addedBy: owner.id });
      const ctx = await context(size, "en-US", "America/Vancouver");
      const page = await ctx.newPage();
      const errors: string[] = [];
      page.on("console", (m) => { if (m.type() === "error") errors.push(m.text()); });
      page.on("pageerror", (e) => errors.push(e.message));
      await signIn(page, owner.email, PASSWORD);
      const US_TIME = /\b\d{1,2}:\d{2}\s?[AP]M\b/;
      await page.goto(`/tubs/${tub.id}/plan`);
      const timer = await page.getByTestId("retest-timer").innerText();
      expect(timer).toMatch(US_TIME);
      expect(await page.getByTestId("reading-source").innerText()).toMatch(/[A-Z][a-z]{2} \d{1,2}, \d{4}, \d{1,2}:\d{2}\s?[AP]M/);
      expect(await page.locator("main").innerText()).not.toMatch(/\b\d{2}:\d{2}\b(?!\s?[AP]M)|UTC/);
      await screenshot(page, `72-plan-en-US-${size}`);
      await page.goto(`/tubs/${tub.id}/treatments`);
      expect(await page.getByTestId("retest-timer").innerText()).toMatch(US_TIME);
      expect(await page.locator("main").innerText()).toMatch(/[A-Z][a-z]{2} \d{1,2}, \d{4}, \d{1,2}:\d{2}\s?[AP]M/);
      await screenshot(page, `73-treatments-en-US-${size}`);
      await page.goto(`/tubs/${tub.id}/setup`);
      await page.getByRole("button", { name: "Start the first-fill setup" }).click();
      await page.getByTestId("retest-timer").waitFor();
      const setup = await page.locator("main").innerText();
      expect(setup).toMatch(/filled Nov 2, 2026/);
      expect(setup).toMatch(US_TIME);
      await screenshot(page, `74-setup-en-US-${size}`);
      expect(errors).toEqual([]);
      await ctx.close();
    });
  }
});
