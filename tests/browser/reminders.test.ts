// A reminder end to end: the scan (run here with the real clock) queues a
// "time to retest" e-mail, the worker process that `npm test` runs delivers it
// to the mail catcher, the owner follows its link, sees it under
// Notifications, changes their settings and stops that kind with the e-mail's
// unsubscribe link, without being signed in.
import PgBoss from "pg-boss";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { ensurePreferences, savePreferences } from "~/features/notify/preferences.server";
import { runScan } from "~/features/notify/scan.server";
import { MESSAGE_KINDS, type MessageKind } from "~/features/notify/schedule";
import { createQueues } from "~/jobs/queues";
import { db } from "~/lib/db.server";
import { PASSWORD, createTub, createUser } from "../support/fixtures";
import { launch, phoneContext, screenshot, signIn, waitForMail } from "../support/browser";

let browser: Browser;
let boss: PgBoss;
beforeAll(async () => {
  browser = await launch();
  boss = new PgBoss({ connectionString: process.env.DATABASE_URL!, schema: "pgboss", supervise: false, schedule: false, max: 2 });
  await boss.start();
  await createQueues(boss);
});
afterAll(async () => {
  await browser?.close();
  await boss?.stop({ graceful: true, close: true });
});

describe("reminders in the browser", () => {
  it("delivers a retest reminder through the worker, lists it, and unsubscribes in one click", async () => {
    const owner = await createUser("owner");
    await ensurePreferences(owner.id);
    // No quiet hours, so the message goes whatever the time of day of this run.
    await savePreferences(owner.id, { timeZone: "Europe/London", quietStartHour: 0, quietEndHour: 0, enabledKinds: Object.keys(MESSAGE_KINDS) as MessageKind[] });
    const tub = await createTub(owner.id, { name: "Willow tub", timeZone: "Europe/London" });
    const now = new Date();
    await db.insert(s.treatment).values({
      tubId: tub.id, productName: "Sodium bicarbonate", chemical: "sodium_bicarbonate", amount: 40, unit: "g",
      addedAt: new Date(now.getTime() - 6 * 3600_000), retestAt: new Date(now.getTime() - 60_000),
    });
    expect((await runScan(boss, now, { tubIds: [tub.id] })).queued).toBe(1);

    const mail = await waitForMail(owner.email, /Time to retest Willow tub/);
    const tubLink = mail.text.match(/https?:\/\/\S+\/tubs\/[0-9a-f-]+/)![0];
    const stopLink = mail.text.match(/https?:\/\/\S+\/unsubscribe\/\S+/)![0];

    const context = await phoneContext(browser);
    const page = await context.newPage();
    await signIn(page, owner.email, PASSWORD);
    await page.goto(new URL(tubLink).pathname);
    await page.getByRole("heading", { name: "Willow tub" }).waitFor();

    await page.goto("/notifications");
    await page.getByText("Time to retest Willow tub").waitFor();
    await screenshot(page, "notify-01-notifications");
    await page.getByRole("button", { name: "Mark read" }).click();
    await page.getByText("All caught up").waitFor();

    await page.goto("/settings/notifications");
    await page.getByLabel("Quiet from").selectOption("21");
    await page.getByLabel("Quiet until").selectOption("8");
    await page.getByRole("button", { name: "Save settings" }).click();
    await page.getByText("Your settings are saved.").waitFor();
    await screenshot(page, "notify-02-settings");
    expect(await ensurePreferences(owner.id)).toMatchObject({ quietStartHour: 21, quietEndHour: 8 });

    // The e-mail's stop link, in a fresh browser without a session.
    const anon = await phoneContext(browser);
    const stop = await anon.newPage();
    await stop.goto(new URL(stopLink).pathname);
    await stop.getByRole("button", { name: "Stop these e-mails" }).click();
    await stop.getByText("Dipwell will not e-mail you about").waitFor();
    await screenshot(stop, "notify-03-unsubscribed");
    expect((await ensurePreferences(owner.id)).disabledKinds).toEqual(["retest"]);
    await anon.close();
    await context.close();
  });

  it("shows the e-mail log to an admin", async () => {
    const admin = await createUser("admin");
    const context = await phoneContext(browser);
    const page = await context.newPage();
    await signIn(page, admin.email, PASSWORD);
    await page.goto("/admin/email");
    await page.getByRole("heading", { name: "E-mail log" }).waitFor();
    await screenshot(page, "notify-04-admin-email");
    await context.close();
  });
});
