// An owner in US units sets up a new bromine tub and follows its first-fill routine on a phone:
// amounts in ounces with a kitchen measure; the lock after the shock holds in the routine and the log.
import type { Browser } from "playwright-core";
import { and, eq, isNull } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { BASE_URL, launch, phoneContext, screenshot, signIn } from "../support/browser";
import { PASSWORD, createUser } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

/** Time passes: the routine's own timer ends now (the test cannot wait 30 minutes). */
async function timerDone(tubId: string) {
  const run = await db.query.routineRun.findFirst({ where: and(eq(s.routineRun.tubId, tubId), isNull(s.routineRun.completedAt)) });
  await db.update(s.routineRun).set({ state: { ...(run!.state as object), timerEndsAt: new Date(Date.now() - 1000).toISOString() } }).where(eq(s.routineRun.id, run!.id));
}
/** Time passes for the treatment log too: every dose was added `minutes` earlier. */
async function logAged(tubId: string, minutes: number) {
  const rows = await db.select().from(s.treatment).where(eq(s.treatment.tubId, tubId));
  for (const r of rows) await db.update(s.treatment).set({ addedAt: new Date(r.addedAt.getTime() - minutes * 60_000), retestAt: r.retestAt ? new Date(r.retestAt.getTime() - minutes * 60_000) : null }).where(eq(s.treatment.id, r.id));
}

describe("first fill of a bromine tub in US units", () => {
  it("sets up the tub in gallons and °F, doses in ounces with a kitchen measure, and honours the shock's lock", async () => {
    const owner = await createUser("owner");
    const context = await phoneContext(browser);
    const page = await context.newPage();
    await signIn(page, owner.email, PASSWORD);

    // US units, a per-person setting
    await page.goto("/products");
    await page.getByTestId("units-setting").getByLabel("Show amounts in").selectOption("us");
    await page.getByRole("button", { name: "Save units" }).click();
    await page.getByText("Units saved.").waitFor();

    // a new bromine tub: 400 US gallons, 102 °F, the volume helper in inches
    await page.goto("/tubs/new");
    await page.getByLabel("Name").fill("Cedar porch tub");
    expect(await page.getByLabel("Volume unit").inputValue()).toBe("USgal");
    await page.getByRole("button", { name: /Estimate it from the tub's shape/ }).click();
    await page.getByLabel("Inside diameter (in)").fill("80");
    await page.getByLabel("Water depth (in)").fill("30");
    await page.getByLabel("Seats and loungers").fill("5");
    // π × 40² × 30 in³ = 150,796 in³ = 652.8 US gal (231 in³ per US gal, NIST Handbook 44) less 5 × 100 L (26.4 gal) = 521 gal
    expect(await page.getByTestId("volume-estimate").textContent()).toMatch(/About 521 US gallons/);
    await page.getByLabel("Water volume").fill("400");
    await page.getByLabel("Sanitiser").selectOption("bromine");
    await page.getByLabel("Running temperature").fill("102");
    expect(await page.getByLabel("Temperature unit").inputValue()).toBe("F");
    await page.getByLabel("Bathers per day").fill("3");
    await screenshot(page, "first-fill-us-1-new-tub");
    await page.getByRole("button", { name: "Add tub" }).click();
    await page.waitForURL(/\/tubs\/[0-9a-f-]{36}/);
    const tubId = page.url().match(/tubs\/([0-9a-f-]{36})/)![1]!;
    const tub = await db.query.tub.findFirst({ where: eq(s.tub.id, tubId) });
    expect(tub!.volumeLitres).toBeCloseTo(1514.16, 1);
    expect(tub!.temperatureC).toBeCloseTo(38.9, 1);
    expect(tub!.bathersPerDay).toBe(3);

    // the first-fill routine
    await page.goto(`/tubs/${tubId}/setup`);
    await page.getByRole("button", { name: "Start the first-fill setup" }).click();
    await page.getByRole("button", { name: /Done, start the timer/ }).click();
    await page.getByTestId("retest-timer").waitFor();
    await timerDone(tubId);
    await page.reload();
    // 1) bromide reserve: 30 mg/L bromide in 1514 L = 59 g sodium bromide = 2.1 oz (28.35 g per oz)
    const current = page.locator('[data-testid="setup-step"].ring-2');
    await expect.poll(async () => (await current.getByTestId("setup-amount").textContent()) ?? "").toMatch(/Amount: 2\.1 oz \(59 g, about 2 ¾ tbsp\)/);
    expect(await current.getByTestId("cautions").isVisible()).toBe(true);
    await screenshot(page, "first-fill-us-2-bromide");
    await current.getByRole("button", { name: /I added this/ }).click();
    await page.getByTestId("retest-timer").waitFor();
    await expect.poll(async () => (await db.select().from(s.treatment).where(eq(s.treatment.tubId, tubId))).length).toBe(1);
    await timerDone(tubId);
    await logAged(tubId, 31);
    await page.reload();
    // 2) activate with liquid chlorine: 10 mg/L as Br2 = 4.44 mg/L as Cl2 × 1514 L / 125 g/L = 54 mL = 1.8 US fl oz
    const shock = page.locator('[data-testid="setup-step"].ring-2');
    await expect.poll(async () => (await shock.getByTestId("setup-amount").textContent()) ?? "").toMatch(/Amount: 1\.8 fl oz \(54 mL, about 3 ⅔ tbsp\)/);
    await shock.getByRole("button", { name: /I added this/ }).click();
    await page.getByTestId("retest-timer").waitFor();
    await expect.poll(async () => (await db.select().from(s.treatment).where(eq(s.treatment.tubId, tubId))).length).toBe(2);
    await screenshot(page, "first-fill-us-3-shock-timer");

    // 31 minutes later: the routine's own 30-minute timer is over, but the shock's 12-hour lock holds
    await timerDone(tubId);
    await logAged(tubId, 31);
    await page.reload();
    await page.getByText(/added as a shock: nothing else goes in until then/).waitFor();
    const rows = await db.select().from(s.treatment).where(eq(s.treatment.tubId, tubId));
    expect(rows).toHaveLength(2);

    // the treatment log refuses another dose unless it was already added
    await page.goto(`/tubs/${tubId}/treatments`);
    await page.getByLabel("Product").selectOption("bromine-granules");
    await page.getByLabel("Amount", { exact: true }).fill("20");
    await page.getByRole("button", { name: "Save the treatment" }).click();
    await page.getByText(/Nothing should go in until/).first().waitFor();
    expect(await db.select().from(s.treatment).where(eq(s.treatment.tubId, tubId))).toHaveLength(2);
    await screenshot(page, "first-fill-us-4-lock");

    // desktop view of the routine
    const desk = await browser.newContext({ baseURL: BASE_URL, viewport: { width: 1280, height: 900 }, locale: "en-US", timezoneId: "America/Denver" });
    const dp = await desk.newPage();
    await signIn(dp, owner.email, PASSWORD);
    await dp.goto(`/tubs/${tubId}/setup`);
    await dp.getByTestId("retest-timer").waitFor();
    await screenshot(dp, "first-fill-us-5-desktop");
    await desk.close();
    await context.close();
  });
});
