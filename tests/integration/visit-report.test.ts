// The printable visit report: who may open it, what it holds, and that its lists are bounded.
import { sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { REPORT_LIMITS, type VisitReport } from "~/features/tubs/report.server";
import { db } from "~/lib/db.server";
import { importRoute } from "../support/routes";
import { callRoute, createTub, createUser, shareTub } from "../support/fixtures";

const report = async (tubId: string, user: Awaited<ReturnType<typeof createUser>>, query = "") => {
  const mod = await importRoute("routes/tubs/report.tsx");
  return callRoute(mod.loader!, { url: `/tubs/${tubId}/report${query}`, params: { tubId }, user });
};

describe("visit report", () => {
  it("opens for the owner, a technician the tub is shared with and an admin; anyone else gets 404", async () => {
    const owner = await createUser("owner");
    const tech = await createUser("technician");
    const otherTech = await createUser("technician");
    const otherOwner = await createUser("owner");
    const admin = await createUser("admin");
    const tub = await createTub(owner.id, { timeZone: "America/Vancouver" });
    await shareTub(tub.id, tech.id, owner.id);
    for (const u of [owner, tech, admin]) expect((await report(tub.id, u)).status).toBe(200);
    for (const u of [otherOwner, otherTech]) expect((await report(tub.id, u)).status).toBe(404);
    const anon = await callRoute((await importRoute("routes/tubs/report.tsx")).loader!, { url: `/tubs/${tub.id}/report`, params: { tubId: tub.id }, user: null });
    expect([302, 401]).toContain(anon.status);
  });

  it("holds the period's readings against their targets, treatments, the plan with its cautions and the notes", async () => {
    const owner = await createUser("owner");
    const tech = await createUser("technician");
    const tub = await createTub(owner.id, { timeZone: "Europe/London" });
    await shareTub(tub.id, tech.id, owner.id);
    const hoursAgo = (h: number) => new Date(Date.now() - h * 3600_000);
    const [r] = await db.insert(s.reading).values({ tubId: tub.id, status: "confirmed", takenAt: hoursAgo(3), confirmedAt: hoursAgo(3) }).returning();
    // Free chlorine 0.5 mg/L: below the 2–4 mg/L hot tub range (CDC hot tub user information); pH 7.5 in 7.2–7.8.
    await db.insert(s.readingPad).values([
      { readingId: r.id, analyte: "free_chlorine", unit: "mg/L", readValue: 0.5, source: "reader" },
      { readingId: r.id, analyte: "ph", unit: "pH", readValue: 7.5, source: "reader" },
    ]);
    // An old reading, outside a 7-day report.
    await db.insert(s.reading).values({ tubId: tub.id, status: "read", takenAt: hoursAgo(24 * 20) });
    await db.insert(s.treatment).values({ tubId: tub.id, productName: "Test granules", chemical: "dichlor", parameter: "free_chlorine", amount: 12, unit: "g", addedAt: hoursAgo(30), addedBy: tech.id });
    await db.insert(s.visitNote).values({ tubId: tub.id, authorId: tech.id, body: "Filter cartridge rinsed.", visitedAt: hoursAgo(26) });

    const res = await report(tub.id, tech, "?days=7");
    expect(res.status).toBe(200);
    const d = res.data as VisitReport;
    expect(d.period.days).toBe(7);
    expect(d.readings.total).toBe(1);
    const fc = d.readings.rows[0].values.find((v) => v.analyte === "free_chlorine")!;
    expect(fc).toMatchObject({ value: 0.5, status: "low" });
    expect(d.readings.rows[0].values.find((v) => v.analyte === "ph")).toMatchObject({ value: 7.5, status: "in" });
    expect(d.treatments.rows.map((x) => [x.product, x.amount, x.for])).toEqual([["Test granules", "12 g", "Free chlorine"]]);
    expect(d.notes.rows.map((n) => n.body)).toEqual(["Filter cartridge rinsed."]);
    // The plan raises the low chlorine, and every dose keeps the usual cautions.
    const dose = d.plan.steps.find((st) => st.kind === "dose");
    expect(dose).toBeTruthy();
    expect(dose!.cautions.join(" ")).toMatch(/never water to chemical|add the chemical to water/i);
    // A bad period falls back to the default one.
    expect(((await report(tub.id, tech, "?days=99999")).data as VisitReport).period.days).toBe(30);
    // Times in the tub's zone and the reader's locale (Accept-Language en-GB by default here).
    expect(d.readings.rows[0].when).toMatch(/\d{1,2} \w{3} \d{4}, \d{2}:\d{2}/);
  });

  it("lists at most a bounded number of readings and says how many there were", async () => {
    const owner = await createUser("owner");
    const tub = await createTub(owner.id);
    await db.execute(sql`insert into reading (tub_id, status, taken_at) select ${tub.id}::uuid, 'read', now() - make_interval(mins => g) from generate_series(1, 70) g`);
    const d = (await report(tub.id, owner)).data as VisitReport;
    expect(d.readings.total).toBe(70);
    expect(d.readings.rows).toHaveLength(REPORT_LIMITS.readings);
  });
});
