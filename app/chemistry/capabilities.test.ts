// What an expert expects of the engine: units, first fill, predicted water, temperature, slow trends,
// alkalinity corrected for cyanuric acid, selectable guidance. Sources beside each check.
import { describe, expect, it } from "vitest";
import { planTreatment } from "./plan";
import { DEFAULT_PRODUCTS } from "./products";
import { firstFillRoutine } from "./routines";
import { GUIDANCE } from "./targets";
import { celsiusFromFahrenheit, displayAmount, kitchenMeasure, litresFromImperialGallons } from "./units";
import { langelier } from "./lsi";
import { base, doses } from "./test-water";


describe("units people use", () => {
  it("exact conversions (NIST Handbook 44 App. C; UK Weights and Measures Act 1985)", () => {
    expect(litresFromImperialGallons(100)).toBeCloseTo(454.609, 3);
    expect(celsiusFromFahrenheit(104)).toBeCloseTo(40, 6);
    // 1 US tbsp = ½ US fl oz = 14.787 mL; 3 tsp = 1 tbsp
    expect(kitchenMeasure(14.7868, "us")).toBe("about 1 tbsp");
    expect(kitchenMeasure(14.7, "us")).toBe("about 3 tsp");
    expect(kitchenMeasure(29.57, "us")).toBe("about 2 tbsp");
    expect(kitchenMeasure(236.6, "us")).toBe("about 1 cup");
    expect(kitchenMeasure(5, "metric")).toBe("about 1 tsp");
  });
  it("US units: ounces beside grams, fluid ounces beside mL, a kitchen measure by bulk density (baking soda ≈ 4.6 g per US tsp, USDA food table, from memory)", () => {
    const bicarb = DEFAULT_PRODUCTS.find((p) => p.chemical === "sodium_bicarbonate")!;
    const a = displayAmount(bicarb, { grams: 28.35, millilitres: null }, "us");
    expect(a.ounces).toBe(1);
    expect(a.text).toMatch(/^1 oz \(28 g, about 2 tbsp\)$/);
    const acid = DEFAULT_PRODUCTS.find((p) => p.chemical === "hydrochloric_acid")!;
    expect(displayAmount(acid, { grams: null, millilitres: 59.1 }, "us").fluidOunces).toBe(2);
    const p = planTreatment({ ...base, units: "us", readings: { ...base.readings, free_chlorine: 0.5 } });
    expect(doses(p)[0]!.ounces).toBeGreaterThan(0);
    expect(doses(p)[0]!.words).toMatch(/oz/);
  });
});

describe("first fill", () => {
  it("chlorine: a start-up shock to 10 mg/L (New York §6-1.25), then alkalinity, then hardness for soft water, with waits", () => {
    const p = planTreatment({ ...base, mode: "first_fill", readings: { ph: 7.6, total_alkalinity: 40, calcium_hardness: 50 } });
    const d = doses(p);
    expect(d[0]).toMatchObject({ chemical: "sodium_dichloroisocyanurate_dihydrate", to: 10, shock: true, retestAfterHours: 12 });
    // 10 mg/L × 1.5 m³ / 0.554 = 27.1 g (chemistry.md §2.2)
    expect(d[0]!.grams).toBeCloseTo(27.1, 0);
    expect(d.map((s) => s.chemical)).toEqual(["sodium_dichloroisocyanurate_dihydrate", "sodium_bicarbonate", "calcium_chloride"]);
    // 60 mg/L TA × 1.5 m³ × 84.01/50.04 = 151 g bicarbonate (chemistry.md §2.5: 16.8 g per 1000 L per 10 mg/L)
    expect(d[1]!.grams).toBeCloseTo(151, 0);
    // 150 mg/L CH × 1.5 m³ × 55.49/50.04 / 0.94 = 265 g calcium chloride (chemistry.md §2.5)
    expect(d[2]!.grams).toBeCloseTo(265, -1);
    expect(p.headline.title).toMatch(/New water/);
  });
  it("bromine: sodium bromide reserve first (M(NaBr)/M(Br) = 1.288), then an unstabilised oxidiser activates it", () => {
    const p = planTreatment({ ...base, sanitiser: "bromine", mode: "first_fill", readings: {} });
    const d = doses(p);
    expect(d[0]!.chemical).toBe("sodium_bromide");
    // 30 mg/L bromide × 1.5 m³ × 102.89/79.904 / 0.99 = 58.5 g
    expect(Math.abs(d[0]!.grams! - 58.5)).toBeLessThanOrEqual(0.5);
    expect(d[1]!.chemical).toBe("sodium_hypochlorite");
    expect(d[1]!.shock).toBe(true);
    // 10 mg/L as Br2 = 10 × 70.90/159.81 = 4.44 mg/L as Cl2 → 4.44 × 1.5 / 125 g/L = 53 mL of 12.5 trade-% liquid chlorine
    expect(d[1]!.millilitres).toBeCloseTo(53, 0);
    expect(p.notes.join(" ")).toMatch(/pH and total alkalinity/);
  });
  it("the first-fill routine follows the plan, in the owner's units", () => {
    const r = firstFillRoutine({ volumeLitres: 1514, sanitiser: "bromine", units: "us" });
    expect(r.find((s) => s.chemical === "sodium_bromide")!.amountText).toMatch(/oz \(\d+ g, about .* tbsp\)/);
    expect(r.some((s) => s.shock)).toBe(true);
  });
});

describe("the water after the plan", () => {
  it("predicted: every parameter and the index after all steps, and when the tub can be used", () => {
    const now = new Date("2026-03-01T10:00:00Z");
    const p = planTreatment({ ...base, readings: { ...base.readings, free_chlorine: 1, ph: 7.5, total_alkalinity: 60 } }, { now });
    expect(p.predicted.free_chlorine).toBe(3);
    expect(p.predicted.total_alkalinity).toBe(100);
    expect(p.predicted.lsi).not.toBeNull();
    // 1 h after the top-up + 2 h after the bicarbonate (products.ts WAIT_HOURS)
    expect(p.predicted.usableAfter).toBe("2026-03-01T13:00:00.000Z");
  });
  it("in range: usable now and a calm headline; free chlorine above range: never 'nothing to add'", () => {
    expect(planTreatment(base).headline).toMatchObject({ tone: "ok", usableNow: true });
    const high = planTreatment({ ...base, readings: { ...base.readings, free_chlorine: 5.4 } });
    expect(high.headline.tone).toBe("alert");
    expect(high.headline.title).toMatch(/too high.*keep everyone out/);
    expect(high.predicted.usableAfter).toBeNull();
  });
});

describe("temperature", () => {
  it("the index at the measured and at the set temperature: a cold fill reads lower than once heated (TF 0.4 at 60 °F vs 0.9 at 105 °F, 10 NYCRR §6-1.30)", () => {
    const p = planTreatment({ ...base, temperatureC: 15, setTemperatureC: 38 });
    expect(p.waterBalance.lsiAtSetTemperature! - p.waterBalance.lsi!).toBeGreaterThan(0.3);
    const direct = langelier({ ph: 7.5, totalAlkalinity: 100, calciumHardness: 200, temperatureC: 38 });
    expect(p.waterBalance.lsiAtSetTemperature).toBeCloseTo(direct.lsi, 2);
  });
});

describe("slow trends", () => {
  it("stabiliser build-up from dichlor (0.91 mg/L CYA per mg/L chlorine, chemistry.md §2.3) and the days until its limit", () => {
    const p = planTreatment({ ...base, bathersPerDay: 2, readings: { ...base.readings, cyanuric_acid: 30 } });
    // 2 mg/L chlorine a day (estimate) × 0.91 = 1.82 mg/L a day; (50 − 30) / 1.82 = 10 days
    expect(p.trends.cyanuricAcidPerDay).toBeCloseTo(1.82, 2);
    expect(p.trends.daysUntilCyanuricAcidLimit).toBe(10);
    expect(p.trends.drains.find((d) => d.parameter === "cyanuric_acid")!.percent).toBe(40);
  });
  it("calcium and dissolved-solids drains (Maine 10-144 CMR ch. 202 App. B: drain when TDS is 1500 mg/L above the fill water)", () => {
    const p = planTreatment({ ...base, tds: 2500, fillTds: 800, readings: { ...base.readings, calcium_hardness: 500 } });
    expect(p.trends.drains.find((d) => d.parameter === "tds")!.percent).toBe(100);
    // 500 → 200 with soft fill water: replace 60 %
    expect(p.trends.drains.find((d) => d.parameter === "calcium_hardness")!.percent).toBe(60);
  });
});

describe("old water is replaced before anything is dosed into it", () => {
  it("TDS 2600 against fill water 400 (Δ 2200 > 1500, Maine App. B): a full drain, nothing dosed, every reading to be taken again", () => {
    const p = planTreatment({ ...base, tds: 2600, fillTds: 400, readings: { ...base.readings, free_chlorine: 0.5, total_chlorine: 1.5 } });
    expect(p.steps).toHaveLength(1);
    expect(p.steps[0]).toMatchObject({ kind: "replace_water", litres: 1500 });
    expect(p.predicted.free_chlorine).toBeNull();
    expect(p.predicted.usableAfter).toBeNull();
    expect(p.headline.title).toMatch(/Replace water/);
  });
  it("stabiliser 100 in a chlorine tub: replace 70 % (to 30 mg/L); the diluted water is not predicted usable", () => {
    const p = planTreatment({ ...base, readings: { ...base.readings, cyanuric_acid: 100 } });
    expect(p.steps[0]!.litres).toBe(1050);
    expect(p.predicted.cyanuric_acid).toBe(30);
    expect(p.predicted.usableAfter).toBeNull();
  });
});

describe("total alkalinity corrected for cyanuric acid", () => {
  it("TA 90 with CYA 50 at pH 7.5 is carbonate alkalinity ≈ 74 (factor ≈ 0.33 at 38 °C, chemistry.md §3.3): low, and dosed from the corrected value", () => {
    const p = planTreatment({ ...base, readings: { ...base.readings, total_alkalinity: 90, cyanuric_acid: 50 } });
    const ta = p.judgements.find((j) => j.parameter === "total_alkalinity")!;
    expect(ta.judgedValue!).toBeGreaterThan(70);
    expect(ta.judgedValue!).toBeLessThan(77);
    expect(ta.status).toBe("low");
    expect(doses(p)[0]!.chemical).toBe("sodium_bicarbonate");
  });
});

describe("selectable guidance", () => {
  it("UK spa guidance (HSG282: free chlorine 3–5, pH 7.0–7.6) against the US home default (CDC 2–4); the plan names it", () => {
    const r = { ...base.readings, free_chlorine: 2.5 };
    expect(doses(planTreatment({ ...base, readings: r }))).toHaveLength(0);
    const uk = planTreatment({ ...base, readings: r, guidance: "uk" });
    expect(doses(uk)[0]!.to).toBe(4);
    expect(uk.guidance.name).toMatch(/HSG282/);
    expect(uk.notes.join(" ")).toMatch(/HSG282/);
    expect(GUIDANCE.us_public.ranges.chlorine!.free_chlorine!.min).toBe(3);
  });
});
