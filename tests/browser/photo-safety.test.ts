// An owner's photo can never become a page that runs in someone else's session: the owner
// uploads a strip photo, then PUTs HTML with a script to the same presigned URL; an admin then
// opens the photo's address. The photo route answers with the registered image type, nosniff and
// a sandboxing policy, so nothing runs and the owner's account is unchanged.
import { eq, isNotNull } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { BASE_URL, launch, phoneContext, screenshot, signIn } from "../support/browser";
import { createTub, createUser, PASSWORD, type TestUser } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

async function api(user: TestUser, path: string, body: unknown) {
  const res = await fetch(`${BASE_URL}${path}`, { method: "POST", headers: { cookie: user.cookie, "content-type": "application/json", origin: BASE_URL }, body: JSON.stringify(body) });
  return { status: res.status, json: (await res.json()) as Record<string, string> };
}

describe("a photo re-sent as HTML after registration", () => {
  it("is served to an admin as an image, and no script runs", async () => {
    const owner = await createUser("owner");
    const admin = await createUser("admin");
    const batch = (await db.query.stripBatch.findFirst({ where: isNotNull(s.stripBatch.currentVersionId) }))!;
    const version = (await db.query.chartVersion.findFirst({ where: eq(s.chartVersion.id, batch.currentVersionId!) }))!;
    const tub = await createTub(owner.id, { batchId: batch.id });
    const { jpeg } = await renderStripPhoto(asRenderChart(version.definition as never), { seed: 21, surface: "paper" });

    const presign = await api(owner, `/api/tubs/${tub.id}/uploads`, { contentType: "image/jpeg", size: jpeg.length });
    expect(presign.status).toBe(200);
    expect((await fetch(presign.json.url, { method: "PUT", body: new Uint8Array(jpeg), headers: { "content-type": "image/jpeg" } })).status).toBe(200);
    const reg = await api(owner, `/api/tubs/${tub.id}/photos`, { key: presign.json.key });
    expect([200, 201, 202]).toContain(reg.status);
    const photoId = reg.json.photoId;

    // The owner's script would make the owner an admin through the admin's session.
    const html = `<!doctype html><html><head><title>photo</title></head><body><script>
      document.title = "script ran";
      fetch("/admin/users", { method: "POST", credentials: "include", body: new URLSearchParams({ intent: "role", userId: ${JSON.stringify(owner.id)}, role: "admin" }) });
    </script><p>hello</p></body></html>`;
    await fetch(presign.json.url, { method: "PUT", body: html, headers: { "content-type": "text/html" } });

    const context = await phoneContext(browser);
    const page = await context.newPage();
    await signIn(page, admin.email, PASSWORD);
    const res = await page.goto(`/tubs/${tub.id}/photos/${photoId}`);
    await page.waitForTimeout(1500);
    // Nothing ran: the title is not the script's, and the owner is still an owner.
    expect(await page.title()).not.toBe("script ran");
    expect((await db.query.user.findFirst({ where: eq(s.user.id, owner.id) }))!.role).toBe("owner");
    expect(res!.status()).toBe(200);
    const headers = res!.headers();
    expect(headers["content-type"]).toBe("image/jpeg");
    expect(headers["x-content-type-options"]).toBe("nosniff");
    expect(headers["content-security-policy"]).toMatch(/sandbox/);
    expect(await res!.body()).toEqual(jpeg);
    await screenshot(page, "60-admin-views-owner-photo");
    await context.close();
    const row = await db.query.user.findFirst({ where: eq(s.user.id, owner.id) });
    expect(row!.role).toBe("owner");
  });
});
