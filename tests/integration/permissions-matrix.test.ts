// Who may open what: every route and API endpoint in app/routes.ts, for an owner, a technician
// with access to the tub, a technician without, another owner, an admin and an anonymous
// visitor. The routes are read from the route table, so a new route needs an expectation here
// (the test fails on a route it does not know how to judge).
import { randomUUID } from "node:crypto";
import sharp from "sharp";
import { beforeAll, describe, expect, it } from "vitest";
import { createChart } from "~/features/charts/charts.server";
import { db } from "~/lib/db.server";
import * as s from "~/db/schema";
import { eq } from "drizzle-orm";
import { callRoute, createTub, createUser, shareTub, type TestUser } from "../support/fixtures";
import { flatRoutes, importRoute, type FlatRoute } from "../support/routes";
import { presignBatchUpload, registerBatchPhoto, sendChartPhoto, uploadBatchPhoto } from "../support/batch-photos";

type Who = "owner" | "techWith" | "techWithout" | "stranger" | "admin" | "anon";
const WHO: Who[] = ["owner", "techWith", "techWithout", "stranger", "admin", "anon"];

let users: Record<Exclude<Who, "anon">, TestUser>;
let ids: Record<string, string>;

beforeAll(async () => {
  users = {
    owner: await createUser("owner"),
    techWith: await createUser("technician"),
    techWithout: await createUser("technician"),
    stranger: await createUser("owner"),
    admin: await createUser("admin"),
  };
  const chart = await createChart(users.techWith, { name: `Matrix chart ${randomUUID().slice(0, 6)}`, lot: "M-1", expiresOn: null, definition: undefined });
  const tub = await createTub(users.owner.id, { batchId: chart.batchId });
  await shareTub(tub.id, users.techWith.id, users.owner.id);
  const jpeg = await sharp({ create: { width: 400, height: 300, channels: 3, background: "#f0f0f0" } }).jpeg().toBuffer();
  const photo = { id: await sendChartPhoto(users.techWith, chart.batchId, jpeg) };
  const token = randomUUID();
  await db.insert(s.invitation).values({ tubId: tub.id, email: users.techWithout.email, token, invitedBy: users.owner.id, expiresAt: new Date(Date.now() + 86_400_000) });
  ids = { tubId: tub.id, chartId: chart.chartId, batchId: chart.batchId, versionId: chart.versionId, chartPhotoId: photo.id, token };
  expect(await db.query.tub.findFirst({ where: eq(s.tub.id, tub.id) })).toBeTruthy();
});

function fill(route: FlatRoute) {
  const params: Record<string, string> = {};
  const url = route.path.replace(/:(\w+)\??/g, (_, name: string) => {
    const v =
      name === "photoId" && route.path.startsWith("/api/chart-photos") ? ids.chartPhotoId
      : name === "analyte" ? "ph"
      : name === "kind" ? "reminders"
      : (ids[name] ?? randomUUID());
    return (params[name] = v);
  });
  return { url: url.replace("/*", "/get-session"), params: { ...params, "*": "get-session" } };
}

const TUB_ONLY_OWNER = new Set(["/tubs/:tubId/sharing", "/tubs/:tubId/edit"]);
const PUBLIC = new Set(["/", "/sign-in", "/sign-up", "/check-email", "/forgot-password", "/reset-password", "/sign-out", "/api/auth/*", "/unsubscribe/:token/:kind", "/*"]);
const CHART = (p: string) => p.startsWith("/charts") || p.startsWith("/api/chart-");
const TECH = (p: string) => p === "/clients" || p === "/clients/review";
const ADMIN = (p: string) => p.startsWith("/admin/") || p === "/dev/inbox";
/** Params other than the tub's that the test fills with ids that do not exist. */
const unknownIds = (p: string) => /:(readingId|photoId)\b/.test(p) && !p.startsWith("/api/chart-photos");

/** The statuses a loader may answer with, per visitor; null: only "no server error". */
function expected(route: FlatRoute, who: Who): number[] | null {
  const p = route.path;
  const api = p.startsWith("/api/");
  if (PUBLIC.has(p)) return null;
  if (who === "anon") return api ? [401] : [302];
  if (p.includes(":tubId")) {
    if (who === "stranger" || who === "techWithout") return [403, 404];
    if (TUB_ONLY_OWNER.has(p) && who === "techWith") return [403];
    const ok = api ? [200, 405] : [200];
    return unknownIds(p) ? [...ok, 404] : ok;
  }
  if (CHART(p)) return who === "techWith" || who === "techWithout" || who === "admin" ? [200] : [403];
  if (TECH(p)) return who === "techWith" || who === "techWithout" || who === "admin" ? [200] : [403];
  if (ADMIN(p)) return who === "admin" ? [200] : [403];
  if (p === "/invitations/:token") return [200];
  if (api) return [200, 405];
  // Any other signed-in page: open to every signed-in account.
  return [200];
}

describe("every route, every kind of visitor (loaders)", () => {
  const routes = flatRoutes();
  it("covers the app's routes", () => expect(routes.length).toBeGreaterThan(20));
  for (const route of routes) {
    it(`${route.path}`, async () => {
      const mod = await importRoute(route.file);
      if (!mod.loader) return;
      const { url, params } = fill(route);
      const seen: Record<string, number> = {};
      for (const who of WHO) {
        const user = who === "anon" ? null : users[who];
        const result = await callRoute(mod.loader, { url, params, user }).catch((e) => ({ status: 500, location: null, error: e }));
        seen[who] = result.status;
        const want = expected(route, who);
        if (want === null) expect(result.status, `${route.path} as ${who}`).toBeLessThan(500);
        else expect(want, `${route.path} as ${who} answered ${result.status}`).toContain(result.status);
        if (who === "anon" && want?.includes(302)) expect(result.location).toMatch(/^\/sign-in\?redirectTo=/);
      }
    });
  }
});

describe("actions refuse those who may not act", () => {
  for (const route of flatRoutes()) {
    if (PUBLIC.has(route.path)) continue;
    it(`${route.path}`, async () => {
      const mod = await importRoute(route.file);
      if (!mod.action) return;
      const { url, params } = fill(route);
      const p = route.path;
      const refused: Who[] = ["anon"];
      if (p.includes(":tubId")) refused.push("stranger", "techWithout", ...(TUB_ONLY_OWNER.has(p) ? (["techWith"] as Who[]) : []));
      else if (CHART(p) || TECH(p)) refused.push("owner", "stranger");
      else if (ADMIN(p)) refused.push("owner", "stranger", "techWith", "techWithout");
      for (const who of refused) {
        const user = who === "anon" ? null : users[who];
        const result = await callRoute(mod.action, { url, params, user, form: { intent: "x" } });
        const want = who === "anon" ? (p.startsWith("/api/") ? [401] : [302]) : [403, 404];
        expect(want, `${p} action as ${who} answered ${result.status}`).toContain(result.status);
      }
    });
  }

  it("an owner cannot accept an invitation meant for a technician", async () => {
    const mod = await importRoute("routes/clients/invitations.tsx");
    const result = await callRoute(mod.action!, { url: `/invitations/${ids.token}`, params: { token: ids.token }, user: users.stranger, form: {} });
    expect(result.status).toBe(403);
  });
});

describe("chart-photo and reference-solution uploads", () => {
  const calibrateUrl = () => `/charts/${ids.chartId}/batches/${ids.batchId}/calibrate`;
  let jpeg: Buffer;
  beforeAll(async () => {
    jpeg = await sharp({ create: { width: 400, height: 300, channels: 3, background: "#e8e4dc" } }).jpeg().toBuffer();
  });

  it("a presigned upload for a batch's photos: technicians and admins only", async () => {
    for (const who of WHO) {
      const r = await presignBatchUpload(who === "anon" ? null : users[who], ids.batchId, "image/jpeg", jpeg.length);
      const want = who === "anon" ? 401 : who === "owner" || who === "stranger" ? 403 : 200;
      expect(r.status, `presign as ${who}`).toBe(want);
    }
  });

  it("an owner cannot register a chart photo, even with a technician's upload key", async () => {
    const key = await uploadBatchPhoto(users.techWith, ids.batchId, jpeg);
    for (const who of ["owner", "stranger", "anon"] as const) {
      const r = await registerBatchPhoto(who === "anon" ? null : users[who], ids.batchId, key);
      expect(r.status, `register as ${who}`).toBe(who === "anon" ? 401 : 403);
    }
    // Every technician may edit every chart (the product's rule), so one without the owner's tub may register it.
    const r = await registerBatchPhoto(users.techWithout, ids.batchId, key);
    expect(r.status).toBe(201);
  });

  it("an owner can never read a technician's chart photo", async () => {
    const mod = await importRoute("routes/api/chart-photo.ts");
    const params = { photoId: ids.chartPhotoId };
    for (const who of WHO) {
      const r = await callRoute(mod.loader!, { url: `/api/chart-photos/${ids.chartPhotoId}`, params, user: who === "anon" ? null : users[who] });
      const want = who === "anon" ? 401 : who === "owner" || who === "stranger" ? 403 : 200;
      expect(r.status, `chart photo as ${who}`).toBe(want);
      await r.response?.body?.cancel();
    }
  });

  it("an owner cannot run the reference-solution refit, even with a technician's upload key", async () => {
    const key = await uploadBatchPhoto(users.techWith, ids.batchId, jpeg);
    const mod = await importRoute("routes/charts/calibrate.tsx");
    const params = { chartId: ids.chartId, batchId: ids.batchId };
    for (const who of ["owner", "stranger", "anon"] as const) {
      const r = await callRoute(mod.action!, { url: calibrateUrl(), params, user: who === "anon" ? null : users[who], form: { intent: "solutions", key_0: key, value_0_ph: "7.2" } });
      expect(who === "anon" ? [302] : [403], `refit as ${who} answered ${r.status}`).toContain(r.status);
    }
  });

  it("an upload key belongs to its tub or batch: it cannot be registered anywhere else", async () => {
    // A batch's key is not a tub's strip photo (for the tub's owner).
    const batchKey = await uploadBatchPhoto(users.techWith, ids.batchId, jpeg);
    const tubPhotos = await importRoute("routes/api/tubs.photos.ts");
    const asStrip = await callRoute(tubPhotos.action!, { url: `/api/tubs/${ids.tubId}/photos`, params: { tubId: ids.tubId }, user: users.owner, json: { key: batchKey } });
    expect(asStrip.status).toBe(400);
    expect((asStrip.data as { code: string }).code).toBe("bad_key");
    // A tub's key is not a chart photo, and one batch's key is not another's.
    const tubKey = `uploads/tubs/${ids.tubId}/${randomUUID()}.jpg`;
    const other = await createChart(users.techWith, { name: `Other chart ${randomUUID().slice(0, 6)}`, lot: "M-2", expiresOn: null, definition: undefined });
    for (const [batchId, key] of [[ids.batchId, tubKey], [other.batchId, batchKey]] as const) {
      const r = await registerBatchPhoto(users.techWith, batchId, key);
      expect(r.status).toBe(400);
      expect((r.data as { code: string }).code).toBe("bad_key");
    }
    // An unknown batch is 404 for a technician, 403 for an owner.
    expect((await presignBatchUpload(users.techWith, randomUUID(), "image/jpeg", 10)).status).toBe(404);
    expect((await presignBatchUpload(users.owner, randomUUID(), "image/jpeg", 10)).status).toBe(403);
  });
});
