// An owner can never reach another owner's tub: every loader and action whose
// URL takes a tub id answers 404 (or 403) to a stranger, and every signed-in
// page sends anonymous visitors to the sign-in page. The routes are read from
// app/routes.ts, so a new route is covered the day it is added.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { callRoute, createTub, createUser, shareTub, type TestUser } from "../support/fixtures";
import { flatRoutes, importRoute } from "../support/routes";

const tubRoutes = flatRoutes().filter((r) => r.path.includes(":tubId"));
const signedInRoutes = flatRoutes().filter((r) => r.underSignedInLayout);

function fill(path: string, tubId: string) {
  const params: Record<string, string> = {};
  const url = path.replace(/:(\w+)\??/g, (_, name: string) => (params[name] = name === "tubId" ? tubId : randomUUID()));
  return { url: url.replace("/*", "/x"), params: { ...params, "*": "x" } };
}

let owner: TestUser;
let stranger: TestUser;
let technicianWithout: TestUser;
let technicianWith: TestUser;
let tubId: string;

beforeAll(async () => {
  owner = await createUser("owner");
  stranger = await createUser("owner");
  technicianWithout = await createUser("technician");
  technicianWith = await createUser("technician");
  tubId = (await createTub(owner.id)).id;
  await shareTub(tubId, technicianWith.id, owner.id);
});

describe("routes that take a tub id", () => {
  it("exist", () => expect(tubRoutes.length).toBeGreaterThan(0));

  for (const route of tubRoutes) {
    it(`${route.path}: another owner gets 403 or 404 from the loader and the action`, async () => {
      const mod = await importRoute(route.file);
      const { url, params } = fill(route.path, tubId);
      for (const fn of [mod.loader, mod.action].filter(Boolean)) {
        for (const user of [stranger, technicianWithout]) {
          const result = await callRoute(fn!, { url, params, user, form: fn === mod.action ? { intent: "x" } : undefined });
          expect([403, 404], `${route.path} as ${user.role}`).toContain(result.status);
        }
      }
    });

    it(`${route.path}: an unknown or malformed tub id is 404`, async () => {
      const mod = await importRoute(route.file);
      for (const id of [randomUUID(), "not-a-uuid"]) {
        const { url, params } = fill(route.path, id);
        if (!mod.loader) continue;
        const result = await callRoute(mod.loader, { url, params, user: owner });
        expect(result.status).toBe(404);
      }
    });
  }

  it("the owner and a technician with access can open the tub page", async () => {
    const mod = await importRoute("routes/tubs/detail.tsx");
    for (const user of [owner, technicianWith]) {
      const result = await callRoute(mod.loader!, { url: `/tubs/${tubId}`, params: { tubId }, user });
      expect(result.status).toBe(200);
    }
  });
});

describe("anonymous visitors", () => {
  for (const route of signedInRoutes) {
    it(`${route.path} sends them to sign in`, async () => {
      const mod = await importRoute(route.file);
      const { url, params } = fill(route.path, randomUUID());
      for (const fn of [mod.loader, mod.action].filter(Boolean)) {
        const result = await callRoute(fn!, { url, params, user: null, form: fn === mod.action ? { intent: "x" } : undefined });
        expect(result.status, route.path).toBe(302);
        expect(result.location).toMatch(/^\/sign-in\?redirectTo=/);
      }
    });
  }
});

describe("photo uploads are bound to their tub or strip batch", () => {
  it("a tub's upload key registers only for that tub: not for another owner's tub, not as a chart photo", async () => {
    const { createChart } = await import("~/features/charts/charts.server");
    const { registerBatchPhoto } = await import("../support/batch-photos");
    const chart = await createChart(technicianWith, { name: `Bound chart ${randomUUID().slice(0, 6)}`, lot: "B-1", expiresOn: null, definition: undefined });
    const strangersTub = (await createTub(stranger.id, { batchId: chart.batchId })).id;
    const ownersKey = `uploads/tubs/${tubId}/${randomUUID()}.jpg`;
    const photos = await importRoute("routes/api/tubs.photos.ts");
    const elsewhere = await callRoute(photos.action!, { url: `/api/tubs/${strangersTub}/photos`, params: { tubId: strangersTub }, user: stranger, json: { key: ownersKey } });
    expect(elsewhere.status).toBe(400);
    expect((elsewhere.data as { code: string }).code).toBe("bad_key");
    const asChart = await registerBatchPhoto(technicianWith, chart.batchId, ownersKey);
    expect(asChart.status).toBe(400);
    expect((asChart.data as { code: string }).code).toBe("bad_key");
    // An owner may not register anything to a strip batch, their tub's batch included.
    expect((await registerBatchPhoto(stranger, chart.batchId, `uploads/batches/${chart.batchId}/${randomUUID()}.jpg`)).status).toBe(403);
  });
});
