// Technicians' work on the real database and storage: chart versions stay immutable and bad
// input changes nothing; invitations, access and its revocation; the review queue; owners'
// corrections and reference-solution photos proposing new chart versions.
import { randomUUID } from "node:crypto";
import { readFileSync } from "node:fs";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { correctionsReport, createChart, loadBatch, proposeFromSolutions, saveVersion } from "~/features/charts/charts.server";
import { dashboard } from "~/features/clients/clients.server";
import { auth } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { parseChart } from "~/reading";
import { renderChartPhoto } from "../render/chart-photo";
import { renderStripPhoto } from "../render/strip-photo";
import { callRoute, createTub, createUser, type TestUser } from "../support/fixtures";
import { importRoute } from "../support/routes";
import { sendChartPhoto, uploadBatchPhoto } from "../support/batch-photos";

const demo = JSON.parse(readFileSync("calibration/demo-3pad.json", "utf8"));
let tech: TestUser, owner: TestUser;
let chart: { chartId: string; batchId: string; versionId: string };

beforeAll(async () => {
  tech = await createUser("technician");
  owner = await createUser("owner");
  chart = await createChart(tech, { name: `Checks ${randomUUID().slice(0, 6)}`, lot: "L-1", expiresOn: "2028-01-31", definition: demo });
});

async function currentVersionId() {
  return (await db.query.stripBatch.findFirst({ where: eq(s.stripBatch.id, chart.batchId) }))!.currentVersionId;
}

describe("chart versions and bad input", () => {
  it("imports refuse another format or version in plain words and change nothing", async () => {
    const mod = await importRoute("routes/charts/chart.tsx");
    const before = await currentVersionId();
    for (const [doc, msg] of [
      [{ ...demo, format: "strip-chart/2" }, /version "strip-chart\/2"/],
      [{ ...demo, format: "colour-card" }, /not a strip colour chart/],
      ["not json at all", /not JSON/],
    ] as const) {
      const fd = new FormData();
      fd.set("intent", "import");
      fd.set("batchId", chart.batchId);
      fd.set("file", new File([typeof doc === "string" ? doc : JSON.stringify(doc)], "chart.json", { type: "application/json" }));
      const r = await callRoute(mod.action!, { url: `/charts/${chart.chartId}`, params: { chartId: chart.chartId }, user: tech, form: fd });
      expect(r.status).toBe(400);
      expect((r.data as { form: string }).form).toMatch(msg);
    }
    expect(await currentVersionId()).toBe(before);
  });

  it("swatch values out of order are refused and the chart in use stays", async () => {
    const mod = await importRoute("routes/charts/chart.tsx");
    const before = await currentVersionId();
    const bad = structuredClone(demo);
    bad.pads[1].swatches[2].value = 6.5;
    const r = await callRoute(mod.action!, { url: `/charts/${chart.chartId}`, params: { chartId: chart.chartId }, user: tech, form: { intent: "save", batchId: chart.batchId, definition: JSON.stringify(bad) } });
    expect(r.status).toBe(400);
    expect((r.data as { form: string }).form).toMatch(/must rise/);
    expect(await currentVersionId()).toBe(before);
  });

  it("saving makes a new numbered version and leaves the old one as it was", async () => {
    const edited = structuredClone(demo);
    edited.pads[0].swatches[1].color = "#eadbe0";
    const v = await saveVersion(tech, chart.chartId, chart.batchId, edited, "editor");
    expect(v.version).toBe(2);
    expect(await currentVersionId()).toBe(v.id);
    const v1 = await db.query.chartVersion.findFirst({ where: eq(s.chartVersion.id, chart.versionId) });
    expect(parseChart(v1!.definition).pads[0].swatches[1].color).toBe(demo.pads[0].swatches[1].color);
    const exp = await importRoute("routes/api/chart-version.ts");
    const r = await callRoute(exp.loader!, { url: `/api/chart-versions/${v.id}`, params: { versionId: v.id }, user: tech });
    expect(r.status).toBe(200);
    const body = JSON.parse(await r.response!.text());
    expect(body.format).toBe("strip-chart/1");
    expect(body.pads[0].swatches[1].color).toBe("#eadbe0");
    expect(() => parseChart(body)).not.toThrow();
  });

  it("a chart photo whose white area is a swatch, or a grid off the photo, is refused and nothing changes", async () => {
    const mod = await importRoute("routes/charts/calibrate.tsx");
    const params = { chartId: chart.chartId, batchId: chart.batchId };
    const url = `/charts/${chart.chartId}/batches/${chart.batchId}/calibrate`;
    const photo = await renderChartPhoto(demo, { seed: 9, width: 1600, height: 1200 });
    await sendChartPhoto(tech, chart.batchId, photo.jpeg);
    const before = await currentVersionId();
    const { corners, rows, cols, white } = photo.layout;
    const cell = corners.map(([x, y]) => [x, y]);
    const c = [(cell[0][0] + cell[2][0]) / 2 + 5, (cell[0][1] + cell[2][1]) / 2 + 30];
    const onSwatch = [[c[0] - 40, c[1] - 10], [c[0] - 30, c[1] - 10], [c[0] - 30, c[1]], [c[0] - 40, c[1]]];
    let r = await callRoute(mod.action!, { url, params, user: tech, form: { intent: "sample", grid: JSON.stringify({ corners, rows, cols }), white: JSON.stringify(onSwatch) } });
    expect(r.status).toBe(400);
    expect((r.data as { form: string }).form).toMatch(/white/);
    r = await callRoute(mod.action!, { url, params, user: tech, form: { intent: "sample", grid: JSON.stringify({ corners: [[-300, -20], corners[1], corners[2], corners[3]], rows, cols }), white: JSON.stringify(white) } });
    expect(r.status).toBe(400);
    expect((r.data as { form: string }).form).toMatch(/outside the photo/);
    r = await callRoute(mod.action!, { url, params, user: tech, form: { intent: "sample", grid: JSON.stringify({ corners, rows, cols }), white: JSON.stringify(white) } });
    expect(r.status).toBe(200);
    expect((r.data as { proposal: { changes: unknown[] } }).proposal.changes).toHaveLength(18);
    expect(await currentVersionId()).toBe(before);
  });
});

describe("reference solutions and owners' corrections", () => {
  it("a strip dipped in a known solution refits the swatch at that value (inserted when new)", async () => {
    const { currentChart } = await loadBatch(chart.chartId, chart.batchId);
    // The strip shows pH 7.4 (between printed swatches): the refit adds a 7.4 swatch.
    const strip = await renderStripPhoto(demo, { seed: 12, values: { ph: 7.4 } });
    const p = await proposeFromSolutions(currentChart, [{ photo: strip.jpeg, known: { ph: 7.4 } }]);
    const ph = (p.definition as { pads: { analyte: string; swatches: { value: number }[] }[] }).pads.find((x) => x.analyte === "ph")!;
    expect(ph.swatches.map((s) => s.value)).toEqual([6.2, 6.8, 7.2, 7.4, 7.6, 8, 8.4]);
    expect(p.changes).toHaveLength(1);
    expect(() => parseChart(p.definition)).not.toThrow();
  });

  it("through the calibration page: a strip photo with known values is proposed, and saved only on request", async () => {
    const mod = await importRoute("routes/charts/calibrate.tsx");
    const params = { chartId: chart.chartId, batchId: chart.batchId };
    const url = `/charts/${chart.chartId}/batches/${chart.batchId}/calibrate`;
    const strip = await renderStripPhoto(demo, { seed: 14, values: { free_chlorine: 3, ph: 7.2 } });
    const fd = new FormData();
    fd.set("intent", "solutions");
    fd.set("key_0", await uploadBatchPhoto(tech, chart.batchId, strip.jpeg));
    fd.set("value_0_free_chlorine", "3");
    fd.set("value_0_ph", "7.2");
    const missing = new FormData();
    missing.set("intent", "solutions");
    missing.set("value_1_ph", "7.2");
    const bad = await callRoute(mod.action!, { url, params, user: tech, form: missing });
    expect(bad.status).toBe(400);
    expect((bad.data as { form: string }).form).toMatch(/Photo 2: choose the strip photo/);
    const before = await currentVersionId();
    const r = await callRoute(mod.action!, { url, params, user: tech, form: fd });
    expect(r.status).toBe(200);
    const proposal = (r.data as { proposal: { definition: object; changes: { analyte: string; value: number; deltaE: number }[] } }).proposal;
    expect(proposal.changes.map((c) => [c.analyte, c.value]).sort()).toEqual([["free_chlorine", 3], ["ph", 7.2]]);
    // The rendered strip shows the printed colours, so the refit moves them only a little.
    for (const c of proposal.changes) expect(c.deltaE).toBeLessThan(4);
    expect(await currentVersionId()).toBe(before);
    const saved = await callRoute(mod.action!, { url, params, user: tech, form: { intent: "save", source: "solutions", definition: JSON.stringify(proposal.definition) } });
    expect(saved.status).toBe(302);
    const v = (await db.query.chartVersion.findFirst({ where: eq(s.chartVersion.id, (await currentVersionId())!) }))!;
    expect(v.source).toBe("solutions");
    expect(v.id).not.toBe(before);
  });

  it("shows the offset between read and confirmed values and proposes the colour owners' strips showed", async () => {
    const t = await createTub(owner.id, { batchId: chart.batchId });
    const seenLab = { l: 60, a: 40, b: 30 }; // what strips confirmed as pH 7.6 really looked like (invented)
    for (let i = 0; i < 3; i++) {
      const [r] = await db.insert(s.reading).values({ tubId: t.id, batchId: chart.batchId, chartVersionId: await currentVersionId(), status: "confirmed" }).returning();
      await db.insert(s.readingPad).values({ readingId: r.id, analyte: "ph", unit: "pH", readValue: 7.2, confirmedValue: 7.6, lab: seenLab, source: "corrected" });
    }
    const { currentChart } = await loadBatch(chart.chartId, chart.batchId);
    const report = await correctionsReport(currentChart, chart.batchId);
    const ph = report.pads.find((p) => p.analyte === "ph")!;
    expect(ph.n).toBe(3);
    expect(ph.corrected).toBe(3);
    expect(ph.meanOffset).toBeCloseTo(0.4, 9);
    expect(report.proposal?.changes.map((c) => [c.analyte, c.value])).toEqual([["ph", 7.6]]);
  });
});

describe("clients", () => {
  it("an owner invites a technician by e-mail, the technician accepts, the owner revokes", async () => {
    const t = await createTub(owner.id);
    const sharing = await importRoute("routes/tubs/sharing.tsx");
    const bad = await callRoute(sharing.action!, { url: `/tubs/${t.id}/sharing`, params: { tubId: t.id }, user: owner, form: { intent: "invite", email: "not an address" } });
    expect(bad.status).toBe(400);
    const sent = await callRoute(sharing.action!, { url: `/tubs/${t.id}/sharing`, params: { tubId: t.id }, user: owner, form: { intent: "invite", email: tech.email } });
    expect(sent.status).toBe(302);
    const inv = (await db.query.invitation.findFirst({ where: eq(s.invitation.tubId, t.id) }))!;
    expect(inv.email).toBe(tech.email.toLowerCase());
    const accept = await importRoute("routes/clients/invitations.tsx");
    const other = await createUser("technician");
    expect((await callRoute(accept.action!, { url: `/invitations/${inv.token}`, params: { token: inv.token }, user: other, form: {} })).status).toBe(403);
    const ok = await callRoute(accept.action!, { url: `/invitations/${inv.token}`, params: { token: inv.token }, user: tech, form: {} });
    expect(ok.status).toBe(302);
    expect(ok.location).toBe(`/tubs/${t.id}`);
    const detail = await importRoute("routes/tubs/detail.tsx");
    expect((await callRoute(detail.loader!, { url: `/tubs/${t.id}`, params: { tubId: t.id }, user: tech })).status).toBe(200);
    const board = await dashboard({ id: tech.id, role: "technician" } as never);
    expect(board.rows.map((b) => b.id)).toContain(t.id);

    const access = (await db.query.tubAccess.findFirst({ where: eq(s.tubAccess.tubId, t.id) }))!;
    expect((await callRoute(sharing.action!, { url: `/tubs/${t.id}/sharing`, params: { tubId: t.id }, user: owner, form: { intent: "revoke", id: "x" } })).status).toBe(404);
    const rev = await callRoute(sharing.action!, { url: `/tubs/${t.id}/sharing`, params: { tubId: t.id }, user: owner, form: { intent: "revoke", id: access.id } });
    expect(rev.status).toBe(302);
    expect((await callRoute(detail.loader!, { url: `/tubs/${t.id}`, params: { tubId: t.id }, user: tech })).status).toBe(404);
  });

  it("unsure readings wait for review until the technician marks them, with an optional correction", async () => {
    const t = await createTub(owner.id);
    await db.insert(s.tubAccess).values({ tubId: t.id, technicianId: tech.id, grantedBy: owner.id });
    const [r] = await db.insert(s.reading).values({ tubId: t.id, status: "read" }).returning();
    const [pad] = await db.insert(s.readingPad).values({ readingId: r.id, analyte: "free_chlorine", unit: "mg/L", readValue: 1, needsReview: true, reviewReason: "Please check Free chlorine" }).returning();
    const review = await importRoute("routes/clients/review.tsx");
    const q = await callRoute(review.loader!, { url: "/clients/review", user: tech });
    expect((q.data as { items: { id: string }[] }).items.map((x) => x.id)).toContain(r.id);
    const done = await callRoute(review.action!, { url: "/clients/review", user: tech, form: { readingId: r.id, [`pad_${pad.id}`]: "3" } });
    expect(done.status).toBe(302);
    const after = (await db.query.reading.findFirst({ where: eq(s.reading.id, r.id) }))!;
    expect(after.reviewedBy).toBe(tech.id);
    expect((await db.query.readingPad.findFirst({ where: eq(s.readingPad.id, pad.id) }))!.confirmedValue).toBe(3);
    expect((await callRoute(review.action!, { url: "/clients/review", user: tech, form: { readingId: "not-an-id" } })).status).toBe(404);
    const q2 = await callRoute(review.loader!, { url: "/clients/review", user: tech });
    expect((q2.data as { items: { id: string }[] }).items.map((x) => x.id)).not.toContain(r.id);
  });
});

describe("admin: users and roles", () => {
  it("an admin changes a role and bans a user, whose sessions end at once; nobody else may", async () => {
    const admin = await createUser("admin");
    const target = await createUser("owner");
    const mod = await importRoute("routes/admin/users.tsx");
    expect((await callRoute(mod.action!, { url: "/admin/users", user: tech, form: { intent: "role", userId: target.id, role: "admin" } })).status).toBe(403);
    expect((await callRoute(mod.action!, { url: "/admin/users", user: admin, form: { intent: "role", userId: target.id, role: "wizard" } })).status).toBe(400);
    expect((await callRoute(mod.action!, { url: "/admin/users", user: admin, form: { intent: "role", userId: admin.id, role: "owner" } })).status).toBe(400);
    expect((await callRoute(mod.action!, { url: "/admin/users", user: admin, form: { intent: "role", userId: target.id, role: "technician" } })).status).toBe(302);
    expect((await db.query.user.findFirst({ where: eq(s.user.id, target.id) }))!.role).toBe("technician");
    // A ban needs a reason and a confirmation; without them nothing changes.
    expect((await callRoute(mod.action!, { url: "/admin/users", user: admin, form: { intent: "ban", userId: target.id } })).status).toBe(400);
    expect((await callRoute(mod.action!, { url: "/admin/users", user: admin, form: { intent: "ban", userId: target.id, reason: "Spam sign-ups" } })).status).toBe(400);
    expect((await db.query.user.findFirst({ where: eq(s.user.id, target.id) }))!.banned).toBe(false);
    expect((await callRoute(mod.action!, { url: "/admin/users", user: admin, form: { intent: "ban", userId: target.id, reason: "Spam sign-ups", confirm: "yes" } })).status).toBe(302);
    expect((await db.query.user.findFirst({ where: eq(s.user.id, target.id) }))!.banReason).toBe("Spam sign-ups");
    expect(await auth.api.getSession({ headers: new Headers({ cookie: target.cookie }) })).toBeNull();
    expect((await db.query.user.findFirst({ where: eq(s.user.id, target.id) }))!.banned).toBe(true);
    expect((await callRoute(mod.action!, { url: "/admin/users", user: admin, form: { intent: "unban", userId: target.id } })).status).toBe(302);
    expect((await db.query.user.findFirst({ where: eq(s.user.id, target.id) }))!.banned).toBe(false);
  });
});
