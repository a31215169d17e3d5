// Every screen, for every role of the demo scenario, in a browser far from the
// server's time zone (America/Vancouver, en-US; the server runs in UTC): no page
// logs a console error, a hydration error (React #418/#423/#425) or a
// Content-Security-Policy violation; a tub's times are the same in the server's
// HTML and after the page runs (no jump); dates have one format; the
// notification settings offer the browser's zone.
import { and, desc, eq, inArray } from "drizzle-orm";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { DEMO_PASSWORD, DEMO_USERS } from "~/ops/demo";
import { BASE_URL, PHONE, launch, screenshot, signIn } from "../support/browser";
import { flatRoutes } from "../support/routes";

const ZONE = "America/Vancouver";
const LOCALE = "en-US";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

async function farAwayContext(opts: { javaScript?: boolean } = {}): Promise<BrowserContext> {
  return browser.newContext({
    baseURL: BASE_URL, viewport: PHONE, locale: LOCALE, timezoneId: ZONE,
    extraHTTPHeaders: { "accept-language": LOCALE }, javaScriptEnabled: opts.javaScript ?? true,
  });
}

type Problem = { url: string; text: string };

/** Opens a page and collects what the browser complains about until it settles. */
async function visit(page: Page, url: string, problems: Problem[]) {
  const onConsole = (m: { type(): string; text(): string }) => {
    if (m.type() === "error" || /hydrat|did not match/i.test(m.text())) problems.push({ url, text: m.text() });
  };
  const onError = (e: Error) => problems.push({ url, text: `page error: ${e.message}` });
  page.on("console", onConsole);
  page.on("pageerror", onError);
  try {
    const res = await page.goto(url, { waitUntil: "networkidle" });
    await page.waitForTimeout(300);
    return res?.status() ?? 0;
  } finally {
    page.off("console", onConsole);
    page.off("pageerror", onError);
  }
}

/** The URLs of every screen (route modules with a UI) a user can open, with the demo's ids filled in. */
async function screensFor(userId: string, role: string): Promise<string[]> {
  const own = await db.select().from(s.tub).where(eq(s.tub.ownerId, userId));
  const shared = await db.select({ t: s.tub }).from(s.tubAccess).innerJoin(s.tub, eq(s.tub.id, s.tubAccess.tubId)).where(eq(s.tubAccess.technicianId, userId));
  const tubs = [...own, ...shared.map((x) => x.t)];
  const readings = tubs.length
    ? await db.select().from(s.reading).where(inArray(s.reading.tubId, tubs.map((t) => t.id))).orderBy(desc(s.reading.takenAt)).limit(200)
    : [];
  const charts = await db.select().from(s.stripChart).limit(3);
  const batches = charts.length ? await db.select().from(s.stripBatch).where(inArray(s.stripBatch.chartId, charts.map((c) => c.id))) : [];
  const urls: string[] = [];
  for (const r of flatRoutes()) {
    if (!r.file.endsWith(".tsx") || !r.underSignedInLayout) continue;
    if (r.path.includes(":token")) continue; // invitations: opened from an e-mail, covered in clients.test.ts
    if (/^\/(charts|clients|admin|dev)/.test(r.path) && role === "owner") continue;
    if (/^\/(admin|dev)/.test(r.path) && role === "technician") continue;
    let variants = [r.path];
    const fill = (param: string, values: string[]) => {
      variants = variants.flatMap((v) => (v.includes(`:${param}`) ? values.map((x) => v.replace(`:${param}`, x)) : [v]));
    };
    // Editing and sharing a tub are its owner's alone (a technician gets 403 there, by design).
    const ownerOnly = /\/(edit|sharing)$/.test(r.path);
    fill("tubId", (ownerOnly ? own : tubs).map((t) => t.id));
    fill("chartId", charts.map((c) => c.id));
    variants = variants.flatMap((v) => {
      if (v.includes(":readingId")) {
        const tubId = v.split("/")[2];
        return readings.filter((x) => x.tubId === tubId).slice(0, 1).map((x) => v.replace(":readingId", x.id));
      }
      if (v.includes(":batchId")) {
        const chartId = v.split("/")[2];
        return batches.filter((b) => b.chartId === chartId).slice(0, 1).map((b) => v.replace(":batchId", b.id));
      }
      return [v];
    });
    urls.push(...variants.filter((v) => !v.includes(":")));
  }
  return [...new Set(urls)];
}

const NUMERIC_DATE = /\b\d{1,2}\/\d{1,2}\/\d{2,4}\b/;
const US_DATE = /\b(?:Jan|Feb|Mar|Apr|May|Jun|Jul|Aug|Sep|Oct|Nov|Dec) \d{1,2}, \d{4}(?:, \d{1,2}:\d{2}\s?[AP]M)?/g;

describe(`every page in ${ZONE}, far from the server's zone`, () => {
  for (const key of ["birch", "ash", "tech", "admin"] as const) {
    it(`${key}: no console error, hydration error or CSP violation on any page; one date format`, async () => {
      const demo = DEMO_USERS.find((u) => u.key === key)!;
      const [user] = await db.select().from(s.user).where(eq(s.user.email, demo.email));
      const urls = await screensFor(user.id, demo.role);
      expect(urls.length).toBeGreaterThan(5);
      const ctx = await farAwayContext();
      const page = await ctx.newPage();
      const problems: Problem[] = [];
      page.on("console", (m) => { if (m.type() === "error") problems.push({ url: "sign-in", text: m.text() }); });
      await signIn(page, demo.email, DEMO_PASSWORD);
      page.removeAllListeners("console");
      const statuses: string[] = [];
      for (const url of urls) {
        const status = await visit(page, url, problems);
        statuses.push(`${status} ${url}`);
        const text = await page.locator("main").innerText().catch(() => "");
        expect(text, `${url} shows a numeric date`).not.toMatch(NUMERIC_DATE);
      }
      if (key === "birch") await screenshot(page, "tz-01-owner-far-away-last-page");
      expect(statuses.filter((x) => !x.startsWith("200 ")), "pages that did not open").toEqual([]);
      expect(problems, JSON.stringify(problems, null, 1)).toEqual([]);
      await ctx.close();
    });
  }

  it("anonymous pages: no console error, hydration error or CSP violation", async () => {
    const ctx = await farAwayContext();
    const page = await ctx.newPage();
    const problems: Problem[] = [];
    for (const url of ["/", "/sign-in", "/sign-up", "/forgot-password", "/reset-password?token=abc", "/check-email?email=a%40b.test"]) {
      const status = await visit(page, url, problems);
      expect(status, url).toBeLessThan(400);
    }
    expect(problems, JSON.stringify(problems, null, 1)).toEqual([]);
    await ctx.close();
  });

  it("a Vancouver tub's reading times are the same in the server's HTML and after the page runs", async () => {
    const birch = DEMO_USERS.find((u) => u.key === "birch")!;
    const [owner] = await db.select().from(s.user).where(eq(s.user.email, birch.email));
    const [tub] = await db.select().from(s.tub).where(and(eq(s.tub.ownerId, owner.id), eq(s.tub.timeZone, ZONE)));
    expect(tub).toBeTruthy();
    const [latest] = await db.select().from(s.reading).where(eq(s.reading.tubId, tub.id)).orderBy(desc(s.reading.takenAt)).limit(1);
    const withJs = await farAwayContext();
    const noJs = await farAwayContext({ javaScript: false });
    const a = await withJs.newPage();
    await signIn(a, birch.email, DEMO_PASSWORD);
    await noJs.addCookies(await withJs.cookies());
    const b = await noJs.newPage();
    for (const path of [`/tubs/${tub.id}`, `/tubs/${tub.id}/history`, `/tubs/${tub.id}/readings/${latest.id}`]) {
      await a.goto(path, { waitUntil: "networkidle" });
      await b.goto(path);
      const after = (await a.locator("main").innerText()).match(US_DATE) ?? [];
      const server = (await b.locator("main").innerText()).match(US_DATE) ?? [];
      expect(after.length, path).toBeGreaterThan(0);
      expect(after, path).toEqual(server);
    }
    // The times are the tub's local times: the reading's hour in Vancouver.
    const hour = new Intl.DateTimeFormat(LOCALE, { timeZone: ZONE, hour: "numeric", minute: "2-digit" }).format(latest.takenAt);
    await a.goto(`/tubs/${tub.id}/readings/${latest.id}`, { waitUntil: "networkidle" });
    expect(await a.locator("main").innerText()).toContain(hour);
    await withJs.close();
    await noJs.close();
  });

  it("notification settings offer the browser's zone, never a zone from the top of the list", async () => {
    const ctx = await farAwayContext();
    const page = await ctx.newPage();
    const { createUser, PASSWORD } = await import("../support/fixtures");
    const u = await createUser("owner");
    await signIn(page, u.email, PASSWORD);
    await page.goto("/settings/notifications", { waitUntil: "networkidle" });
    expect(await page.getByLabel("Time zone").inputValue()).toBe(ZONE);
    await screenshot(page, "tz-02-settings-browser-zone");
    await ctx.close();
  });
});
