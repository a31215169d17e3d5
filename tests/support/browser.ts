// Real Chromium (Debian's package) driven by playwright-core against the
// production build that `npm test` serves, plus the mail catcher's inbox.
import { mkdirSync } from "node:fs";
import path from "node:path";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";

export const BASE_URL = process.env.E2E_BASE_URL ?? "http://127.0.0.1:3100";
const MAIL_URL = process.env.MAIL_CATCHER_URL ?? "http://127.0.0.1:1091";
const SHOTS = path.join(process.cwd(), "tests", "screenshots");

export const PHONE = { width: 390, height: 844 };

export async function launch(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--disable-dev-shm-usage"],
  });
}

export async function phoneContext(browser: Browser): Promise<BrowserContext> {
  return browser.newContext({ baseURL: BASE_URL, viewport: PHONE, deviceScaleFactor: 2, isMobile: true, hasTouch: true, locale: "en-GB", timezoneId: "Europe/London" });
}

export const DESKTOP = { width: 1280, height: 900 };

export async function desktopContext(browser: Browser, opts: { timezoneId?: string } = {}): Promise<BrowserContext> {
  return browser.newContext({ baseURL: BASE_URL, viewport: DESKTOP, deviceScaleFactor: 1, locale: "en-GB", timezoneId: opts.timezoneId ?? "Europe/London" });
}

/** A phone or a desktop browser, for tests that run at both sizes. */
export async function sizedContext(browser: Browser, size: "phone" | "desktop") {
  return size === "phone" ? phoneContext(browser) : desktopContext(browser);
}

export async function screenshot(page: Page, name: string) {
  mkdirSync(SHOTS, { recursive: true });
  const file = path.join(SHOTS, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

type CaughtMail = { id: string; subject: string; to: { address: string }[]; text: string; html: string; date: string };

/** Waits for an e-mail to the address whose subject matches, and returns it. */
export async function waitForMail(to: string, subject: RegExp, timeoutMs = 20_000): Promise<CaughtMail> {
  const start = Date.now();
  while (Date.now() - start < timeoutMs) {
    const res = await fetch(`${MAIL_URL}/email`);
    const all = (await res.json()) as CaughtMail[];
    const found = all.filter((m) => m.to.some((t) => t.address.toLowerCase() === to.toLowerCase()) && subject.test(m.subject));
    if (found.length) return found.sort((a, b) => b.date.localeCompare(a.date))[0];
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`no e-mail to ${to} matching ${subject} within ${timeoutMs} ms`);
}

export function firstLink(mail: CaughtMail) {
  const m = mail.text.match(/https?:\/\/\S+/);
  if (!m) throw new Error(`no link in "${mail.subject}"`);
  return m[0];
}

export async function signIn(page: Page, email: string, password: string) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail address").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/tubs/);
}
