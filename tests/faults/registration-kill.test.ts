// The app killed (SIGKILL) in the middle of a photo registration: the
// supervisor starts it again, and the owner's retry — with the same upload key,
// or a fresh upload of the same photo — gives one photo and one reading. No
// photo is lost and none is read twice.
import { readFileSync } from "node:fs";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { parseChart } from "~/reading";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { createTub, createUser, type TestUser, createChartBatch } from "../support/fixtures";
import { APP_PORT, APP_URL, kill, sleep, startStack, until, type Stack } from "./support";
import { waitForPort } from "../../app/ops/services";

const chartJson = JSON.parse(readFileSync("calibration/demo-3pad.json", "utf8"));
let stack: Stack;
let owner: TestUser;
let tubId: string;

beforeAll(async () => {
  owner = await createUser("owner");
  const made = await createChartBatch(`Fault chart ${owner.id.slice(0, 6)}`, "F-1", parseChart(chartJson));
  tubId = (await createTub(owner.id, { batchId: made.batchId })).id;
  stack = await startStack({ env: { SMTP_URL: process.env.SMTP_URL! } });
});

afterAll(async () => {
  await stack?.stop();
});

const json = (body: unknown) => ({
  method: "POST",
  headers: { cookie: owner.cookie, "content-type": "application/json", origin: APP_URL },
  body: JSON.stringify(body),
});

/** Presigned PUT, as the browser does it. */
async function upload(bytes: Buffer) {
  const res = await fetch(`${APP_URL}/api/tubs/${tubId}/uploads`, json({ contentType: "image/jpeg", size: bytes.length }));
  expect(res.status, await res.clone().text()).toBe(200);
  const { url, key } = (await res.json()) as { url: string; key: string };
  const put = await fetch(url, { method: "PUT", body: new Uint8Array(bytes), headers: { "content-type": "image/jpeg", "content-length": String(bytes.length) } });
  expect(put.status).toBe(200);
  return key;
}

const register = (key: string) => fetch(`${APP_URL}/api/tubs/${tubId}/photos`, { ...json({ key }), signal: AbortSignal.timeout(90_000) });
const photos = () => db.select().from(s.photo).where(eq(s.photo.tubId, tubId));

describe("the app killed mid-registration", () => {
  it("a retry gives one photo and one reading; nothing lost, nothing read twice", async () => {
    const strip = await renderStripPhoto(asRenderChart(chartJson), { seed: 11, surface: "paper", cast: "daylight", values: { free_chlorine: 3, ph: 7.6, total_alkalinity: 80 } });
    const key = await upload(strip.jpeg);

    // Kill the app as soon as the photo row exists (registration under way), or after 2 s at the latest.
    const inFlight = register(key).then((r) => r.status, () => "cut off");
    const started = Date.now();
    while ((await photos()).length === 0 && Date.now() - started < 2_000) await sleep(10);
    const dead = await kill(stack.app);
    // Registration is one short transaction (the reading itself is a background job), so the kill
    // lands either while the request is in flight or just after it was answered: both must end well.
    const first = await inFlight;
    expect(["cut off", 200, 201]).toContain(first);

    // The supervisor starts the app again; the owner's retry with the same key is answered.
    await stack.app.nextStart(dead);
    await waitForPort(APP_PORT, "the restarted app", 60_000);
    const retry = await register(key);
    expect(retry.status, await retry.clone().text()).toBeLessThan(300);
    const out = (await retry.json()) as { readingId: string; photoId: string };

    // A fresh upload of the same photo gives the same reading.
    const again = await register(await upload(strip.jpeg));
    expect(again.status).toBeLessThan(300);
    expect(((await again.json()) as { readingId: string }).readingId).toBe(out.readingId);

    // One photo, one reading for it, and the reading finished (read by the request or by the reading job).
    const rows = await photos();
    expect(rows).toHaveLength(1);
    expect(rows[0].id).toBe(out.photoId);
    const reading = await until("the photo's reading to finish", async () => {
      const rs = await db.select().from(s.reading).where(eq(s.reading.photoId, out.photoId));
      return rs.length === 1 && ["read", "failed", "confirmed"].includes(rs[0].status) ? rs : undefined;
    }, 90_000);
    expect(reading).toHaveLength(1);
    expect(reading[0].status).toBe("read");
    expect((await db.select().from(s.reading).where(eq(s.reading.tubId, tubId))).length).toBe(1);

    // The photo itself is still there, served to its owner.
    const served = await fetch(`${APP_URL}/tubs/${tubId}/photos/${out.photoId}`, { headers: { cookie: owner.cookie } });
    expect(served.status).toBe(200);
    expect(served.headers.get("content-type")).toBe("image/jpeg");
    expect(stack.log).toContain("app was stopped by SIGKILL; starting it again in 1 s.");
  });
});
