// The history CSV: readings and treatments in one file, in time order, streamed in batches,
// with every text cell safe to open in a spreadsheet.
import { sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { loader as csvLoader } from "~/routes/tubs/history-csv";
import { callRoute, createTub, createUser, shareTub } from "../support/fixtures";

const csvOf = async (tubId: string, user: Awaited<ReturnType<typeof createUser>> | null) => {
  const r = await callRoute(csvLoader, { url: `/tubs/${tubId}/history.csv`, params: { tubId }, user });
  return { status: r.status, text: r.response ? await r.response.text() : "", headers: r.response?.headers };
};

/** RFC 4180 split of one line (quoted cells may hold commas and doubled quotes). */
function cells(line: string) {
  const out: string[] = [];
  let cur = "";
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i];
    if (quoted) {
      if (c === '"' && line[i + 1] === '"') (cur += '"'), i++;
      else if (c === '"') quoted = false;
      else cur += c;
    } else if (c === '"') quoted = true;
    else if (c === ",") out.push(cur), (cur = "");
    else cur += c;
  }
  out.push(cur);
  return out;
}

describe("history CSV with treatments", () => {
  it("puts readings and treatments in one file, in time order, treatments with product, amount and who added them", async () => {
    const owner = await createUser("owner");
    const tech = await createUser("technician");
    const tub = await createTub(owner.id);
    await shareTub(tub.id, tech.id, owner.id);
    const at = (h: number) => new Date(Date.UTC(2026, 10, 3, h));
    const [r1] = await db.insert(s.reading).values({ tubId: tub.id, status: "read", takenAt: at(8) }).returning();
    await db.insert(s.readingPad).values({ readingId: r1.id, analyte: "ph", unit: "pH", readValue: 7.9, source: "reader" });
    await db.insert(s.treatment).values([
      { tubId: tub.id, productName: "Lantern Bay pH Down", chemical: "sodium_bisulfate", parameter: "ph", amount: 25, unit: "g", addedAt: at(9), addedBy: tech.id, note: "Pre-dissolved in a bucket" },
      // A product name a spreadsheet would run as a formula (OWASP CSV injection).
      { tubId: tub.id, productName: "=1+2", chemical: "dichlor", parameter: "free_chlorine", amount: 13, unit: "g", addedAt: at(11), shock: true, addedBy: owner.id, note: "@later" },
    ]);
    const [r2] = await db.insert(s.reading).values({ tubId: tub.id, status: "read", takenAt: at(10) }).returning();
    await db.insert(s.readingPad).values({ readingId: r2.id, analyte: "ph", unit: "pH", readValue: 7.5, source: "reader" });

    const { status, text, headers } = await csvOf(tub.id, tech);
    expect(status).toBe(200);
    expect(headers?.get("content-disposition")).toMatch(/-history\.csv"$/);
    const lines = text.trimEnd().split("\r\n");
    expect(lines[0]).toBe("record,time,status,by,confirmed_at,ph_read,ph_confirmed,ph_unit,treatment_product,treatment_chemical,treatment_for,treatment_amount,treatment_unit,treatment_shock,treatment_note");
    const rows = lines.slice(1).map(cells);
    expect(rows.map((r) => [r[0], r[1]])).toEqual([
      ["reading", at(8).toISOString()],
      ["treatment", at(9).toISOString()],
      ["reading", at(10).toISOString()],
      ["treatment", at(11).toISOString()],
    ]);
    expect(rows[0].slice(5, 8)).toEqual(["7.9", "", "pH"]);
    expect(rows[1].slice(8)).toEqual(["Lantern Bay pH Down", "sodium_bisulfate", "pH", "25", "g", "no", "Pre-dissolved in a bucket"]);
    expect(rows[1][3]).toMatch(/^Test technician/);
    expect(rows[1].slice(5, 8)).toEqual(["", "", ""]);
    expect(rows[3].slice(8)).toEqual(["'=1+2", "dichlor", "Free chlorine", "13", "g", "yes", "'@later"]);
    for (const r of rows) expect(r).toHaveLength(15);
    for (const line of lines) for (const cell of line.split(",")) expect(cell).not.toMatch(/^[=+@\t\r]/);

    // Someone who may not see the tub is not told it exists.
    const stranger = await createUser("owner");
    expect((await csvOf(tub.id, stranger)).status).toBe(404);
  });

  it("streams a long history in batches without losing or repeating rows that share a millisecond", async () => {
    const owner = await createUser("owner");
    const tub = await createTub(owner.id);
    // 700 readings and 60 treatments a few microseconds apart: batch edges fall inside one millisecond.
    await db.execute(sql`insert into reading (tub_id, status, taken_at)
      select ${tub.id}::uuid, 'read', timestamptz '2026-11-01 12:00:00+00' + make_interval(secs => g * 0.000003) from generate_series(1, 700) g`);
    await db.execute(sql`insert into treatment (tub_id, product_name, chemical, amount, unit, added_at)
      select ${tub.id}::uuid, 'Test granules', 'dichlor', 5, 'g', timestamptz '2026-11-01 12:00:00+00' + make_interval(secs => g * 0.000035) from generate_series(1, 60) g`);
    const { text } = await csvOf(tub.id, owner);
    const rows = text.trimEnd().split("\r\n").slice(1).map(cells);
    expect(rows).toHaveLength(760);
    expect(rows.filter((r) => r[0] === "treatment")).toHaveLength(60);
    const times = rows.map((r) => r[1]);
    expect([...times].sort()).toEqual(times);
  });
});
