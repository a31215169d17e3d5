// On a phone: a reading out of range shows the ordered plan with amounts for the tub's volume,
// the cautions beside every dose and the retest time; "I added this" starts the retest timer.
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { launch, phoneContext, screenshot, signIn } from "../support/browser";
import { PASSWORD, createTub, createUser } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

describe("the treatment plan on a phone", () => {
  it("shows the ordered plan for an out-of-range reading, and logging the first step starts the timer", async () => {
    const owner = await createUser("owner");
    const tub = await createTub(owner.id, { name: "Lantern deck tub", volumeLitres: 1200, temperatureC: 38, timeZone: "Europe/London", fillDate: new Date(Date.now() - 20 * 86400_000).toISOString().slice(0, 10) });
    const [reading] = await db.insert(s.reading).values({ tubId: tub.id, status: "confirmed", takenAt: new Date(Date.now() - 10 * 60_000) }).returning();
    const values = { free_chlorine: 0.5, total_chlorine: 0.6, ph: 7.9, total_alkalinity: 60, total_hardness: 150, cyanuric_acid: 20 };
    await db.insert(s.readingPad).values(Object.entries(values).map(([analyte, v]) => ({ readingId: reading!.id, analyte, readValue: v, confirmedValue: v, source: "confirmed" })));

    const context = await phoneContext(browser);
    const page = await context.newPage();
    await signIn(page, owner.email, PASSWORD);
    await page.goto(`/tubs/${tub.id}/plan`);
    await page.getByRole("heading", { name: /Do these steps in order/ }).waitFor();

    const steps = page.getByTestId("plan-step");
    expect(await steps.count()).toBeGreaterThanOrEqual(2);
    const titles = await steps.evaluateAll((els) => els.map((e) => e.querySelector("p")?.textContent ?? ""));
    expect(titles[0]).toMatch(/Raise free chlorine/);
    const taAt = titles.findIndex((t) => /total alkalinity/i.test(t));
    expect(taAt).toBeGreaterThan(0);
    // bicarbonate goes in now; the acid for pH waits for a new plan (never acid and alkali in one plan)
    expect(titles.some((t) => /Lower pH/.test(t))).toBe(false);
    // 1200 L from 0.5 to 3 mg/L free chlorine: 3.0 g Cl2 / 0.554 g per g dichlor dihydrate = 5.4 g (molar masses, chemistry.md §2.1).
    // with a kitchen measure by the granules' bulk density (about 0.9 g/mL, from memory): 6 mL ≈ 1 ¼ tsp
    expect(await steps.first().getByTestId("step-amount").textContent()).toBe("5.4 g (about 1 ¼ tsp)");
    // a maintenance top-up waits 1 h; a shock 12 h (products.ts WAIT_HOURS, common practice)
    expect(await steps.first().textContent()).toContain("after 1 h");
    // The headline states the worst finding first: free chlorine too low, do not use the tub yet.
    expect(await page.getByTestId("plan-headline").textContent()).toMatch(/Free chlorine is too low.*do not use the tub yet/);
    // Today's step first, its cautions open before the amount; later steps folded.
    const firstCautions = steps.first().getByTestId("cautions");
    expect(await firstCautions.isVisible()).toBe(true);
    expect(await firstCautions.textContent()).toContain("Add chemical to water, never water to chemical.");
    const box = await firstCautions.boundingBox();
    const amountBox = await steps.first().getByTestId("step-amount").boundingBox();
    expect(box!.y).toBeLessThan(amountBox!.y);
    expect(await page.getByTestId("later-steps").getAttribute("open")).toBeNull();
    await page.getByTestId("predicted").getByText(/May be used/).waitFor();
    await page.getByText(/licensed operators decide/).first().waitFor();
    await page.getByText(/New water\? Start with the first-fill setup/).waitFor();
    await screenshot(page, "plan-1-treatment-plan");

    await steps.first().getByRole("button", { name: "I added this" }).click();
    await page.getByTestId("retest-timer").waitFor();
    const retestAt = new Date(Date.now() + 1 * 3600_000);
    const timerText = (await page.getByTestId("retest-timer").textContent()) ?? "";
    const hhmm = timerText.match(/Retest after (\d\d):(\d\d)/);
    expect(hhmm, timerText).not.toBeNull();
    const expected = new Intl.DateTimeFormat("en-GB", { hour: "2-digit", minute: "2-digit", hour12: false, timeZone: "Europe/London" }).format(retestAt);
    const minutes = (h: string, m: string) => Number(h) * 60 + Number(m);
    const diff = Math.abs(minutes(hhmm![1]!, hhmm![2]!) - minutes(expected.slice(0, 2), expected.slice(3)));
    expect(Math.min(diff, 1440 - diff)).toBeLessThanOrEqual(1);
    await page.getByTestId("time-left").getByText(/(1 h 00|[345]\d) min to go/).waitFor();
    await page.getByRole("heading", { name: "Wait before the next step" }).waitFor();
    await screenshot(page, "plan-2-retest-timer");

    await page.getByRole("link", { name: "Treatments" }).click();
    await page.getByTestId("treatment-list").getByText("5.4 g · Chlorine granules (dichlor)").waitFor();
    await page.getByTestId("retest-timer").waitFor();
    await screenshot(page, "plan-3-treatment-log");

    await page.getByRole("link", { name: "Routines" }).click();
    await page.getByRole("button", { name: "Start the first-fill setup" }).click();
    await page.getByRole("button", { name: /Done, start the timer/ }).waitFor();
    await page.getByText(/About every 52 days/).waitFor();
    await screenshot(page, "plan-4-routines");

    await page.getByRole("link", { name: "Products" }).click();
    const dichlor = page.getByTestId("product-dichlor-granules");
    await dichlor.getByLabel("Strength (%)").fill("0");
    await dichlor.getByRole("button", { name: "Save" }).click();
    await page.getByTestId("product-dichlor-granules").getByText(/Strength cannot be zero/).waitFor();
    await screenshot(page, "plan-5-products-error");
    await context.close();
  });
});
