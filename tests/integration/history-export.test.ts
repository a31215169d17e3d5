// The history CSV: readings and treatments in one file, in time order, streamed in batches,
// with every text cell safe to open in a spreadsheet.
import { sql } from "drizzle-orm";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { csvCell, csvFile, csvNumberSql, csvTextSql } from "~/lib/csv";
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

  it("leaves a reading's missing pads empty in their columns and writes every kind of cell as csvCell does", async () => {
    const owner = await createUser("owner");
    const tub = await createTub(owner.id);
    const at = (m: number) => new Date(Date.UTC(2026, 10, 4, 9, m));
    // Reading 1 has pH only, reading 2 free chlorine and an analyte with an odd unit; confirmed by the owner.
    const [r1] = await db.insert(s.reading).values({ tubId: tub.id, status: "read", takenAt: at(0) }).returning();
    await db.insert(s.readingPad).values({ readingId: r1.id, analyte: "ph", unit: "pH", readValue: -0.5, confirmedValue: 1e-7, source: "reader" });
    const [r2] = await db.insert(s.reading).values({ tubId: tub.id, status: "confirmed", takenAt: at(1), confirmedBy: owner.id, confirmedAt: at(2) }).returning();
    await db.insert(s.readingPad).values([
      { readingId: r2.id, analyte: "free_chlorine", unit: "mg/L", readValue: 0.30000000000000004, source: "reader" },
      { readingId: r2.id, analyte: "zz_custom", unit: " mg, \"as\" -x", readValue: 1.5e15, source: "reader" },
    ]);
    await db.insert(s.treatment).values({ tubId: tub.id, productName: "+Clear, \"fast\"", chemical: "-acid", parameter: "zz_custom", amount: 0.000015, unit: "mL", addedAt: at(3), addedBy: owner.id, note: " spaced " });
    const { text } = await csvOf(tub.id, owner);
    const who = (await db.query.user.findFirst({ where: (u, { eq }) => eq(u.id, owner.id) }))!.name;
    // The same file made cell by cell with csvCell (app/lib/csv.ts).
    const blank = (n: number) => Array.from({ length: n }, () => "");
    const expected = csvFile([
      ["record", "time", "status", "by", "confirmed_at", "free_chlorine_read", "free_chlorine_confirmed", "free_chlorine_unit", "ph_read", "ph_confirmed", "ph_unit", "zz_custom_read", "zz_custom_confirmed", "zz_custom_unit",
        "treatment_product", "treatment_chemical", "treatment_for", "treatment_amount", "treatment_unit", "treatment_shock", "treatment_note"],
      ["reading", at(0).toISOString(), "read", "", "", "", "", "", -0.5, 1e-7, "pH", "", "", "", ...blank(7)],
      ["reading", at(1).toISOString(), "confirmed", who, at(2).toISOString(), 0.30000000000000004, "", "mg/L", "", "", "", 1.5e15, "", ' mg, "as" -x', ...blank(7)],
      ["treatment", at(3).toISOString(), "", who, "", ...blank(9), '+Clear, "fast"', "-acid", "Zz custom", 0.000015, "mL", "no", " spaced "],
    ]);
    expect(text).toBe(expected);
  });

  it("streams a long history in batches without losing or repeating rows that share a millisecond", async () => {
    const owner = await createUser("owner");
    const tub = await createTub(owner.id);
    // 2,100 readings and 180 treatments a few microseconds apart: more rows than two batches, and the
    // batch edges fall inside one millisecond.
    await db.execute(sql`insert into reading (tub_id, status, taken_at)
      select ${tub.id}::uuid, 'read', timestamptz '2026-11-01 12:00:00+00' + make_interval(secs => g * 0.000003) from generate_series(1, 2100) g`);
    await db.execute(sql`insert into treatment (tub_id, product_name, chemical, amount, unit, added_at)
      select ${tub.id}::uuid, 'Test granules', 'dichlor', 5, 'g', timestamptz '2026-11-01 12:00:00+00' + make_interval(secs => g * 0.000035) from generate_series(1, 180) g`);
    const { text } = await csvOf(tub.id, owner);
    const rows = text.trimEnd().split("\r\n").slice(1).map(cells);
    expect(rows).toHaveLength(2280);
    expect(rows.filter((r) => r[0] === "treatment")).toHaveLength(180);
    const times = rows.map((r) => r[1]);
    expect([...times].sort()).toEqual(times);
  });
});

// PostgreSQL writes the export's lines; each cell must read exactly as csvCell writes the value
// JavaScript would hold: numbers as ECMA-262 Number::toString writes them (tc39.es/ecma262,
// "Number::toString"), text quoted per RFC 4180 with OWASP's formula guard (app/lib/csv.ts).
describe("the CSV cells PostgreSQL writes", () => {
  it("write numbers as JavaScript does, over the whole range a reading or amount can take", async () => {
    // Fixed points around JavaScript's and PostgreSQL's switches to exponents (1e-7/1e21 and 1e-4/1e15).
    const edges = [0, -0, 1, -1, 0.1, 0.30000000000000004, 7.4, 120, -0.5, 1e-4, 9.999999999999999e-5, 1e-5, 1.5e-5, 1e-6, 1e-7, 1.5e-7, -2.5e-9, 5e-324,
      123456789012345, 999999999999999.9, 1e15, 1.5e15, 2 ** 53 - 1, Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY];
    const values = [
      ...edges,
      ...fc.sample(fc.double({ min: -(2 ** 53), max: 2 ** 53 }), { numRuns: 2000, seed: 7 }),
      ...fc.sample(fc.double({ min: -1e-3, max: 1e-3 }), { numRuns: 1000, seed: 8 }),
    ];
    // As text, so PostgreSQL reads each value exactly (minus zero and the non-numbers included).
    const asText = values.map((v) => (Number.isNaN(v) ? "NaN" : v === Infinity ? "Infinity" : v === -Infinity ? "-Infinity" : Object.is(v, -0) ? "-0" : String(v)));
    const { rows } = await db.$client.query<{ cell: string }>(
      `select ${csvNumberSql("v")} as cell from unnest($1::float8[]) with ordinality a(v, i) order by i`,
      [asText],
    );
    const wrong = rows.map((r, i) => [values[i], r.cell, csvCell(values[i])] as const).filter(([, got, want]) => got !== want);
    expect(wrong).toEqual([]);
  });

  it("quote and guard text as csvCell does", async () => {
    const edges = ["", " ", "a", " a", "a ", "=1+2", "+x", "-x", "@x", "\tx", "\rx", "'x", "a,b", 'a"b', "a\nb", "\u00a0x", "x\u3000", "x\ufeff", "\u2028", "\u200bx", "\u0085x", "mg/L as CaCO3"];
    // Strings built from the characters that matter (formula starts, quotes, separators, JavaScript's whitespace and some that are not).
    const risky = fc.constantFrom("a", " ", ",", '"', "'", "=", "+", "-", "@", "\t", "\r", "\n", "\v", "\f", "\u00a0", "\u2009", "\u3000", "\ufeff", "\u200b", "\u0085", "é");
    const texts = [...edges, ...fc.sample(fc.string({ unit: risky, maxLength: 6 }), { numRuns: 3000, seed: 9 }), ...fc.sample(fc.string({ unit: "grapheme" }), { numRuns: 500, seed: 10 })]
      .map((t) => t.replace(/\u0000/g, "")); // PostgreSQL text holds no NUL
    const { rows } = await db.$client.query<{ cell: string }>(`select ${csvTextSql("t")} as cell from unnest($1::text[]) with ordinality a(t, i) order by i`, [texts]);
    const wrong = rows.map((r, i) => [texts[i], r.cell, csvCell(texts[i])] as const).filter(([, got, want]) => got !== want);
    expect(wrong).toEqual([]);
    expect((await db.$client.query(`select ${csvTextSql("null::text")} as t, ${csvNumberSql("null::float8")} as n`)).rows[0]).toEqual({ t: "", n: "" });
  });
});
