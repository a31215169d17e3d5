// Status at a glance and the trends, on a phone and a desktop: tub cards and reading tiles say
// in range / low / high in words and an icon; unconfirmed values are marked; the trends have a
// true time axis (two readings on one day stay apart), round ticks, straight lines, marked
// out-of-range points and numbered treatment markers.
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { launch, screenshot, signIn, sizedContext } from "../support/browser";
import { createTub, createUser, PASSWORD } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

async function seed() {
  const owner = await createUser("owner");
  const tub = await createTub(owner.id, { name: "Lantern deck tub", timeZone: "Europe/London" });
  const now = Date.now();
  const day5 = new Date(now - 5 * DAY);
  day5.setUTCHours(8, 0, 0, 0);
  const readings: { at: Date; confirmed: boolean; pads: [string, string, number, boolean?][] }[] = [
    { at: new Date(now - 10 * DAY), confirmed: true, pads: [["free_chlorine", "mg/L", 3], ["ph", "pH", 7.4], ["total_alkalinity", "mg/L", 100]] },
    { at: day5, confirmed: true, pads: [["free_chlorine", "mg/L", 1], ["ph", "pH", 7.5], ["total_alkalinity", "mg/L", 90]] },
    { at: new Date(day5.getTime() + 9 * HOUR), confirmed: true, pads: [["free_chlorine", "mg/L", 5.4], ["ph", "pH", 7.6], ["total_alkalinity", "mg/L", 95]] },
    { at: new Date(now - 2 * DAY), confirmed: true, pads: [["free_chlorine", "mg/L", 2.5], ["ph", "pH", 8.0], ["total_alkalinity", "mg/L", 110]] },
    { at: new Date(now - 3 * HOUR), confirmed: false, pads: [["free_chlorine", "mg/L", 5.4], ["ph", "pH", 7.2, true], ["total_alkalinity", "mg/L", 230]] },
  ];
  for (const r of readings) {
    const [row] = await db
      .insert(s.reading)
      .values({ tubId: tub.id, status: r.confirmed ? "confirmed" : "read", takenAt: r.at, needsReview: r.pads.some((p) => p[3]), confirmedAt: r.confirmed ? r.at : null, confirmedBy: r.confirmed ? owner.id : null })
      .returning();
    await db.insert(s.readingPad).values(
      r.pads.map(([analyte, unit, v, unsure]) => ({ readingId: row.id, analyte, unit, readValue: v, confirmedValue: r.confirmed ? v : null, confidence: unsure ? 0.4 : 0.9, needsReview: Boolean(unsure), reviewReason: unsure ? "Please check pH: its colour is between two swatches." : null })),
    );
  }
  await db.insert(s.treatment).values([
    { tubId: tub.id, productName: "Chlorine granules (dichlor)", chemical: "sodium_dichloroisocyanurate_dihydrate", parameter: "free_chlorine", amount: 13, unit: "g", addedAt: new Date(day5.getTime() + 2 * HOUR), addedBy: owner.id },
    { tubId: tub.id, productName: "pH down", chemical: "sodium_bisulfate", parameter: "ph", amount: 20, unit: "g", addedAt: new Date(now - 2 * DAY + HOUR), addedBy: owner.id },
  ]);
  return { owner, tub };
}

describe("status at a glance and trends", () => {
  for (const size of ["phone", "desktop"] as const) {
    it(`tub card, reading tiles and trends (${size})`, async () => {
      const { owner, tub } = await seed();
      const ctx = await sizedContext(browser, size);
      const page = await ctx.newPage();
      await signIn(page, owner.email, PASSWORD);

      // Tub card: out-of-range values in words, the unconfirmed mark.
      await page.goto("/tubs");
      const card = page.getByTestId("tub-list").locator("li").filter({ hasText: tub.name });
      await card.getByText("2 values out of range").waitFor();
      await card.getByText("Free chlorine high · 5.4 mg/L").waitFor();
      await card.getByText("Total alkalinity high · 230 mg/L").waitFor();
      await card.getByText("Not confirmed").waitFor();
      // The badge's icon (drawn by the style sheet before the words): the high arrow, 16 px.
      const icon = await card.locator(".dw-badge[data-status=high]").first().evaluate((el) => {
        const st = getComputedStyle(el, "::before");
        return { mask: st.maskImage || st.getPropertyValue("-webkit-mask-image"), width: st.width, height: st.height };
      });
      expect(icon.mask).toContain("data:image/svg+xml");
      expect(icon.mask).toContain("M8 13.5v-10"); // the upward arrow of components/status.tsx
      expect([icon.width, icon.height]).toEqual(["16px", "16px"]);
      await screenshot(page, `40-tub-card-status-${size}`);

      // Tiles: coloured and worded, none grey when out of range; unsure pad marked.
      await page.goto(`/tubs/${tub.id}`);
      const tiles = page.getByTestId("value-tile");
      expect(await tiles.count()).toBe(3);
      const fc = tiles.filter({ hasText: "Free chlorine" });
      expect(await fc.getAttribute("data-status")).toBe("high");
      await fc.getByText("High").waitFor();
      const ph = tiles.filter({ hasText: "pH" });
      expect(await ph.getAttribute("data-status")).toBe("in");
      await ph.getByText("Reader unsure").waitFor();
      await page.getByText("Not confirmed yet: these are the reader's values").waitFor();
      await screenshot(page, `41-reading-tiles-${size}`);

      // Trends: one point per reading, two on the same day apart on the x axis.
      await page.goto(`/tubs/${tub.id}/trends`);
      const chart = page.getByTestId("trend-free_chlorine");
      await chart.locator(".recharts-line-curve").waitFor();
      const d = (await chart.locator(".recharts-line-curve").getAttribute("d")) ?? "";
      expect(d).not.toMatch(/C/); // straight segments only: no Bézier curves
      const xs = [...d.matchAll(/[ML]\s*([\d.]+)[ ,]([\d.]+)/g)].map((m) => Number(m[1]));
      expect(xs.length).toBe(5);
      expect(xs[2] - xs[1]).toBeGreaterThan(size === "phone" ? 5 : 20); // 08:00 and 17:00 on one day
      // Ticks are round numbers.
      for (const label of await page.locator(".recharts-yAxis .recharts-cartesian-axis-tick-value").allTextContents()) expect(label).toMatch(/^\d+(\.\d)?$/);
      // Out-of-range points drawn as triangles; treatments numbered and listed.
      expect(await chart.locator(".recharts-line-dots path").count()).toBe(3);
      await page.getByTestId("trend-treatments").getByText("Chlorine granules (dichlor) 13 g").waitFor();
      expect(await chart.locator(".recharts-reference-line text").allTextContents()).toEqual(["1", "2"]);
      await chart.getByText("Values as a table").click();
      expect(await chart.getByTestId("trend-row").filter({ hasText: "High" }).count()).toBe(2);
      expect(await chart.getByTestId("trend-row").filter({ hasText: "Low" }).count()).toBe(1);
      await screenshot(page, `42-trends-${size}`);
      await ctx.close();
    });
  }
});
