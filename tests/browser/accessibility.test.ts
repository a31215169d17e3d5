// axe-core over every screen, for every role, on a phone (390×844) and a desktop: no serious or
// critical WCAG 2.x A/AA finding. Pages are taken from the demo scenario (Lantern Bay Spa Care).
import { randomBytes } from "node:crypto";
import { and, eq, isNotNull } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { DEMO_PASSWORD, DEMO_USERS } from "~/ops/demo";
import { axeFindings, describeFindings } from "../support/a11y";
import { launch, screenshot, signIn, sizedContext } from "../support/browser";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

const email = (key: string) => DEMO_USERS.find((u) => u.key === key)!.email;

async function pagesFor(role: "anonymous" | "owner" | "technician" | "admin") {
  if (role === "anonymous") return ["/", "/sign-in", "/sign-up", "/forgot-password", "/check-email", "/reset-password", "/reset-password?token=not-a-real-token", "/no-such-page"];
  const owner = (await db.query.user.findFirst({ where: eq(s.user.email, email("ash")) }))!;
  const tub = (await db.query.tub.findFirst({ where: and(eq(s.tub.ownerId, owner.id), eq(s.tub.name, "Garden tub")) }))!;
  const reading = await db.query.reading.findFirst({ where: eq(s.reading.tubId, tub.id) });
  const t = `/tubs/${tub.id}`;
  const tubPages = [t, `${t}/history`, `${t}/trends`, `${t}/read`, `${t}/plan`, `${t}/treatments`, `${t}/setup`, `${t}/notes`, `${t}/report`, ...(reading ? [`${t}/readings/${reading.id}`] : [])];
  const common = ["/tubs", "/products", "/notifications", "/settings/notifications", "/no-such-page"];
  if (role === "owner") return [...common, "/tubs/new", ...tubPages, `${t}/edit`, `${t}/sharing`];
  const batch = (await db.query.stripBatch.findFirst({ where: isNotNull(s.stripBatch.currentVersionId) }))!;
  const tech = ["/clients", "/clients/review", "/charts", `/charts/${batch.chartId}`, `/charts/${batch.chartId}/batches/${batch.id}/calibrate`];
  if (role === "technician") {
    // An open invitation to another tub of the demo owner, as the technician would open it from the e-mail.
    const token = randomBytes(18).toString("base64url");
    await db.insert(s.invitation).values({ tubId: tub.id, email: email("tech"), token, invitedBy: owner.id, expiresAt: new Date(Date.now() + 7 * 86_400_000) });
    return [...common, ...tech, ...tubPages, `/invitations/${token}`];
  }
  return [...common, ...tech, "/admin/users", "/admin/email", "/dev/inbox", ...tubPages, `${t}/edit`, `${t}/sharing`];
}

describe("accessibility (axe-core)", () => {
  it("the sweep catches a page with known faults (so a clean sweep means something)", async () => {
    const ctx = await sizedContext(browser, "desktop");
    const page = await ctx.newPage();
    // Faults from the axe-core rule descriptions: an image with no text alternative, a button with
    // no name, pale grey text on white (about 1.6:1; WCAG 2.2 SC 1.4.3 asks for 4.5:1).
    await page.setContent(`<!doctype html><html lang="en"><head><title>t</title></head><body><main><h1>t</h1><img src="data:image/gif;base64,R0lGODlhAQABAAAAACw="><button></button><p style="color:#ccc;background:#fff">faint</p></main></body></html>`);
    const ids = (await axeFindings(page)).map((f) => f.id).sort();
    expect(ids).toEqual(["button-name", "color-contrast", "image-alt"]);
    await ctx.close();
  });

  for (const size of ["phone", "desktop"] as const) {
    for (const [role, key] of [["anonymous", null], ["owner", "ash"], ["technician", "tech"], ["admin", "admin"]] as const) {
      it(`every ${role} page at ${size} size has no serious or critical finding`, async () => {
        const ctx = await sizedContext(browser, size);
        const page = await ctx.newPage();
        if (key) await signIn(page, email(key), DEMO_PASSWORD);
        const problems: string[] = [];
        let checked = 0;
        for (const path of await pagesFor(role)) {
          const res = await page.goto(path, { waitUntil: "networkidle" });
          expect(res?.status(), path).toBe(path === "/no-such-page" ? 404 : 200);
          const findings = await axeFindings(page);
          checked++;
          if (findings.length) {
            problems.push(describeFindings(`${role} ${size} ${path}`, findings));
            await screenshot(page, `axe-${role}-${size}-${path.replace(/[^a-z0-9]+/gi, "-").slice(0, 40)}`);
          }
        }
        console.log(`axe: ${role} at ${size}: ${checked} pages, ${problems.length} with serious/critical findings`);
        expect(problems.join("\n")).toBe("");
        await ctx.close();
      });
    }
  }
});
