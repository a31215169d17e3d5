// Each hazard found in review: the input that caused it, and the safe plan now. Sources beside each check.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ACID_ROUND_PH_FLOOR, planTreatment } from "./plan";
import { DEFAULT_PRODUCTS, NON_CHLORINE_SHOCK, WAIT_HOURS, cautionsFor, roleOf } from "./products";
import { activeLock } from "./lock";
import { routineTopUp } from "./routines";
import type { Product } from "./types";
import { validateWaterInput, WaterInputError } from "./validate";
import { ProductError } from "./doses";
import { base, doses } from "./test-water";

const ACID = ["sodium_bisulfate", "hydrochloric_acid"];
const BASE = ["sodium_carbonate", "sodium_bicarbonate"];

describe("hazard 1: acid or base is never dosed blind to pH", () => {
  it("TA 250 with no pH reading: no acid, the plan asks for pH first (common practice: pH moves with every acid dose)", () => {
    const p = planTreatment({ ...base, readings: { free_chlorine: 3, total_alkalinity: 250 } });
    expect(doses(p).some((s) => ACID.includes(s.chemical!))).toBe(false);
    expect(p.notes.join(" ")).toMatch(/Measure pH first/);
    expect(p.headline.title).toMatch(/pH was not measured/);
  });
  it("an acid round never takes the predicted pH below the engine's floor (closed-system carbonate model, chemistry.md §3.1)", () => {
    for (const [ph, ta] of [[7.2, 250], [7.8, 400], [8.4, 180], [7.05, 300]] as const) {
      const p = planTreatment({ ...base, readings: { ...base.readings, ph, total_alkalinity: ta } });
      for (const s of doses(p).filter((x) => ACID.includes(x.chemical!))) {
        const phAfter = s.sideEffects.find((e) => e.parameter === "ph")?.to ?? p.predicted.ph!;
        expect(phAfter).toBeGreaterThanOrEqual(ACID_ROUND_PH_FLOOR - 0.01);
      }
      expect(p.predicted.ph!).toBeGreaterThanOrEqual(ACID_ROUND_PH_FLOOR - 0.01);
    }
  });
});

describe("hazard 2: unknown fields are refused, naming them", () => {
  it("a 400-gallon tub typed with a misspelt field is an error, not a 400 L plan", () => {
    expect(() => validateWaterInput({ volumeLitres: 400, volumeGalons: 400, sanitiser: "chlorine", readings: {} })).toThrow(/Unknown field "volumeGalons"/);
    expect(() => validateWaterInput({ ...base, readings: { ...base.readings, chlorine: 2 } })).toThrow(/"chlorine" in readings/);
    expect(() => validateWaterInput({ ...base, products: [{ ...DEFAULT_PRODUCTS[0], purity: 1 }] })).toThrow(/"purity" in product 1/);
  });
  it("exactly one of volumeLitres / volumeGallons; 400 US gal = 1514 L (NIST Handbook 44 App. C: 3.785411784 L)", () => {
    expect(() => validateWaterInput({ ...base, volumeGallons: 400 })).toThrow(/not both/);
    const { volumeLitres: _v, ...rest } = base;
    void _v;
    expect(() => validateWaterInput(rest)).toThrow(/volume is missing/);
    expect(validateWaterInput({ ...rest, volumeGallons: 400 }).volumeLitres).toBeCloseTo(1514.16, 1);
  });
  it("temperatureF is converted; both temperatures at once is an error", () => {
    expect(validateWaterInput({ ...base, temperatureC: undefined, temperatureF: 100 }).temperatureC).toBeCloseTo(37.8, 1);
    expect(() => validateWaterInput({ ...base, temperatureF: 100 })).toThrow(/not both/);
  });
});

describe("hazard 3: a label's available chlorine is never taken as purity", () => {
  const dichlor = (extra: Partial<Product>) => ({ id: "d", name: "My dichlor", chemical: "sodium_dichloroisocyanurate_dihydrate", form: "granules", ...extra });
  it("strength 0.56 on dichlor dihydrate is refused (CLI/API); availableChlorine 0.56 gives 8.1 g for 1500 L, 1.5 → 5 mg/L", () => {
    expect(() => validateWaterInput({ ...base, products: [dichlor({ strength: 0.56 })] })).toThrow(/available chlorine/);
    const input = validateWaterInput({ ...base, readings: { ...base.readings, free_chlorine: 0.3 }, products: [dichlor({ availableChlorine: 0.56 })] });
    const p = planTreatment(input);
    // 2.7 mg/L × 1.5 m³ / 0.56 = 7.23 g (chemistry.md §2.2: g = ΔFC × V(m³) / available-chlorine fraction)
    expect(doses(p)[0]!.grams).toBeCloseTo((2.7 * 1.5) / 0.56, 1);
  });
  it("strength and availableChlorine must agree when both are given (pure dihydrate has 55.4 %, chemistry.md §2.1)", () => {
    expect(() => validateWaterInput({ ...base, products: [dichlor({ strength: 1, availableChlorine: 0.45 })] })).toThrow(/disagree/);
    expect(() => validateWaterInput({ ...base, products: [dichlor({ availableChlorine: 0.65 })] })).toThrow(/more than pure/);
    expect(() => validateWaterInput({ ...base, products: [dichlor({ strength: 1, availableChlorine: 0.554 })] })).not.toThrow();
  });
  it("an owner's product with a label figure as strength is refused by the engine itself (the app path)", () => {
    const own: Product = { ...(dichlor({ strength: 0.56 }) as Product), packageSize: { amount: 1, unit: "kg" }, cautions: [] };
    expect(() => planTreatment({ ...base, readings: { ...base.readings, free_chlorine: 0.5 } }, { products: [own] })).toThrow(ProductError);
  });
});

describe("hazard 4: cautions belong to the chemical and form, whatever the product", () => {
  it("an owner's acid keeps 'releases chlorine gas'; calcium hypochlorite keeps 'never let it meet dichlor' (J. Toxicol. Clin. Toxicol. 1995;33:349)", () => {
    const acid: Product = { id: "x", name: "Own acid", chemical: "sodium_bisulfate", form: "granules", strength: 0.93, packageSize: { amount: 1, unit: "kg" }, cautions: [] };
    const hypo: Product = { id: "y", name: "Own shock", chemical: "calcium_hypochlorite", form: "granules", strength: 0.7, packageSize: { amount: 1, unit: "kg" }, cautions: [] };
    expect(cautionsFor(acid).join(" ")).toMatch(/chlorine gas/);
    expect(cautionsFor(hypo).join(" ")).toMatch(/dichlor/);
    const p = planTreatment({ ...base, readings: { ...base.readings, free_chlorine: 0.5 } }, { products: [hypo] });
    expect(doses(p)[0]!.cautions.join(" ")).toMatch(/dichlor or trichlor meet/);
  });
});

describe("hazard 5: no base after acid in the same plan", () => {
  it("TA 130, pH 7.5: one acid round, then aeration — no soda ash, and TA ends lower than it started (chemistry.md §3.1 item 6)", () => {
    const p = planTreatment({ ...base, readings: { ...base.readings, total_alkalinity: 130 } });
    expect(doses(p).some((s) => s.chemical === "sodium_carbonate")).toBe(false);
    expect(p.steps.some((s) => s.kind === "aerate")).toBe(true);
    expect(p.predicted.total_alkalinity!).toBeLessThan(130);
  });
});

describe("hazard 6: no soda-ash overshoot at low pH", () => {
  it("pH 5.6, TA 20: bicarbonate first, then aeration; predicted TA stays in range (open system: CO2 escapes)", () => {
    const p = planTreatment({ ...base, readings: { ...base.readings, ph: 5.6, total_alkalinity: 20 } });
    expect(doses(p)[0]!.chemical).toBe("sodium_bicarbonate");
    expect(doses(p).some((s) => s.chemical === "sodium_carbonate")).toBe(false);
    expect(p.steps.some((s) => s.kind === "aerate")).toBe(true);
    expect(p.predicted.total_alkalinity!).toBeLessThanOrEqual(120);
    expect(p.predicted.ph!).toBeGreaterThanOrEqual(7.2);
  });
});

describe("hazard 7: combined chlorine is broken, and the plan says when the tub can be used", () => {
  it("free 1, total 3: breakpoint to about 10 × combined = 20 mg/L, a shock with its wait (common practice; NSPI-2 CC ≤ 0.5 [P])", () => {
    const p = planTreatment({ ...base, readings: { ...base.readings, free_chlorine: 1, total_chlorine: 3 } }, { now: new Date("2026-01-01T18:00:00Z") });
    const s = doses(p)[0]!;
    expect(s.to).toBe(20);
    expect(s.shock).toBe(true);
    expect(s.retestAfterHours).toBe(WAIT_HOURS.shock);
    // 19 mg/L × 1.5 m³ / 0.554 = 51.4 g dichlor dihydrate (chemistry.md §2.2)
    expect(s.grams).toBeCloseTo(51, 0);
    expect(p.headline.title).toMatch(/Combined chlorine/);
    expect(p.predicted.usableAfter).toBe("2026-01-02T06:00:00.000Z");
  });
  it("with a non-chlorine shock in the catalogue (and free chlorine in range) it uses that instead", () => {
    const p = planTreatment({ ...base, readings: { ...base.readings, free_chlorine: 3, total_chlorine: 4 } }, { products: [...DEFAULT_PRODUCTS, NON_CHLORINE_SHOCK] });
    expect(doses(p)[0]!.chemical).toBe("potassium_monopersulfate");
    expect(doses(p)[0]!.grams).toBe(27); // label-style 18 g per 1000 L (common practice, from memory)
  });
});

describe("hazard 8: shock and maintenance waits are one rule in one place", () => {
  it("a small top-up waits 1 h in the plan, the log and the routine alike; a shock waits 12 h", () => {
    const p = planTreatment({ ...base, readings: { ...base.readings, free_chlorine: 1.5 } });
    expect(doses(p)[0]!.retestAfterHours).toBe(WAIT_HOURS.sanitiser);
    const top = routineTopUp({ volumeLitres: 1500, sanitiser: "chlorine" });
    expect(top.find((s) => /Top up/.test(s.words))!.timerMinutes).toBe(WAIT_HOURS.sanitiser * 60);
    expect(top.find((s) => /shock/.test(s.words))!.timerMinutes).toBe(WAIT_HOURS.shock * 60);
    const now = new Date("2026-01-01T12:00:00Z");
    const small = activeLock([{ productId: "dichlor-granules", amount: 4, unit: "g", addedAt: "2026-01-01T11:30:00Z" }], { products: DEFAULT_PRODUCTS, volumeLitres: 1500, now });
    expect(small?.until).toBe("2026-01-01T12:30:00.000Z");
    const shock = activeLock([{ productId: "dichlor-granules", amount: 30, unit: "g", addedAt: "2026-01-01T11:29:00Z" }], { products: DEFAULT_PRODUCTS, volumeLitres: 1500, now });
    expect(shock?.shock).toBe(true);
    expect(shock?.until).toBe("2026-01-01T23:29:00.000Z");
  });
});

describe("hazard 9: the smaller ones", () => {
  it("a bromine tub with stabiliser 40 gets no drain (cyanuric acid does not bind bromine; common practice)", () => {
    const p = planTreatment({ ...base, sanitiser: "bromine", readings: { bromine: 5, ph: 7.5, total_alkalinity: 110, calcium_hardness: 200, cyanuric_acid: 40 } });
    expect(p.steps.some((s) => s.kind === "replace_water")).toBe(false);
  });
  it("a bromine tub with only a chlorine pad: bromine = chlorine reading × 2.25 (MAHC Annex 5.7.3.1.2.2), said so", () => {
    const p = planTreatment({ ...base, sanitiser: "bromine", readings: { free_chlorine: 2, ph: 7.5, total_alkalinity: 100, calcium_hardness: 200 } });
    expect(p.judgements[0]!.value).toBe(4.5);
    expect(p.notes.join(" ")).toMatch(/× 2.25/);
    expect(p.notes.join(" ")).not.toMatch(/used the bromine reading/);
  });
  it("the balance advice never says to raise alkalinity that is in range", () => {
    const p = planTreatment({ ...base, readings: { ...base.readings, ph: 7.2, total_alkalinity: 90, calcium_hardness: 150 } });
    expect(p.waterBalance.advice.join(" ")).not.toMatch(/alkalinity up/);
  });
});

describe("properties: no acid with base, no adjuster without its reading (fast-check)", () => {
  const maybe = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: null });
  const input = fc.record({
    volumeLitres: fc.double({ min: 100, max: 20000, noNaN: true }),
    temperatureC: fc.double({ min: 5, max: 42, noNaN: true }),
    sanitiser: fc.constantFrom("chlorine", "bromine"),
    mode: fc.constantFrom("routine", "first_fill"),
    readings: fc.record({
      free_chlorine: maybe(fc.double({ min: 0, max: 20, noNaN: true })),
      total_chlorine: maybe(fc.double({ min: 0, max: 25, noNaN: true })),
      bromine: maybe(fc.double({ min: 0, max: 20, noNaN: true })),
      ph: maybe(fc.double({ min: 4, max: 10, noNaN: true })),
      total_alkalinity: maybe(fc.oneof(fc.constant(0), fc.double({ min: 10, max: 600, noNaN: true }))),
      total_hardness: maybe(fc.oneof(fc.constant(0), fc.double({ min: 5, max: 1500, noNaN: true }))),
      calcium_hardness: maybe(fc.oneof(fc.constant(0), fc.double({ min: 5, max: 1500, noNaN: true }))),
      cyanuric_acid: maybe(fc.double({ min: 0, max: 200, noNaN: true })),
    }),
  });
  it("never both an acid and a base; acid/base only with pH and TA read; calcium only with a hardness reading; acid never below the floor", () => {
    fc.assert(
      fc.property(input, (raw) => {
        const i = validateWaterInput(raw);
        const p = planTreatment(i);
        const chems = doses(p).map((s) => s.chemical!);
        const acid = chems.some((c) => ACID.includes(c));
        const baseDosed = chems.some((c) => BASE.includes(c));
        expect(acid && baseDosed).toBe(false);
        const r = i.readings;
        if (acid || baseDosed) {
          expect(r.ph).not.toBeNull();
          expect(r.total_alkalinity).not.toBeNull();
        }
        if (chems.includes("calcium_chloride")) expect(r.calcium_hardness ?? r.total_hardness).not.toBeNull();
        for (const s of doses(p)) {
          expect(s.cautions.length).toBeGreaterThan(5);
          if (ACID.includes(s.chemical!)) expect(s.parameter === "ph" ? s.to! : s.sideEffects.find((e) => e.parameter === "ph")!.to).toBeGreaterThanOrEqual(ACID_ROUND_PH_FLOOR - 0.01);
          if (roleOf({ chemical: s.chemical! }) === "chlorine" && i.mode !== "first_fill") expect(r.free_chlorine).not.toBeNull();
        }
      }),
      { numRuns: 400 },
    );
  });
  it("unknown fields anywhere are refused with one line naming them", () => {
    fc.assert(
      fc.property(fc.string({ minLength: 1, maxLength: 12 }).filter((k) => /^[a-z]+$/i.test(k) && !["volumeLitres", "readings", "sanitiser", "tds", "mode", "units", "now", "targets", "products", "guidance", "fillTds"].includes(k)), (k) => {
        let msg = "";
        try {
          validateWaterInput({ ...base, [k]: 1 });
        } catch (e) {
          msg = (e as WaterInputError).message;
        }
        expect(msg).toContain(`"${k}"`);
        expect(msg.split("\n")).toHaveLength(1);
      }),
    );
  });
});
