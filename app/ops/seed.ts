// Seeds the demo scenario. Idempotent: running it again changes nothing that
// is already there, so `npm start` can call it on every start.
import { existsSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { hashPassword } from "better-auth/crypto";
import { and, eq } from "drizzle-orm";
import * as s from "../db/schema";
import { db } from "../lib/db.server";
import { parseChart, type StripChart } from "../reading/chart";
import { DEMO_PASSWORD, DEMO_TUBS, DEMO_USERS, type DemoUserKey } from "./demo";

/** A small deterministic generator, so the demo readings are the same on every machine. */
function prng(seed: number) {
  let t = seed >>> 0;
  return () => {
    t = (t + 0x6d2b79f5) >>> 0;
    let r = Math.imul(t ^ (t >>> 15), 1 | t);
    r ^= r + Math.imul(r ^ (r >>> 7), 61 | r);
    return ((r ^ (r >>> 14)) >>> 0) / 4294967296;
  };
}

export function loadCalibrationCharts(dir = path.join(process.cwd(), "calibration")) {
  const charts = new Map<string, StripChart>();
  if (!existsSync(dir)) return charts;
  for (const file of readdirSync(dir).filter((f) => f.endsWith(".json")).sort()) {
    charts.set(file, parseChart(JSON.parse(readFileSync(path.join(dir, file), "utf8"))));
  }
  return charts;
}

async function ensureUser(u: (typeof DEMO_USERS)[number], passwordHash: string) {
  const existing = await db.query.user.findFirst({ where: eq(s.user.email, u.email) });
  if (existing) return existing.id;
  const id = `demo-${u.key}`;
  await db.insert(s.user).values({ id, name: u.name, email: u.email, emailVerified: true, role: u.role });
  await db.insert(s.account).values({ id: `demo-${u.key}-credential`, accountId: id, providerId: "credential", userId: id, password: passwordHash });
  return id;
}

async function ensureChart(file: string, chart: StripChart, createdBy: string) {
  let row = await db.query.stripChart.findFirst({ where: eq(s.stripChart.name, chart.name) });
  if (!row) [row] = await db.insert(s.stripChart).values({ name: chart.name, createdBy }).returning();
  let batch = await db.query.stripBatch.findFirst({ where: eq(s.stripBatch.chartId, row.id) });
  if (!batch) {
    const lot = `LB-${file.replace(/\D/g, "") || "0"}-2611`;
    [batch] = await db.insert(s.stripBatch).values({ chartId: row.id, lot, expiresOn: "2028-06-30", createdBy }).returning();
    const [version] = await db
      .insert(s.chartVersion)
      .values({ chartId: row.id, batchId: batch.id, version: 1, definition: chart, source: "import", note: `Imported from calibration/${file}`, createdBy })
      .returning();
    await db.update(s.stripBatch).set({ currentVersionId: version.id }).where(eq(s.stripBatch.id, batch.id));
    batch = { ...batch, currentVersionId: version.id };
  }
  return batch;
}

/** Values that drift the way a real tub does: sanitiser falls, pH creeps up, a treatment resets them. */
function demoValue(analyte: string, day: number, rand: () => number, sanitiser: string) {
  const cycle = day % 7;
  const jitter = (k: number) => (rand() - 0.5) * k;
  switch (analyte) {
    case "free_chlorine": return sanitiser === "chlorine" ? Math.max(0, 4.2 - cycle * 0.6 + jitter(0.6)) : null;
    case "total_chlorine": return sanitiser === "chlorine" ? Math.max(0, 4.6 - cycle * 0.6 + jitter(0.6)) : null;
    case "bromine": return sanitiser === "bromine" ? Math.max(0, 6.5 - cycle * 0.7 + jitter(0.8)) : null;
    case "ph": return 7.3 + cycle * 0.08 + jitter(0.15);
    case "total_alkalinity": return 95 - cycle * 2 + jitter(12);
    case "total_hardness": return 180 + day * 0.8 + jitter(15);
    case "cyanuric_acid": return sanitiser === "chlorine" ? 20 + day * 0.6 + jitter(4) : null;
    default: return null;
  }
}

export async function seedDemo() {
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const ids = {} as Record<DemoUserKey, string>;
  for (const u of DEMO_USERS) ids[u.key] = await ensureUser(u, passwordHash);

  const charts = loadCalibrationCharts();
  const batches = new Map<string, Awaited<ReturnType<typeof ensureChart>>>();
  for (const [file, chart] of charts) batches.set(file, await ensureChart(file, chart, ids.tech));

  for (const [i, t] of DEMO_TUBS.entries()) {
    const ownerId = ids[t.owner];
    const existing = await db.query.tub.findFirst({ where: and(eq(s.tub.ownerId, ownerId), eq(s.tub.name, t.name)) });
    if (existing) continue;
    const batch = batches.get(t.chart) ?? [...batches.values()][0];
    const now = Date.now();
    const fill = new Date(now - 30 * 86400_000);
    const [tub] = await db
      .insert(s.tub)
      .values({
        ownerId, name: t.name, volumeLitres: t.volumeLitres, volumeUnit: t.volumeUnit, sanitiser: t.sanitiser,
        timeZone: t.timeZone, fillDate: fill.toISOString().slice(0, 10), batchId: batch?.id,
        firstFillCompletedAt: new Date(fill.getTime() + 2 * 86400_000),
      })
      .returning();
    if (t.sharedWithTech) await db.insert(s.tubAccess).values({ tubId: tub.id, technicianId: ids.tech, grantedBy: ownerId });

    const chart = charts.get(t.chart) ?? [...charts.values()][0];
    const rand = prng(1000 + i);
    // Four weeks of readings, every second or third day, each confirmed by the owner.
    for (let day = 28; day >= 1; day -= rand() < 0.5 ? 2 : 3) {
      const takenAt = new Date(now - day * 86400_000 + 9 * 3600_000 * rand());
      const [reading] = await db
        .insert(s.reading)
        .values({ tubId: tub.id, batchId: batch?.id, chartVersionId: batch?.currentVersionId, takenAt, status: "confirmed", confirmedBy: ownerId, confirmedAt: takenAt, createdBy: ownerId })
        .returning();
      const pads = (chart?.pads ?? [])
        .map((p) => ({ p, v: demoValue(p.analyte, 28 - day, rand, t.sanitiser) }))
        .filter((x): x is { p: (typeof x)["p"]; v: number } => x.v !== null)
        .map(({ p, v }) => ({
          readingId: reading.id, analyte: p.analyte, unit: p.unit,
          readValue: Math.round(v * 100) / 100, confidence: 0.75 + rand() * 0.24,
          confirmedValue: Math.round(v * 100) / 100, source: "confirmed",
        }));
      if (pads.length) await db.insert(s.readingPad).values(pads);
      if ((28 - day) % 7 >= 5) {
        const dose = Math.round(t.volumeLitres * 0.0018 * 3 * 10) / 10;
        const addedAt = new Date(takenAt.getTime() + 20 * 60_000);
        await db.insert(s.treatment).values({
          tubId: tub.id, readingId: reading.id, productName: t.sanitiser === "chlorine" ? "Chlorine granules (dichlor)" : "Bromine tablets (BCDMH)",
          chemical: t.sanitiser === "chlorine" ? "sodium_dichloroisocyanurate_dihydrate" : "bromochlorodimethylhydantoin",
          parameter: t.sanitiser === "chlorine" ? "free_chlorine" : "bromine", amount: dose, unit: "g", addedAt,
          retestAt: new Date(addedAt.getTime() + 24 * 3600_000), addedBy: ownerId,
        });
      }
    }
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  await seedDemo();
  console.log("Demo scenario seeded.");
  process.exit(0);
}
