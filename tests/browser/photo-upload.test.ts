// The photo step on a phone: both "Take a photo" and "Choose a photo" (the second does not force
// the camera), the progress bar kept in view, Cancel and "Try the upload again" on a throttled
// connection, then the reading's progress on the review screen, which turns into the review by
// itself when the worker has read the photo.
import { eq, isNotNull } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { launch, phoneContext, PHONE, screenshot, signIn } from "../support/browser";
import { createTub, createUser, PASSWORD } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

describe("uploading a strip photo on a phone", () => {
  it("offers camera and gallery, cancels and retries, shows the reading progress, then the review", async () => {
    const owner = await createUser("owner");
    const batch = (await db.query.stripBatch.findFirst({ where: isNotNull(s.stripBatch.currentVersionId) }))!;
    const version = (await db.query.chartVersion.findFirst({ where: eq(s.chartVersion.id, batch.currentVersionId!) }))!;
    const tub = await createTub(owner.id, { batchId: batch.id, name: "Patio tub" });
    const { jpeg } = await renderStripPhoto(asRenderChart(version.definition as never), { seed: 41, surface: "paper", width: 2448, height: 3264, quality: 95 });

    const context = await phoneContext(browser);
    const page = await context.newPage();
    await signIn(page, owner.email, PASSWORD);
    await page.goto(`/tubs/${tub.id}/read?retake=1`);
    await page.getByText("Take a photo").waitFor();
    await page.getByText("Choose a photo").waitFor();
    // The gallery input does not force the camera; the camera one asks for the rear camera.
    expect(await page.getByTestId("gallery-input").getAttribute("capture")).toBeNull();
    expect(await page.getByTestId("camera-input").getAttribute("capture")).toBe("environment");
    await screenshot(page, "61-photo-step-phone");

    // A crawling connection: the progress bar is in view, and Cancel stops the upload.
    const cdp = await context.newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 40, downloadThroughput: -1, uploadThroughput: 40 * 1024 });
    await page.getByTestId("gallery-input").setInputFiles({ name: "strip.jpg", mimeType: "image/jpeg", buffer: jpeg });
    const bar = page.getByRole("progressbar", { name: "Upload progress" });
    await bar.waitFor();
    await page.waitForFunction(() => Number(document.querySelector('[role=progressbar]')?.getAttribute("aria-valuenow") ?? 0) >= 5, undefined, { timeout: 60_000 });
    await page.waitForTimeout(800); // the smooth scroll settles
    const box = (await bar.boundingBox())!;
    expect(box.y).toBeGreaterThanOrEqual(0);
    expect(box.y + box.height).toBeLessThanOrEqual(PHONE.height);
    await page.screenshot({ path: "tests/screenshots/62-upload-progress-in-view.png" });
    await page.getByRole("button", { name: "Cancel the upload" }).click();
    await page.getByText(/Upload cancelled/).waitFor();
    await screenshot(page, "63-upload-cancelled");

    // Back to a normal connection: "Try the upload again" sends the same photo.
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    await page.getByRole("button", { name: "Try the upload again" }).click();
    await page.waitForURL(/\/readings\/[0-9a-f-]{36}/, { timeout: 60_000 });
    // The reading's progress, then the review once the worker has read it, without a reload.
    const progress = page.getByTestId("reading-progress");
    const heading = page.getByRole("heading", { name: "Check the reading" });
    await progress.or(heading).first().waitFor({ timeout: 30_000 });
    const sawProgress = await progress.isVisible();
    if (sawProgress) await page.screenshot({ path: "tests/screenshots/64-reading-progress.png" });
    await heading.waitFor({ timeout: 60_000 });
    expect(sawProgress, "the progress shows while the worker reads").toBe(true);
    for (const analyte of version.definition ? (version.definition as { pads: { analyte: string }[] }).pads.map((p) => p.analyte) : []) {
      await page.getByTestId(`pad-${analyte}`).waitFor();
    }
    await screenshot(page, "65-review-after-reading");
    const readingId = page.url().match(/readings\/([0-9a-f-]{36})/)![1];
    const rows = await db.select().from(s.reading).where(eq(s.reading.tubId, tub.id));
    expect(rows).toHaveLength(1);
    expect(rows[0].id).toBe(readingId);
    await context.close();
  });
});
