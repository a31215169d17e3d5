// The owner's journey on a phone: sign in, add a tub, dip and wait out the 15-second countdown,
// photograph a rendered strip (upload throttled so the progress bar shows), see the pads read,
// correct one, and find the reading in the history and on the trend chart.
import { readFileSync } from "node:fs";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { launch, phoneContext, screenshot, signIn } from "../support/browser";
import { createUser, PASSWORD } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

describe("the owner's journey", () => {
  it("adds a tub, reads a strip, corrects a pad and finds it in history and trends", async () => {
    const owner = await createUser("owner");
    const chartJson = JSON.parse(readFileSync("calibration/demo-3pad.json", "utf8"));
    const photo = await renderStripPhoto(asRenderChart(chartJson), { seed: 3, surface: "paper", cast: "daylight", width: 1836, height: 2448, quality: 95, values: { free_chlorine: 3, ph: 7.6, total_alkalinity: 80 } });

    const context = await phoneContext(browser);
    const page = await context.newPage();
    await signIn(page, owner.email, PASSWORD);
    await page.getByText("No tubs yet").waitFor();

    // Add a tub, with the volume helper.
    await page.getByRole("link", { name: "Add your first tub" }).click();
    await page.waitForURL(/\/tubs\/new/);
    await page.getByLabel("Name").fill("Garden tub");
    await page.getByRole("button", { name: /Estimate it from the tub's shape/ }).click();
    await page.getByLabel("Inside diameter (cm)").fill("190");
    await page.getByLabel("Water depth (cm)").fill("75");
    await page.getByTestId("volume-estimate").waitFor();
    expect(await page.getByTestId("volume-estimate").textContent()).toContain("2126 litres"); // π·95²·75 cm³ = 2,126,455 cm³ = 2126 L
    await page.getByRole("button", { name: "Use this volume" }).click();
    expect(await page.getByLabel("Water volume").inputValue()).toBe("2126");
    const batch = await page.locator("select[name=batchId] option", { hasText: "3-pad" }).first().getAttribute("value");
    await page.locator("select[name=batchId]").selectOption(batch!);
    await screenshot(page, "10-add-tub");
    await page.getByRole("button", { name: "Add tub" }).click();
    await page.waitForURL(/\/tubs\/[0-9a-f-]{36}\?added=1/);
    await page.getByText("No readings yet").waitFor();
    await page.getByTestId("targets").waitFor();
    await screenshot(page, "11-tub-hub-empty");
    const tubUrl = new URL(page.url());
    const base = tubUrl.pathname;

    // Guided capture: steps, countdown (the real 15 s), photo tips.
    await page.getByRole("link", { name: "New reading" }).first().click();
    await page.waitForURL(/\/read$/);
    await page.getByText("Run the jets").waitFor();
    await screenshot(page, "12-capture-steps");
    await page.getByRole("button", { name: /start the 15-second timer/ }).click();
    await page.getByTestId("countdown").waitFor();
    await page.waitForTimeout(2500);
    await screenshot(page, "13-countdown");
    await page.getByText("Time's up").waitFor({ timeout: 20_000 });
    await page.getByText("Lay the strip flat on a plain surface").waitFor();
    await screenshot(page, "14-photo-tips");

    // Upload through the presigned PUT, throttled so the progress bar can be seen moving.
    const cdp = await context.newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 20, downloadThroughput: -1, uploadThroughput: 150 * 1024 });
    await page.getByTestId("camera-input").setInputFiles({ name: "strip.jpg", mimeType: "image/jpeg", buffer: photo.jpeg });
    const bar = page.getByRole("progressbar", { name: "Upload progress" });
    await bar.waitFor();
    await page.waitForFunction(() => Number(document.querySelector('[role=progressbar]')?.getAttribute("aria-valuenow") ?? 0) >= 20, undefined, { timeout: 30_000 });
    await screenshot(page, "15-upload-progress");
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });

    // Review: pads read with their crops and the chart's swatches.
    await page.waitForURL(/\/readings\/[0-9a-f-]{36}$/, { timeout: 60_000 });
    await page.getByRole("heading", { name: "Check the reading" }).waitFor();
    for (const analyte of ["free_chlorine", "ph", "total_alkalinity"]) await page.getByTestId(`pad-${analyte}`).waitFor();
    // The photo was rendered with pH 7.6, free chlorine 3, alkalinity 80 (tests/render/strip-photo.ts).
    expect(Math.abs(Number(await page.getByLabel("pH value").inputValue()) - 7.6)).toBeLessThanOrEqual(0.2);
    expect(Math.abs(Number(await page.getByLabel("Free chlorine value").inputValue()) - 3)).toBeLessThanOrEqual(1);
    await page.waitForFunction(() => [...document.querySelectorAll("img")].every((i) => i.complete && i.naturalWidth > 0));
    await screenshot(page, "16-review");

    // Correct pH by tapping its swatch, then confirm.
    await page.getByRole("button", { name: "pH 7.2" }).click();
    expect(await page.getByLabel("pH value").inputValue()).toBe("7.2");
    await page.getByRole("button", { name: "Confirm the values" }).click();
    await page.getByText("Saved. Thank you for checking.").waitFor();
    await page.getByRole("link", { name: /See the next safe step/ }).first().waitFor();
    await screenshot(page, "17-confirmed");

    // History: the reading, its thumbnail, who confirmed it.
    await page.goto(`${base}/history`);
    const table = page.getByTestId("history-table");
    await table.waitFor();
    const text = (await table.textContent()) ?? "";
    expect(text).toContain("7.2*");
    expect(text).toContain("confirmed");
    expect(text).toMatch(/Test owner/);
    await page.waitForFunction(() => [...document.querySelectorAll("table img")].every((i) => (i as HTMLImageElement).complete && (i as HTMLImageElement).naturalWidth > 0));
    await screenshot(page, "18-history");

    // Trends: one chart per parameter with the reading's point and the shaded target band.
    await page.goto(`${base}/trends`);
    await page.getByTestId("trend-ph").waitFor();
    await page.locator("[data-testid=trend-ph] .recharts-line-dots circle, [data-testid=trend-ph] .recharts-dot").first().waitFor();
    expect(await page.locator("[data-testid=trend-ph] .recharts-reference-area").count()).toBe(1);
    await screenshot(page, "19-trends");

    // The tub page now shows the latest reading.
    await page.goto(base);
    await page.getByTestId("latest-values").waitFor();
    expect(await page.getByTestId("latest-values").textContent()).toContain("7.2");
    await screenshot(page, "20-tub-hub");
    await context.close();
  });
});
