import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { planTreatment } from "./plan";
import { DEFAULT_PRODUCTS } from "./products";
import { firstFillRoutine, foamTreatment, routineTopUp } from "./routines";
import { DEFAULT_TARGETS } from "./targets";
import type { WaterInput, WaterPlan } from "./types";
import { hasNonFinite, validateWaterInput } from "./validate";

const inRange: WaterInput = {
  volumeLitres: 1500,
  temperatureC: 38,
  sanitiser: "chlorine",
  readings: { free_chlorine: 3, ph: 7.5, total_alkalinity: 100, calcium_hardness: 200, cyanuric_acid: 30 },
};

const firstDose = (p: WaterPlan) => p.steps.find((s) => s.kind === "dose")!;
const amount = (s: WaterPlan["steps"][number]) => s.grams ?? s.millilitres ?? 0;

describe("default targets follow published guidance", () => {
  // CDC "Hot Tub/Spa User Information": free chlorine 2–4, bromine 4–6, pH 7.2–7.8.
  it("CDC hot tub user information", () => {
    expect(DEFAULT_TARGETS.chlorine.free_chlorine).toMatchObject({ min: 2, max: 4 });
    expect(DEFAULT_TARGETS.bromine.bromine).toMatchObject({ min: 4, max: 6 });
    expect(DEFAULT_TARGETS.chlorine.ph).toMatchObject({ min: 7.2, max: 7.8 });
    for (const t of Object.values(DEFAULT_TARGETS)) for (const r of Object.values(t)) expect(r.source.length).toBeGreaterThan(5);
  });
});

describe("planTreatment", () => {
  it("has no step when everything is in range", () => {
    const p = planTreatment(inRange);
    expect(p.steps).toEqual([]);
    expect(p.waterBalance.verdict).toBe("balanced");
    expect(p.notes.some((n) => n.includes("licensed operators"))).toBe(true);
  });

  it("orders stages sanitiser → alkalinity → pH, one product each, every step with cautions", () => {
    const p = planTreatment({ ...inRange, readings: { free_chlorine: 0.5, ph: 6.6, total_alkalinity: 50, calcium_hardness: 100, cyanuric_acid: 20 } });
    expect(p.steps.map((s) => s.parameter)).toEqual(["free_chlorine", "total_alkalinity", "ph", "calcium_hardness"]);
    expect(p.steps.map((s) => s.order)).toEqual([1, 2, 3, 4]);
    // a maintenance top-up (0.5 → 3 mg/L) waits one hour, not a shock's 12 h (common practice; products.ts WAIT_HOURS)
    expect(p.steps[0]!.retestAfterHours).toBe(1);
    for (const s of p.steps.slice(1)) expect(s.retestAfterHours).toBeGreaterThanOrEqual(2);
    for (const s of p.steps.filter((x) => x.kind === "dose")) {
      expect(s.cautions.join(" ")).toMatch(/never water to chemical/);
      expect(s.cautions.join(" ")).toMatch(/Never mix products/);
      expect(s.cautions.join(" ")).toMatch(/anyone in the tub/);
      expect(s.cautions.join(" ")).toMatch(/Pre-dissolve/);
      expect(s.cautions.join(" ")).toMatch(/gloves and eye protection/);
      expect(s.cautions.join(" ")).toMatch(/children and pets/);
    }
    // pH 6.6 with alkalinity raised to 100: soda ash would overshoot alkalinity, so pH rises by aeration
    expect(p.steps[2]!.kind).toBe("aerate");
    expect(p.steps.some((s) => s.chemical === "sodium_carbonate")).toBe(false);
    expect(p.notes.join(" ")).toMatch(/bicarbonate first/);
  });

  it("matches the water-plan.md example: 1200 L, FC 0.5 → 3 with dichlor dihydrate ≈ 5.4 g", () => {
    const p = planTreatment({ volumeLitres: 1200, temperatureC: 38, sanitiser: "chlorine", readings: { free_chlorine: 0.5, ph: 7.6, total_alkalinity: 100, calcium_hardness: 200, cyanuric_acid: 20 } });
    const s = p.steps[0]!;
    expect(s).toMatchObject({ parameter: "free_chlorine", direction: "raise", from: 0.5, to: 3, chemical: "sodium_dichloroisocyanurate_dihydrate", millilitres: null });
    // (3 − 0.5) mg/L × 1.2 m³ / 0.554 = 5.4 g
    expect(s.grams).toBeCloseTo(5.4, 1);
    expect(s.sideEffects[0]!.parameter).toBe("cyanuric_acid");
  });

  it("acid for high pH lowers TA and says so; soft water gets the back-and-forth note", () => {
    const p = planTreatment({ ...inRange, readings: { ...inRange.readings, ph: 8.2, total_alkalinity: 95 } });
    const s = p.steps[0]!;
    expect(s).toMatchObject({ parameter: "ph", direction: "lower", chemical: "sodium_bisulfate" });
    expect(s.sideEffects[0]!.change).toBeLessThan(0);
    expect(s.sideEffects[0]!.to).toBeLessThan(95);
  });

  it("high TA and high pH: acid in rounds with aeration between", () => {
    const p = planTreatment({ ...inRange, readings: { ...inRange.readings, ph: 8.0, total_alkalinity: 200 } });
    const s = p.steps[0]!;
    expect(s).toMatchObject({ parameter: "total_alkalinity", direction: "lower" });
    expect(s.sideEffects[0]!.to).toBeGreaterThanOrEqual(6.99);
    expect(p.notes.join(" ")).toMatch(/aeration|cover off/);
    expect(p.notes.join(" ")).toMatch(/rounds/);
  });

  it("low pH with high TA: aerate, not soda ash", () => {
    const p = planTreatment({ ...inRange, readings: { ...inRange.readings, ph: 6.9, total_alkalinity: 160 } });
    expect(p.steps[0]!.kind).toBe("aerate");
    expect(p.steps.some((s) => s.chemical === "sodium_carbonate")).toBe(false);
  });

  it("bromine tub uses BCDMH (0.755 g per 1000 L per mg/L at 100 %)", () => {
    const p = planTreatment({ volumeLitres: 1000, temperatureC: 38, sanitiser: "bromine", readings: { bromine: 2, ph: 7.5, total_alkalinity: 100, calcium_hardness: 200 } });
    const s = p.steps[0]!;
    expect(s.chemical).toBe("bromochlorodimethylhydantoin");
    expect(s.grams).toBeCloseTo((3 * 0.7555) / 0.96, 1);
  });

  it("high cyanuric acid → replace water first, nothing dosed on top", () => {
    const p = planTreatment({ ...inRange, readings: { ...inRange.readings, free_chlorine: 0.5, cyanuric_acid: 100 } });
    expect(p.steps).toHaveLength(1);
    expect(p.steps[0]!.kind).toBe("replace_water");
    expect(p.steps[0]!.litres).toBeGreaterThan(0);
  });

  it("recent product in the treatment log → first and only item is a wait with retestAt", () => {
    const now = new Date("2025-06-01T18:00:00Z");
    const p = planTreatment(
      { ...inRange, readings: { ...inRange.readings, free_chlorine: 0.5 } },
      // 30 g of dichlor in 1500 L is +11 mg/L: a shock, so 12 h (products.ts WAIT_HOURS, common practice)
      { now, treatmentLog: [{ productId: "dichlor-granules", chemical: "sodium_dichloroisocyanurate_dihydrate", amount: 30, unit: "g", addedAt: "2025-06-01T16:00:00Z" }] },
    );
    expect(p.steps).toHaveLength(1);
    const w = p.steps[0]!;
    expect(w.kind).toBe("wait");
    expect(w.shock).toBe(true);
    expect(w.retestAt).toBe("2025-06-02T04:00:00.000Z");
    expect(w.retestAfterHours).toBe(10);
    expect(w.words).toMatch(/^Wait — retest after 04:00/);
    expect(w.grams).toBeNull();
  });

  it("an old log entry does not block the plan", () => {
    const p = planTreatment(
      { ...inRange, readings: { ...inRange.readings, ph: 8.0 } },
      { now: new Date("2025-06-01T18:00:00Z"), treatmentLog: [{ productId: "ph-down", amount: 10, unit: "g", addedAt: "2025-06-01T15:00:00Z" }] },
    );
    expect(p.steps[0]!.kind).toBe("dose");
  });

  it("uses owner-edited products and per-tub targets", () => {
    const products = DEFAULT_PRODUCTS.map((p) => (p.id === "ph-down" ? { ...p, strength: 0.5 } : p));
    const a = planTreatment({ ...inRange, readings: { ...inRange.readings, ph: 8.0 } });
    const b = planTreatment({ ...inRange, readings: { ...inRange.readings, ph: 8.0 } }, { products });
    expect(b.steps[0]!.grams!).toBeGreaterThan(a.steps[0]!.grams!);
    const c = planTreatment(inRange, { targets: { free_chlorine: { min: 4, max: 6, aim: 5 } } });
    expect(c.steps[0]!.to).toBe(5);
  });
});

describe("properties (fast-check)", () => {
  const maybe = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: null });
  const validInput = fc.record({
    volumeLitres: fc.double({ min: 100, max: 50000, noNaN: true }),
    temperatureC: fc.double({ min: 0, max: 45, noNaN: true }),
    sanitiser: fc.constantFrom("chlorine", "bromine"),
    tds: fc.option(fc.double({ min: 0, max: 20000, noNaN: true }), { nil: undefined }),
    bathersPerDay: fc.option(fc.double({ min: 0, max: 1000, noNaN: true }), { nil: undefined }),
    readings: fc.record({
      free_chlorine: maybe(fc.double({ min: 0, max: 50, noNaN: true })),
      bromine: maybe(fc.double({ min: 0, max: 60, noNaN: true })),
      ph: maybe(fc.double({ min: 0, max: 14, noNaN: true })),
      total_alkalinity: maybe(fc.oneof(fc.constant(0), fc.double({ min: 10, max: 1000, noNaN: true }))),
      total_hardness: maybe(fc.oneof(fc.constant(0), fc.double({ min: 5, max: 2000, noNaN: true }))),
      cyanuric_acid: maybe(fc.double({ min: 0, max: 500, noNaN: true })),
    }),
  });

  it("never produces NaN or Infinity for any valid input", () => {
    fc.assert(
      fc.property(validInput, (raw) => {
        const plan = planTreatment(validateWaterInput(raw));
        if (hasNonFinite(plan)) throw new Error(`non-finite value in ${JSON.stringify(plan)}`);
        for (const s of plan.steps) expect(s.cautions.length).toBeGreaterThan(0);
      }),
      { numRuns: 300 },
    );
  });

  it("the chlorine dose grows with volume and with the gap", () => {
    fc.assert(
      fc.property(fc.double({ min: 100, max: 20000, noNaN: true }), fc.double({ min: 1.01, max: 2.5, noNaN: true }), fc.double({ min: 0, max: 1.9, noNaN: true }), (v, k, fcLow) => {
        const mk = (vol: number, fcr: number) => planTreatment({ ...inRange, volumeLitres: vol, readings: { ...inRange.readings, free_chlorine: fcr } });
        expect(amount(firstDose(mk(v * k, fcLow)))).toBeGreaterThanOrEqual(amount(firstDose(mk(v, fcLow))));
        expect(amount(firstDose(mk(v, fcLow / 2)))).toBeGreaterThanOrEqual(amount(firstDose(mk(v, fcLow))));
      }),
    );
  });

  it("the acid dose for pH grows with volume and with the gap", () => {
    fc.assert(
      fc.property(fc.double({ min: 300, max: 20000, noNaN: true }), fc.double({ min: 7.85, max: 8.4, noNaN: true }), (v, ph) => {
        const mk = (vol: number, p: number) => planTreatment({ ...inRange, volumeLitres: vol, readings: { ...inRange.readings, ph: p } });
        expect(amount(firstDose(mk(v * 2, ph)))).toBeGreaterThanOrEqual(amount(firstDose(mk(v, ph))));
        expect(amount(firstDose(mk(v, ph + 0.2)))).toBeGreaterThanOrEqual(amount(firstDose(mk(v, ph))));
      }),
    );
  });

  it("no step when every reading lies inside its range", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 2, max: 4, noNaN: true }),
        fc.double({ min: 7.2, max: 7.8, noNaN: true }),
        fc.double({ min: 80, max: 120, noNaN: true }),
        fc.double({ min: 150, max: 250, noNaN: true }),
        fc.double({ min: 0, max: 50, noNaN: true }),
        (f, ph, ta0, ch, cya) => {
          // the range check uses carbonate alkalinity: TA minus at most 0.37 × CYA (chemistry.md §3.3)
          const ta = Math.min(120, ta0 + 0.37 * cya);
          const p = planTreatment({ ...inRange, readings: { free_chlorine: f, ph, total_alkalinity: ta, calcium_hardness: ch, cyanuric_acid: cya } });
          expect(p.steps).toEqual([]);
        },
      ),
    );
  });
});

describe("routines", () => {
  it("first fill: sanitiser, alkalinity, pH with ≥ 2 h timers, ready when in range", () => {
    const r = firstFillRoutine({ volumeLitres: 1500, sanitiser: "chlorine", fillReadings: { ph: 7.0, total_alkalinity: 40, calcium_hardness: 200 } });
    expect(r[1]!.chemical).toBe("sodium_dichloroisocyanurate_dihydrate");
    expect(r[1]!.shock).toBe(true);
    expect(r.filter((s) => s.timerMinutes !== null && s.timerMinutes >= 120).length).toBeGreaterThanOrEqual(2);
    expect(r.some((s) => s.chemical === "sodium_bicarbonate")).toBe(true);
    expect(r[r.length - 1]!.words).toMatch(/ready/);
    for (const s of r) if (s.grams !== null || s.millilitres !== null) expect(s.cautions.length).toBeGreaterThan(0);
  });
  it("top-up and foam routines give doses with cautions", () => {
    const t = routineTopUp({ volumeLitres: 1500, sanitiser: "chlorine", bathersPerDay: 2 });
    expect(t.some((s) => s.grams !== null)).toBe(true);
    const f = foamTreatment({ volumeLitres: 1500, sanitiser: "bromine" });
    const anti = f.find((s) => s.chemical === "silicone_antifoam")!;
    expect(anti.millilitres).toBe(12); // 8 mL per 1000 L label-style rate (common practice)
    expect(anti.cautions.length).toBeGreaterThan(0);
  });
});
