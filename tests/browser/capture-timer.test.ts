// The 15-second wait after dipping a strip, on a phone and a desktop: it keeps counting through
// the Back button and a reload (it counts from when the strip came out, remembered in the tab),
// focus moves to the step the owner is on, and a strip dipped long ago is not photographed.
import { randomUUID } from "node:crypto";
import { isNotNull } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { launch, screenshot, signIn, sizedContext } from "../support/browser";
import { createTub, createUser, PASSWORD } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

const secondsLeft = async (page: Page) => Number(await page.getByTestId("countdown").locator("span").textContent());
const focusedText = (page: Page) => page.evaluate(() => document.activeElement?.textContent ?? "");

describe("capture timer", () => {
  for (const size of ["phone", "desktop"] as const) {
    it(`survives Back and a reload, and moves focus with the steps (${size})`, async () => {
      const owner = await createUser("owner");
      const batch = (await db.query.stripBatch.findFirst({ where: isNotNull(s.stripBatch.currentVersionId) }))!;
      const tub = await createTub(owner.id, { name: `Cove tub ${randomUUID().slice(0, 4)}`, batchId: batch.id });
      const ctx = await sizedContext(browser, size);
      const page = await ctx.newPage();
      await signIn(page, owner.email, PASSWORD);
      await page.goto(`/tubs/${tub.id}`);
      await page.goto(`/tubs/${tub.id}/read`);
      await page.getByRole("button", { name: /start the 15-second timer/ }).click();
      await page.getByTestId("countdown").waitFor();
      // Focus goes to the step that appeared, not back to the top of the page.
      expect(await focusedText(page)).toBe("Let the colours develop");
      await page.waitForTimeout(2100);
      await screenshot(page, `60-countdown-${size}`);

      // A reload: the countdown carries on from when the strip came out, not from 15.
      await page.reload();
      await page.getByTestId("countdown").waitFor();
      const afterReload = await secondsLeft(page);
      expect(afterReload).toBeLessThanOrEqual(13);
      expect(afterReload).toBeGreaterThan(0);

      // Back to the tub page and forward again: still counting.
      await page.goBack();
      await page.waitForURL(`**/tubs/${tub.id}`);
      await page.waitForTimeout(1000);
      await page.goForward();
      await page.getByTestId("countdown").waitFor();
      expect(await secondsLeft(page)).toBeLessThan(afterReload);

      // The wait ends (the dip moved back in time so the test need not wait 15 s): the photo step,
      // with focus on its heading.
      await page.evaluate((id) => sessionStorage.setItem(`dipwell:dipped:${id}`, String(Date.now() - 14_000)), tub.id);
      await page.reload();
      await page.getByRole("heading", { name: "Photograph the strip" }).waitFor({ timeout: 5000 });
      expect(await focusedText(page)).toBe("Photograph the strip");
      await page.getByText("Time's up: photograph the strip now.").waitFor();
      await screenshot(page, `61-photo-step-after-timer-${size}`);

      // A reload on the photo step stays there while the strip is fresh.
      await page.reload();
      await page.getByRole("heading", { name: "Photograph the strip" }).waitFor();

      // A strip dipped ten minutes ago: start again with a new one.
      await page.evaluate((id) => sessionStorage.setItem(`dipwell:dipped:${id}`, String(Date.now() - 600_000)), tub.id);
      await page.reload();
      await page.getByText("Dip a new strip.").waitFor();
      expect(await page.getByTestId("countdown").count()).toBe(0);
      await screenshot(page, `62-stale-strip-${size}`);

      // Start again from the countdown: back to the first step, nothing remembered.
      await page.getByRole("button", { name: /start the 15-second timer/ }).click();
      await page.getByRole("button", { name: "Start again with a new strip" }).click();
      await page.getByRole("heading", { name: "Dip the strip" }).waitFor();
      expect(await page.evaluate((id) => sessionStorage.getItem(`dipwell:dipped:${id}`), tub.id)).toBeNull();
      await ctx.close();
    });
  }
});
