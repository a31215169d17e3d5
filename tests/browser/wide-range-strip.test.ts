// A wide-range pH strip reads pH from four pads. A technician calibrates a batch of such strips
// from reference-solution photos on the chart's calibration page (strips dipped in buffers of
// known pH, each photo sent through the photo intake), saves the refit version, and an owner's
// upload of such a strip shows one pH reading with its four pads side by side. The chart editor
// shows the analyte once, with its four pads side by side. Phone (390×844) and desktop.
// Photos: the repository's strip renderer (tests/render/strip-photo.ts) from an invented demo
// chart (calibration/demo-wide-ph-4pad.json); CIEDE2000 from colorjs.io (a general-purpose colour
// library) as the oracle.
import { randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import Color from "colorjs.io";
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { createChart } from "~/features/charts/charts.server";
import { db } from "~/lib/db.server";
import { parseChart } from "~/reading";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { launch, phoneContext, desktopContext, screenshot, signIn } from "../support/browser";
import { createTub, createUser, PASSWORD } from "../support/fixtures";

type Doc = { pads: { analyte: string; swatches: { value: number; color: string }[] }[] };
const printed = JSON.parse(readFileSync("calibration/demo-wide-ph-4pad.json", "utf8")) as Doc & Record<string, unknown>;
/** The chart as first entered: every swatch a little darker than the printed strips show (as if typed from a catalogue). */
const drifted = {
  ...printed,
  pads: printed.pads.map((p) => ({
    ...p,
    swatches: p.swatches.map((sw) => {
      const c = new Color(sw.color).to("oklab");
      c.coords[0] = Math.max(0, c.coords[0]! - 0.05);
      return { value: sw.value, color: c.to("srgb").toGamut().toString({ format: "hex", collapse: false }) };
    }),
  })),
};
const dE = (a: string, b: string) => new Color(a).deltaE(new Color(b), "2000");
const BUFFERS = [5, 7, 9];

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

async function shot(page: Page, name: string) {
  await page.waitForTimeout(200);
  await screenshot(page, name);
}

describe("a wide-range pH strip: four pads, one pH", () => {
  it("is calibrated from reference-solution photos, and an owner's strip reads as one pH with its four pads", async () => {
    const tech = await createUser("technician");
    const lot = `WR-${randomUUID().slice(0, 6)}`;
    const created = await createChart(tech, { name: `Wide-range pH ${lot}`, lot, expiresOn: "2029-06-30", definition: drifted });
    const solutions = await Promise.all(
      BUFFERS.map((ph, i) => renderStripPhoto(asRenderChart(printed as never), { seed: 70 + i, surface: "paper", cast: "daylight", values: { ph } })),
    );

    // The chart editor: pH once, its four pads side by side (desktop and phone).
    for (const size of ["desktop", "phone"] as const) {
      const context = size === "phone" ? await phoneContext(browser) : await desktopContext(browser);
      const page = await context.newPage();
      await signIn(page, tech.email, PASSWORD);
      await page.goto(`/charts/${created.chartId}`);
      const group = page.getByTestId("analyte-ph");
      await group.waitFor();
      expect(await page.getByTestId("analyte-ph").count()).toBe(1);
      expect(await page.getByTestId("pad-ph").count()).toBe(0);
      expect(await group.getByTestId("pads-side-by-side").locator("> div").count()).toBe(4);
      await expect.poll(() => group.getByRole("columnheader").allTextContents()).toEqual(["Value", "Pad 1", "Pad 2", "Pad 3", "Pad 4"]);
      await group.scrollIntoViewIfNeeded();
      await shot(page, `70-wide-range-editor-${size}`);
      await context.close();
    }

    // Calibration from reference solutions, on a phone: three strips, one per buffer.
    const context = await phoneContext(browser);
    const page = await context.newPage();
    await signIn(page, tech.email, PASSWORD);
    await page.goto(`/charts/${created.chartId}/batches/${created.batchId}/calibrate`);
    for (const [i, ph] of BUFFERS.entries()) {
      await page.getByTestId(`solution-photo-${i}`).setInputFiles({ name: `buffer-ph-${ph}.jpg`, mimeType: "image/jpeg", buffer: solutions[i].jpeg });
      await page.getByTestId(`solution-photo-${i}-sent`).waitFor({ timeout: 60_000 });
      await page.getByLabel(`Photo ${i + 1} pH`).fill(String(ph));
    }
    await page.getByTestId("solution-2").scrollIntoViewIfNeeded();
    await shot(page, "71-wide-range-solutions-sent-phone");
    await page.getByRole("button", { name: "Refit the swatches" }).click();
    const proposal = page.getByTestId("proposal");
    await proposal.waitFor({ timeout: 90_000 });
    // One row per pad and known value: pH · pad 1 … pad 4, for each buffer.
    const rows = await proposal.locator("tbody tr").allTextContents();
    for (const pad of [1, 2, 3, 4]) expect(rows.filter((r) => r.includes(`pad ${pad}`)).length, `pad ${pad}`).toBe(BUFFERS.length);
    await proposal.scrollIntoViewIfNeeded();
    await shot(page, "72-wide-range-proposal-phone");
    await page.getByLabel("Note for this version").first().fill("Refit from pH 5, 7 and 9 buffers");
    await page.getByRole("button", { name: "Save as a new version" }).first().click();
    await page.waitForURL(/saved=2/);
    await context.close();

    const batch = (await db.query.stripBatch.findFirst({ where: eq(s.stripBatch.id, created.batchId) }))!;
    const v2 = (await db.query.chartVersion.findFirst({ where: eq(s.chartVersion.id, batch.currentVersionId!) }))!;
    expect(v2.version).toBe(2);
    expect(v2.source).toBe("solutions");
    // At every buffer's value, every pad's colour moved from the drifted entry towards what the strips show.
    const saved = parseChart(v2.definition);
    const seen: number[] = [];
    saved.pads.forEach((p, i) => {
      for (const ph of BUFFERS) {
        const k = p.swatches.findIndex((sw) => sw.value === ph);
        const truth = printed.pads[i].swatches.find((sw) => sw.value === ph)!.color;
        const before = drifted.pads[i].swatches.find((sw) => sw.value === ph)!.color;
        seen.push(dE(p.swatches[k].color, truth));
        expect(dE(p.swatches[k].color, truth), `pad ${i + 1} at pH ${ph}`).toBeLessThan(dE(before, truth));
      }
    });
    console.log(`refit colours against the printed ones, ΔE00: mean ${(seen.reduce((a, b) => a + b, 0) / seen.length).toFixed(2)}, worst ${Math.max(...seen).toFixed(2)}; the drift was ${dE(drifted.pads[0].swatches[2].color, printed.pads[0].swatches[2].color).toFixed(2)} at pad 1, pH 6`);

    // An owner's strip of this batch at pH 7.6: one pH reading, four pads side by side.
    const owner = await createUser("owner");
    const tub = await createTub(owner.id, { batchId: created.batchId, name: "Garden tub" });
    const strip = await renderStripPhoto(asRenderChart(printed as never), { seed: 81, surface: "paper", cast: "daylight", values: { ph: 7.6 } });
    let readingUrl = "";
    for (const size of ["phone", "desktop"] as const) {
      const ctx = size === "phone" ? await phoneContext(browser) : await desktopContext(browser);
      const p = await ctx.newPage();
      await signIn(p, owner.email, PASSWORD);
      if (!readingUrl) {
        await p.goto(`/tubs/${tub.id}/read?retake=1`);
        await p.getByTestId("gallery-input").setInputFiles({ name: "strip.jpg", mimeType: "image/jpeg", buffer: strip.jpeg });
        await p.waitForURL(/\/readings\/[0-9a-f-]{36}/, { timeout: 60_000 });
        readingUrl = new URL(p.url()).pathname;
      } else await p.goto(readingUrl);
      await p.getByRole("heading", { name: "Check the reading" }).waitFor({ timeout: 90_000 });
      const card = p.getByTestId("pad-ph");
      expect(await card.count()).toBe(1);
      expect(await p.locator('[data-testid^="pad-"]').count()).toBe(1);
      await expect.poll(() => card.getByRole("heading").allTextContents()).toEqual(["pH"]);
      expect(await card.getByText(/4 pads/).count()).toBeGreaterThan(0);
      const read = Number((await card.getByTestId("read-value").textContent())!.match(/[\d.]+/)![0]);
      expect(Math.abs(read - 7.6)).toBeLessThanOrEqual(0.5);
      // The crop: the four pads side by side, about four times as wide as tall.
      const crop = card.getByRole("img", { name: /pH pads as photographed/ });
      await crop.evaluate((img: HTMLImageElement) => (img.complete ? null : new Promise((r) => (img.onload = r))));
      const ratio = await crop.evaluate((img: HTMLImageElement) => img.naturalWidth / img.naturalHeight);
      expect(ratio).toBeGreaterThan(2.5);
      // Each chart swatch shows the four pads' colours side by side.
      const tiles = card.locator('[data-pads="4"]');
      expect(await tiles.count()).toBe(printed.pads[0].swatches.length);
      await card.scrollIntoViewIfNeeded();
      await shot(p, `73-wide-range-review-${size}`);
      await ctx.close();
    }
  });
});
