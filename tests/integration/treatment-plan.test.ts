// The plan pages and API on the real database: the latest reading of a tub becomes an ordered plan
// with amounts for the tub's volume; target ranges, product strengths and the treatment log change it.
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { planTreatment, validateWaterInput, type PlanStep, type WaterPlan } from "~/chemistry";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { callRoute, createTub, createUser, shareTub, type TestUser } from "../support/fixtures";
import { importRoute } from "../support/routes";

type PlanData = { plan: WaterPlan; reading: { id: string; takenAt: string } | null; timer: { retestAt: string; retestClock: string } | null; targets: Record<string, { min: number; max: number; source: string }>; error: string | null };

async function addReading(tubId: string, values: Record<string, number>, opts: { takenAt?: Date; confirmed?: Record<string, number> } = {}) {
  const [r] = await db.insert(s.reading).values({ tubId, status: "confirmed", takenAt: opts.takenAt ?? new Date() }).returning();
  await db.insert(s.readingPad).values(
    Object.entries(values).map(([analyte, v]) => ({ readingId: r!.id, analyte, readValue: v, confirmedValue: opts.confirmed?.[analyte] ?? null, source: "auto" })),
  );
  return r!;
}

const OUT_OF_RANGE = { free_chlorine: 0.5, total_chlorine: 0.6, ph: 7.9, total_alkalinity: 60, total_hardness: 150, cyanuric_acid: 20 };

let owner: TestUser, stranger: TestUser, tech: TestUser;
let tubId: string;

beforeAll(async () => {
  [owner, stranger, tech] = await Promise.all([createUser("owner"), createUser("owner"), createUser("technician")]);
  tubId = (await createTub(owner.id, { volumeLitres: 1200, temperatureC: 38, timeZone: "Europe/London" })).id;
  await shareTub(tubId, tech.id, owner.id);
  await addReading(tubId, { free_chlorine: 3, ph: 7.5, total_alkalinity: 100 }, { takenAt: new Date(Date.now() - 86400_000) });
  await addReading(tubId, OUT_OF_RANGE, { takenAt: new Date(Date.now() - 60_000) });
});

async function planOf(user: TestUser, id = tubId, query = "") {
  const { loader } = await importRoute("routes/tubs/plan.tsx");
  return callRoute(loader!, { url: `/tubs/${id}/plan${query}`, params: { tubId: id }, user });
}

describe("the plan loader", () => {
  it("plans from the latest reading: sanitiser, then total alkalinity; the acid for pH waits for a new plan (never acid and alkali in one plan)", async () => {
    const r = await planOf(owner);
    expect(r.status).toBe(200);
    const d = r.data as PlanData;
    expect(d.reading).not.toBeNull();
    const params = d.plan.steps.map((x: PlanStep) => x.parameter);
    expect(params.indexOf("free_chlorine")).toBe(0);
    expect(params.indexOf("total_alkalinity")).toBeGreaterThan(0);
    expect(params).not.toContain("ph");
    expect(d.plan.notes.join(" ")).toMatch(/new plan lowers it with acid/);
    const fc = d.plan.steps[0]!;
    // Dichlor dihydrate NaCl2(NCO)3·2H2O, M = 255.98 g/mol, 2 Cl → 2 × 35.453 × 2 / 255.98 = 0.554 g
    // available chlorine per g (IUPAC atomic weights; chemistry.md §2.1). 1200 L from 0.5 to 3 mg/L
    // needs 2.5 × 1.2 = 3.0 g Cl2 → 3.0 / 0.554 = 5.4 g (also the example of water-plan.md).
    expect(fc.chemical).toBe("sodium_dichloroisocyanurate_dihydrate");
    expect(fc.grams).toBeCloseTo(5.4, 1);
    // a maintenance top-up waits 1 h (a shock 12 h): one rule, products.ts WAIT_HOURS (common practice)
    expect(fc.retestAfterHours).toBe(1);
    for (const step of d.plan.steps) expect(step.cautions.join(" ")).toMatch(/Add chemical to water, never water to chemical/);
    expect(d.plan.notes.join(" ")).toMatch(/licensed operators decide/);
    expect(d.plan.waterBalance.lsi).not.toBeNull();
  });

  it("uses the confirmed value of a pad before the value as read", async () => {
    const id = (await createTub(owner.id, { volumeLitres: 1200 })).id;
    await addReading(id, { free_chlorine: 0.5, ph: 7.5, total_alkalinity: 100 }, { confirmed: { free_chlorine: 3 } });
    const d = (await planOf(owner, id)).data as PlanData;
    expect(d.plan.steps.filter((x) => x.parameter === "free_chlorine")).toHaveLength(0);
  });

  it("doubles the dose for a tub twice the volume (dose ∝ volume, stoichiometry)", async () => {
    const id = (await createTub(owner.id, { volumeLitres: 2400 })).id;
    await addReading(id, OUT_OF_RANGE);
    const d = (await planOf(owner, id)).data as PlanData;
    expect(d.plan.steps[0]!.grams).toBeCloseTo(10.8, 0);
  });

  it("gives a what-if plan from hand-entered values, and a plain error for a pH of 15", async () => {
    const ok = (await planOf(owner, tubId, "?whatif=1&free_chlorine=3&ph=7.5&total_alkalinity=100")).data as PlanData;
    expect(ok.plan.steps).toHaveLength(0);
    const bad = (await planOf(owner, tubId, "?whatif=1&ph=15")).data as PlanData;
    expect(bad.plan).toBeNull();
    expect(bad.error).toBe("pH must be between 0 and 14 (got 15).");
  });

  it("lets a technician with access see the plan; a stranger gets 404", async () => {
    expect((await planOf(tech)).status).toBe(200);
    expect((await planOf(stranger)).status).toBe(404);
  });
});

describe("per-tub target ranges", () => {
  it("saves an owner's range, the plan aims inside it, and the default's source stays visible", async () => {
    const id = (await createTub(owner.id, { volumeLitres: 1200 })).id;
    await addReading(id, { free_chlorine: 2.5, ph: 7.5, total_alkalinity: 100 });
    await shareTub(id, tech.id, owner.id);
    const { action } = await importRoute("routes/tubs/plan.tsx");
    const before = (await planOf(owner, id)).data as PlanData;
    expect(before.plan.steps).toHaveLength(0);
    expect(before.targets.free_chlorine!.source).toMatch(/CDC/);
    const r = await callRoute(action!, { url: `/tubs/${id}/plan`, params: { tubId: id }, user: tech, form: { intent: "targets", "free_chlorine.min": "3", "free_chlorine.max": "5" } });
    expect(r.status).toBe(302);
    const after = (await planOf(owner, id)).data as PlanData;
    expect(after.targets.free_chlorine).toMatchObject({ min: 3, max: 5 });
    expect(after.plan.steps[0]!.parameter).toBe("free_chlorine");
  });

  it("refuses a range with its lowest value above its highest, in plain words", async () => {
    const { action } = await importRoute("routes/tubs/plan.tsx");
    const r = await callRoute(action!, { url: `/tubs/${tubId}/plan`, params: { tubId }, user: owner, form: { intent: "targets", "ph.min": "7.8", "ph.max": "7.2" } });
    expect(r.status).toBe(400);
    expect((r.data as { fields: Record<string, string> }).fields.ph).toBe("pH: the lowest value must be below the highest.");
    const t = await db.query.tub.findFirst({ where: eq(s.tub.id, tubId) });
    expect(t!.targets).toEqual({});
  });
});

describe("the product catalogue", () => {
  it("refuses zero, over-100 % and percentage-as-fraction strengths with clear errors", async () => {
    const { action } = await importRoute("routes/products/list.tsx");
    const base = { intent: "save", catalogueId: "dichlor-granules", name: "Chlorine granules (dichlor)", form: "granules", packageSize: "1", packageUnit: "kg" };
    for (const [strength, words] of [["0", /cannot be zero/], ["150", /impossible/], ["0.56", /too weak/], ["abc", /must be a number/]] as const) {
      const r = await callRoute(action!, { url: "/products", user: owner, form: { ...base, strengthPercent: strength } });
      expect(r.status, strength).toBe(400);
      expect((r.data as { fields: Record<string, string> }).fields.strengthPercent).toMatch(words);
    }
    expect(await db.select().from(s.product).where(eq(s.product.ownerId, owner.id))).toHaveLength(0);
  });

  it("uses the owner's edited strength in the plan: 90 % purity, 1/0.9 the grams", async () => {
    const who = await createUser("owner");
    const id = (await createTub(who.id, { volumeLitres: 1200 })).id;
    await addReading(id, OUT_OF_RANGE);
    const { action, loader } = await importRoute("routes/products/list.tsx");
    const r = await callRoute(action!, { url: "/products", user: who, form: { intent: "save", catalogueId: "dichlor-granules", name: "Technical dichlor", form: "granules", strengthPercent: "90", packageSize: "2", packageUnit: "kg" } });
    expect(r.status).toBe(302);
    const list = (await callRoute(loader!, { url: "/products", user: who })).data as { products: { id: string; strengthPercent: number; edited: boolean }[] };
    expect(list.products.find((p) => p.id === "dichlor-granules")).toMatchObject({ strengthPercent: 90, edited: true });
    const d = (await planOf(who, id)).data as PlanData;
    expect(d.plan.steps[0]!.productName).toBe("Technical dichlor");
    expect(d.plan.steps[0]!.grams).toBeCloseTo(6.0, 1);
    // a label's 56 % available chlorine typed as strength is refused (it would overdose 1.8×)
    const bad = await callRoute(action!, { url: "/products", user: who, form: { intent: "save", catalogueId: "dichlor-granules", name: "x", form: "granules", strengthPercent: "56", packageSize: "1", packageUnit: "kg" } });
    expect(bad.status).toBe(400);
    expect((bad.data as { fields: Record<string, string> }).fields.strengthPercent).toMatch(/available chlorine/);
  });
});

describe("the treatment log", () => {
  it("records what was added; retestAt = addedAt + the step's retest hours; the plan waits and the timer runs", async () => {
    const id = (await createTub(owner.id, { volumeLitres: 1200, timeZone: "Europe/London" })).id;
    await addReading(id, OUT_OF_RANGE);
    const step = ((await planOf(owner, id)).data as PlanData).plan.steps[0]!;
    const { action, loader } = await importRoute("routes/tubs/treatments.tsx");
    const r = await callRoute(action!, {
      url: `/tubs/${id}/treatments`,
      params: { tubId: id },
      user: owner,
      form: { intent: "log", productId: step.productId!, amount: String(step.grams), unit: "g", parameter: "free_chlorine", redirectTo: `/tubs/${id}/plan` },
    });
    expect(r.status).toBe(302);
    expect(r.location).toBe(`/tubs/${id}/plan`);
    const [row] = await db.select().from(s.treatment).where(eq(s.treatment.tubId, id));
    expect(row!.chemical).toBe("sodium_dichloroisocyanurate_dihydrate");
    expect(row!.amount).toBe(step.grams);
    expect(row!.retestAt!.getTime() - row!.addedAt.getTime()).toBe(1 * 3600_000);
    const d = (await planOf(owner, id)).data as PlanData;
    expect(d.plan.steps[0]!.kind).toBe("wait");
    expect(d.timer!.retestAt).toBe(row!.retestAt!.toISOString());
    const clock = new Intl.DateTimeFormat("en-GB", { hour: "2-digit", minute: "2-digit", hour12: false, timeZone: "Europe/London" }).format(row!.retestAt!);
    expect(d.timer!.retestClock).toBe(clock);
    expect(d.plan.steps[0]!.words).toContain(`retest after ${clock}`);
    const list = (await callRoute(loader!, { url: `/tubs/${id}/treatments`, params: { tubId: id }, user: owner })).data as { treatments: unknown[]; timer: unknown };
    expect(list.treatments).toHaveLength(1);
    expect(list.timer).not.toBeNull();
  });

  it("takes the time the owner gives in the tub's time zone", async () => {
    const id = (await createTub(owner.id, { volumeLitres: 1200, timeZone: "America/New_York" })).id;
    await shareTub(id, tech.id, owner.id);
    const { action } = await importRoute("routes/tubs/treatments.tsx");
    const at = new Date(Date.now() - 3 * 3600_000);
    const local = new Intl.DateTimeFormat("sv-SE", { timeZone: "America/New_York", year: "numeric", month: "2-digit", day: "2-digit", hour: "2-digit", minute: "2-digit" }).format(at).replace(" ", "T");
    const r = await callRoute(action!, { url: `/tubs/${id}/treatments`, params: { tubId: id }, user: tech, form: { intent: "log", productId: "ph-down", amount: "40", unit: "g", addedAt: local } });
    expect(r.status).toBe(302);
    const [row] = await db.select().from(s.treatment).where(eq(s.treatment.tubId, id));
    expect(Math.abs(row!.addedAt.getTime() - at.getTime())).toBeLessThan(60_000);
    expect(row!.retestAt!.getTime() - row!.addedAt.getTime()).toBe(2 * 3600_000);
    expect(row!.addedBy).toBe(tech.id);
  });

  it("refuses bad input in plain words and stores nothing", async () => {
    const id = (await createTub(owner.id, { volumeLitres: 1200 })).id;
    const { action } = await importRoute("routes/tubs/treatments.tsx");
    const cases: [Record<string, string>, string, RegExp][] = [
      [{ productId: "dichlor-granules", amount: "", unit: "g" }, "amount", /Give the amount/],
      [{ productId: "dichlor-granules", amount: "abc", unit: "g" }, "amount", /must be a number/],
      [{ productId: "dichlor-granules", amount: "-5", unit: "g" }, "amount", /above 0/],
      [{ productId: "dichlor-granules", amount: "0", unit: "g" }, "amount", /above 0/],
      [{ productId: "dichlor-granules", amount: "50000", unit: "g" }, "amount", /far more/],
      [{ productId: "no-such-product", amount: "5", unit: "g" }, "productId", /not in your product list/],
      [{ productId: "dichlor-granules", amount: "5", unit: "mL" }, "unit", /solid/],
      [{ productId: "dichlor-granules", amount: "5", unit: "kg" }, "unit", /Choose grams/],
      [{ productId: "dichlor-granules", amount: "5", unit: "g", addedAt: "2999-01-01T10:00" }, "addedAt", /future/],
      [{ productId: "dichlor-granules", amount: "5", unit: "g", addedAt: "yesterday" }, "addedAt", /date and time/],
    ];
    for (const [form, field, words] of cases) {
      const r = await callRoute(action!, { url: `/tubs/${id}/treatments`, params: { tubId: id }, user: owner, form: { intent: "log", ...form } });
      expect(r.status, JSON.stringify(form)).toBe(400);
      expect((r.data as { fields: Record<string, string> }).fields[field], JSON.stringify(form)).toMatch(words);
    }
    expect(await db.select().from(s.treatment).where(eq(s.treatment.tubId, id))).toHaveLength(0);
  });
});

describe("the first-fill setup", () => {
  it("runs as a guided sequence: a step starts its timer, the next waits for it, ready only when the pads are in range", async () => {
    const id = (await createTub(owner.id, { volumeLitres: 1200 })).id;
    const { action, loader } = await importRoute("routes/tubs/setup.tsx");
    const call = (form: Record<string, string>) => callRoute(action!, { url: `/tubs/${id}/setup`, params: { tubId: id }, user: owner, form });
    expect((await call({ intent: "start" })).status).toBe(302);
    expect((await call({ intent: "step", step: "0" })).status).toBe(302);
    const blocked = await call({ intent: "step", step: "1" });
    expect(blocked.status).toBe(400);
    expect((blocked.data as { form: string }).form).toMatch(/timer is still running/);
    const view = (await callRoute(loader!, { url: `/tubs/${id}/setup`, params: { tubId: id }, user: owner })).data as { run: { stepIndex: number }; timer: { endsAt: string } | null; drain: { days: number } };
    expect(view.run.stepIndex).toBe(1);
    expect(view.timer).not.toBeNull();
    // Maine 10-144 CMR ch. 202 App. B: days = gallons / 3 / bathers; 1200 L = 317 US gal → 317/3/2 = 52.
    expect(view.drain.days).toBe(52);
    const notReady = await call({ intent: "complete" });
    expect(notReady.status).toBe(400);
    await addReading(id, { free_chlorine: 3, ph: 7.5, total_alkalinity: 100 });
    expect((await call({ intent: "complete" })).status).toBe(302);
    const t = await db.query.tub.findFirst({ where: eq(s.tub.id, id) });
    expect(t!.firstFillCompletedAt).not.toBeNull();
  });
});

describe("the water-plan API", () => {
  const body = { volumeLitres: 1200, temperatureC: 38, sanitiser: "chlorine", readings: OUT_OF_RANGE, bathersPerDay: 2 };

  it("answers anonymous callers with 401 JSON", async () => {
    const { action } = await importRoute("routes/api/water-plan.ts");
    const r = await callRoute(action!, { url: "/api/water-plan", user: null, json: body });
    expect(r.status).toBe(401);
    expect(r.data).toMatchObject({ error: expect.stringMatching(/Sign in/) });
  });

  it("serves the same plan as the engine to a signed-in user", async () => {
    const { action } = await importRoute("routes/api/water-plan.ts");
    const r = await callRoute(action!, { url: "/api/water-plan", user: owner, json: body });
    expect(r.status).toBe(200);
    const expected = planTreatment(validateWaterInput(body));
    expect((r.data as WaterPlan).steps.map((x) => [x.parameter, x.chemical, x.grams, x.millilitres])).toEqual(expected.steps.map((x) => [x.parameter, x.chemical, x.grams, x.millilitres]));
  });

  it("answers bad input with 400 and the plain-words error", async () => {
    const { action } = await importRoute("routes/api/water-plan.ts");
    const cases: [unknown, RegExp][] = [
      [{ ...body, readings: { ph: 15 } }, /pH must be between 0 and 14/],
      [{ ...body, volumeLitres: -5 }, /volume must be above 0/],
      [{ ...body, readings: { free_chlorine: -1 } }, /cannot be negative/],
      [{ ...body, sanitiser: "salt" }, /Unknown sanitiser/],
      [{ ...body, products: [{ id: "x", name: "Weak", chemical: "sodium_bicarbonate", form: "powder", strength: 0 }] }, /zero or negative strength/],
    ];
    for (const [json, words] of cases) {
      const r = await callRoute(action!, { url: "/api/water-plan", user: owner, json });
      expect(r.status).toBe(400);
      expect((r.data as { error: string }).error).toMatch(words);
    }
    const { response } = await callRoute(action!, { url: "/api/water-plan", user: owner, form: { not: "json" } });
    expect(response!.status).toBe(400);
  });

  it("GET /api/tubs/:tubId/plan checks who asks", async () => {
    const { loader } = await importRoute("routes/api/tubs.plan.ts");
    const call = (user: TestUser | null) => callRoute(loader!, { url: `/api/tubs/${tubId}/plan`, params: { tubId }, user });
    const mine = await call(owner);
    expect(mine.status).toBe(200);
    expect((mine.data as PlanData).plan.steps[0]!.parameter).toBe("free_chlorine");
    expect((await call(tech)).status).toBe(200);
    expect((await call(stranger)).status).toBe(404);
    expect((await call(null)).status).toBe(401);
  });
});
