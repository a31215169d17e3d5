// A new owner signs up, confirms the e-mail through the mail catcher, signs in
// and sees the tub list; the demo owner and technician see their tubs.
import { randomUUID } from "node:crypto";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PASSWORD, DEMO_USERS } from "~/ops/demo";
import { firstLink, launch, phoneContext, screenshot, signIn, waitForMail } from "../support/browser";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

describe("signing up", () => {
  it("signs up, verifies the e-mail, signs in and sees the empty tub list", async () => {
    const context = await phoneContext(browser);
    const page = await context.newPage();
    const email = `new-owner-${randomUUID().slice(0, 8)}@dipwell.test`;

    await page.goto("/");
    await expect(page.getByRole("heading", { name: "Sign in" })).toBeTruthy();
    await screenshot(page, "01-sign-in");

    await page.getByRole("link", { name: "Create an account" }).click();
    await page.getByLabel("Your name").fill("New Owner");
    await page.getByLabel("E-mail address").fill(email);
    await page.getByLabel("Password").fill("a-long-password");
    await page.getByRole("button", { name: "Create account" }).click();
    await page.waitForURL(/\/check-email/);
    // The address changes as the navigation commits; the new page may render a moment later.
    await page.getByText(email).waitFor();
    expect(await page.textContent("body")).toContain(email);
    await screenshot(page, "02-check-email");

    // Signing in before confirming is refused in plain words.
    await page.goto("/sign-in");
    await page.getByLabel("E-mail address").fill(email);
    await page.getByLabel("Password").fill("a-long-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByText("Please confirm your e-mail address first").waitFor();

    const mail = await waitForMail(email, /Confirm your e-mail/);
    expect(mail.html).toContain("Confirm my e-mail address");
    await page.goto(firstLink(mail));
    await page.waitForURL(/\/tubs/);
    await page.getByText("Your e-mail address is confirmed").waitFor();
    await page.getByText("No tubs yet").waitFor();
    await screenshot(page, "03-verified-tub-list");

    // Sign out and back in with the password.
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    await signIn(page, email, "a-long-password");
    await page.getByRole("heading", { name: "Tubs", exact: true }).waitFor();
    await context.close();
  });

  it("resets a forgotten password through the e-mailed link", async () => {
    const context = await phoneContext(browser);
    const page = await context.newPage();
    const owner = DEMO_USERS.find((u) => u.key === "birch")!;
    await page.goto("/forgot-password");
    await page.getByLabel("E-mail address").fill(owner.email);
    await page.getByRole("button", { name: "Send the reset link" }).click();
    await page.getByText("a reset link is on its way").waitFor();
    const mail = await waitForMail(owner.email, /Reset your Dipwell password/);
    await page.goto(firstLink(mail));
    await page.waitForURL(/\/reset-password\?token=/);
    // Keep the demo password so other tests can still sign in with it.
    await page.getByLabel("New password").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: "Save the new password" }).click();
    await page.waitForURL(/\/sign-in\?reset=1/);
    await signIn(page, owner.email, DEMO_PASSWORD);
    await context.close();
  });
});

describe("the demo scenario", () => {
  it("shows the demo owner their tubs and the technician the tubs shared with them", async () => {
    const context = await phoneContext(browser);
    const page = await context.newPage();
    const ash = DEMO_USERS.find((u) => u.key === "ash")!;
    await signIn(page, ash.email, DEMO_PASSWORD);
    await page.getByText("Garden tub").waitFor();
    await page.getByText("Cabin tub").waitFor();
    expect(await page.getByText("Deck spa").count()).toBe(0);
    await screenshot(page, "04-demo-owner-tubs");
    await context.clearCookies();

    const tech = DEMO_USERS.find((u) => u.key === "tech")!;
    await signIn(page, tech.email, DEMO_PASSWORD);
    await page.getByRole("heading", { name: "Client tubs" }).waitFor();
    await page.getByText("Garden tub").waitFor();
    await page.getByText("Deck spa").waitFor();
    expect(await page.getByText("Cabin tub").count()).toBe(0);
    await screenshot(page, "05-demo-technician-tubs");
    await context.close();
  });
});
