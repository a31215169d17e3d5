// A technician calibrates a batch's chart from a photo of the printed chart card: uploads the
// photo, drags the grid and the white area onto it, samples, reviews and saves a new version;
// the batch then reads with it, and a new strip reading records that version.
// Ground truth: the renderer's printed colours (tests/render/chart-photo.ts); CIEDE2000 from
// colorjs.io (a general-purpose colour library) as the oracle.
import { randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import Color from "colorjs.io";
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { createChart } from "~/features/charts/charts.server";
import { registerPhoto } from "~/features/readings/readings.server";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { putObject } from "~/lib/storage.server";
import { DEMO_PASSWORD, DEMO_USERS } from "~/ops/demo";
import { parseChart } from "~/reading";
import { renderChartPhoto } from "../render/chart-photo";
import { renderStripPhoto } from "../render/strip-photo";
import { BASE_URL, launch, screenshot, signIn } from "../support/browser";
import { createUser } from "../support/fixtures";

const printed = JSON.parse(readFileSync("calibration/demo-3pad.json", "utf8"));
/** The chart as first entered: every swatch a little off the printed card (as if typed from a catalogue). */
const drifted = {
  ...printed,
  pads: printed.pads.map((p: { swatches: { value: number; color: string }[] }) => ({
    ...p,
    swatches: p.swatches.map((sw) => {
      const c = new Color(sw.color).to("oklab");
      c.coords[0] = Math.max(0, c.coords[0]! - 0.04);
      return { value: sw.value, color: c.to("srgb").toGamut().toString({ format: "hex", collapse: false }) };
    }),
  })),
};

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

async function drag(page: Page, testId: string, to: [number, number], size: { width: number; height: number }) {
  const svg = await page.locator('[data-testid="grid-photo"] svg').boundingBox();
  const h = await page.getByTestId(testId).boundingBox();
  if (!svg || !h) throw new Error("grid not on screen");
  await page.mouse.move(h.x + h.width / 2, h.y + h.height / 2);
  await page.mouse.down();
  const tx = svg.x + (to[0] / size.width) * svg.width, ty = svg.y + (to[1] / size.height) * svg.height;
  await page.mouse.move((h.x + tx) / 2, (h.y + ty) / 2, { steps: 3 });
  await page.mouse.move(tx, ty, { steps: 3 });
  await page.mouse.up();
}

describe("calibrating a chart from a photo", () => {
  it("samples the card, saves a new version, and the next reading uses it", async () => {
    const techEmail = DEMO_USERS.find((u) => u.key === "tech")!.email;
    const tech = (await db.query.user.findFirst({ where: eq(s.user.email, techEmail) }))!;
    const lot = `CAL-${randomUUID().slice(0, 6)}`;
    const created = await createChart(tech, { name: `Calibration check ${lot}`, lot, expiresOn: "2028-12-31", definition: drifted });

    const photo = await renderChartPhoto(printed, { seed: 21, cast: "warm", width: 1600, height: 1200 });
    const size = { width: 1600, height: 1200 };

    const context = await browser.newContext({ baseURL: BASE_URL, viewport: { width: 1100, height: 1500 }, locale: "en-GB", timezoneId: "Europe/London" });
    const page = await context.newPage();
    await signIn(page, techEmail, DEMO_PASSWORD);
    await page.goto(`/charts/${created.chartId}`);
    await page.getByRole("heading", { name: `Calibration check ${lot}` }).waitFor();
    await screenshot(page, "20-chart-editor");

    await page.goto(`/charts/${created.chartId}/batches/${created.batchId}/calibrate`);
    // Sent like every photo: presigned upload with a progress bar, then registered; the grid appears.
    await page.getByTestId("chart-photo-input").setInputFiles({ name: "chart-card.jpg", mimeType: "image/jpeg", buffer: photo.jpeg });
    await page.locator('[data-testid="grid-photo"] svg[data-ready="yes"]').waitFor();
    await page.locator('[data-testid="grid-photo"] img').evaluate((img: HTMLImageElement) => (img.complete ? null : new Promise((r) => (img.onload = r))));
    await screenshot(page, "21-calibrate-photo-uploaded");

    // A white area dragged onto a swatch is refused in plain words, and nothing is saved.
    const { corners, white } = photo.layout;
    for (let i = 0; i < 4; i++) await drag(page, `grid-corner-${i}`, corners[i], size);
    // The same corners move with the keyboard: Tab to one, Shift+arrow moves it, the opposite arrow brings it back.
    const gridValue = async () => (JSON.parse(await page.locator('input[name="grid"]').inputValue()) as { corners: [number, number][] }).corners[0];
    const before = await gridValue();
    const corner = page.getByTestId("grid-corner-0");
    await corner.focus();
    expect(await corner.getAttribute("aria-label")).toMatch(/Swatch grid corner 1 \(top-left\).*arrow keys/i);
    await page.keyboard.press("Shift+ArrowRight");
    const moved = await gridValue();
    expect(moved[0]).toBeGreaterThan(before[0]);
    expect(moved[1]).toBe(before[1]);
    await page.keyboard.press("Shift+ArrowLeft");
    expect(await gridValue()).toEqual(before);
    // The centre of the pH pad's 7.6 swatch (row 2, column 4), by the grid's own corners.
    const bil = (u: number, v: number): [number, number] => {
      const top = [corners[0][0] + (corners[1][0] - corners[0][0]) * u, corners[0][1] + (corners[1][1] - corners[0][1]) * u];
      const bot = [corners[3][0] + (corners[2][0] - corners[3][0]) * u, corners[3][1] + (corners[2][1] - corners[3][1]) * u];
      return [top[0] + (bot[0] - top[0]) * v, top[1] + (bot[1] - top[1]) * v];
    };
    const mid = bil(3.5 / 6, 1.5 / 3);
    const tiny: [number, number][] = [[mid[0] - 20, mid[1] - 20], [mid[0] + 20, mid[1] - 20], [mid[0] + 20, mid[1] + 20], [mid[0] - 20, mid[1] + 20]];
    for (let i = 0; i < 4; i++) await drag(page, `white-corner-${i}`, tiny[i], size);
    await page.getByRole("button", { name: "Sample the colours" }).click();
    await page.getByRole("alert").filter({ hasText: /white/ }).first().waitFor();
    expect(await page.getByRole("alert").filter({ hasText: /white/ }).first().textContent()).toMatch(/not blank paper|darker than|not even/);
    await screenshot(page, "22-calibrate-bad-white");
    let batch = await db.query.stripBatch.findFirst({ where: eq(s.stripBatch.id, created.batchId) });
    expect(batch!.currentVersionId).toBe(created.versionId);

    // The grid and the white area placed properly.
    await page.locator('[data-testid="grid-photo"] svg[data-ready="yes"]').waitFor();
    for (let i = 0; i < 4; i++) await drag(page, `grid-corner-${i}`, corners[i], size);
    for (let i = 0; i < 4; i++) await drag(page, `white-corner-${i}`, white[i], size);
    await screenshot(page, "23-calibrate-grid-placed");
    await page.getByRole("button", { name: "Sample the colours" }).click();
    await page.getByTestId("proposal").waitFor();
    await screenshot(page, "24-calibrate-proposal");

    // Still the old version until saved.
    batch = await db.query.stripBatch.findFirst({ where: eq(s.stripBatch.id, created.batchId) });
    expect(batch!.currentVersionId).toBe(created.versionId);

    await page.getByLabel("Note for this version").fill("Calibrated from the card photo");
    await page.getByRole("button", { name: "Save as a new version" }).click();
    await page.waitForURL(/saved=2/);
    await page.getByText("reads with version 2").first().waitFor();
    await screenshot(page, "25-chart-version-2");

    // The editor warns about neighbours too close to tell apart, and refuses values out of order
    // without losing the edits; the batch keeps reading with version 2.
    const ph2 = page.getByLabel("pH swatch 2 hex");
    await ph2.fill(await page.getByLabel("pH swatch 1 hex").inputValue());
    await page.getByText(/too close to tell apart/).waitFor();
    await page.getByLabel("pH swatch 3 value").fill("6.5");
    await page.getByText(/Swatch values must rise/).waitFor();
    await page.getByRole("button", { name: "Save as a new version" }).click();
    await page.getByRole("alert").filter({ hasText: /must rise from one swatch to the next/ }).waitFor();
    expect(await page.getByLabel("pH swatch 3 value").inputValue()).toBe("6.5");
    await page.getByRole("alert").filter({ hasText: /must rise from one swatch/ }).scrollIntoViewIfNeeded();
    await screenshot(page, "26-editor-bad-values");
    await context.close();

    batch = await db.query.stripBatch.findFirst({ where: eq(s.stripBatch.id, created.batchId) });
    expect(batch!.currentVersionId).not.toBe(created.versionId);
    const v2 = (await db.query.chartVersion.findFirst({ where: eq(s.chartVersion.id, batch!.currentVersionId!) }))!;
    expect(v2.version).toBe(2);
    expect(v2.source).toBe("photo");
    const v1 = (await db.query.chartVersion.findFirst({ where: eq(s.chartVersion.id, created.versionId) }))!;
    expect(parseChart(v1.definition).pads[0].swatches[0].color).toBe(drifted.pads[0].swatches[0].color); // v1 untouched
    // The saved colours are the printed ones, within 2 ΔE00 (the acceptance bound of the calibration).
    const saved = parseChart(v2.definition);
    let worst = 0;
    saved.pads.forEach((p, r) => p.swatches.forEach((sw, c) => (worst = Math.max(worst, new Color(sw.color).deltaE(new Color(photo.truth[r][c]), "2000")))));
    expect(worst).toBeLessThan(2);

    // An owner's tub on this batch: a new strip photo is read with version 2 and keeps it.
    const ownerUser = await createUser("owner");
    const owner = (await db.query.user.findFirst({ where: eq(s.user.id, ownerUser.id) }))!;
    const [tub] = await db.insert(s.tub).values({ ownerId: owner.id, name: `Test tub ${lot}`, volumeLitres: 1000, sanitiser: "chlorine", batchId: created.batchId }).returning();
    const strip = await renderStripPhoto(printed, { seed: 5 });
    const key = `uploads/tubs/${tub.id}/${randomUUID()}.jpg`;
    await putObject(key, strip.jpeg, "image/jpeg");
    const result = await registerPhoto(owner as unknown as SessionUser, tub, key);
    const r = (await db.query.reading.findFirst({ where: eq(s.reading.id, result.readingId) }))!;
    expect(r.chartVersionId).toBe(v2.id);

    // A later version does not move that reading.
    const { saveVersion } = await import("~/features/charts/charts.server");
    await saveVersion(tech, created.chartId, created.batchId, printed, "editor", "Back to the catalogue colours");
    const again = (await db.query.reading.findFirst({ where: eq(s.reading.id, result.readingId) }))!;
    expect(again.chartVersionId).toBe(v2.id);
  });
});
