import { describe, expect, it } from "vitest";
import { alkalinityFactor, calciumFactor, langelier, tdsConstant, temperatureFactor } from "./lsi";

describe("Langelier index, factor method", () => {
  // Published worked example, New York 10 NYCRR §6-1.30 (Westlaw / casetext copy): 68 °F, total
  // hardness 200 mg/L (calcium hardness 0.70 × 200 = 140), total alkalinity 20 mg/L, pH 7.8:
  // SI = 7.8 + 0.52 + 1.76 + 1.22 − 12.1 = −0.8, "therefore the water is corrosive".
  it("reproduces the New York §6-1.30 worked example", () => {
    expect(temperatureFactor(68)).toBeCloseTo(0.52, 2);
    expect(calciumFactor(140)).toBeCloseTo(1.76, 2);
    expect(alkalinityFactor(20)).toBeCloseTo(1.22, 1);
    const r = langelier({ ph: 7.8, temperatureC: 20, calciumHardness: 0.7 * 200, totalAlkalinity: 20, tds: 500 });
    expect(r.lsi).toBeCloseTo(-0.8, 1);
    expect(r.verdict).toBe("corrosive");
  });
  // Factor table rows, identical in 10 NYCRR §6-1.30 and Montana ARM 37.115 Table 7 (CF 2.6 at 1000 ppm).
  it("hits the regulation table rows exactly", () => {
    expect(temperatureFactor(84)).toBe(0.7);
    expect(temperatureFactor(105)).toBe(0.9);
    expect(calciumFactor(1000)).toBe(2.6);
    expect(alkalinityFactor(1000)).toBe(3.0);
    expect(calciumFactor(200)).toBe(1.9);
  });
  it("Montana Table 7: C = 12.1 below 1000 mg/L TDS, 12.2 above", () => {
    expect(tdsConstant(800)).toBe(12.1);
    expect(tdsConstant(1500)).toBe(12.2);
    expect(tdsConstant(undefined)).toBe(12.1);
  });
  it("uses carbonate alkalinity: CYA lowers the index (chemistry.md §4.1 [S])", () => {
    const base = { ph: 7.5, temperatureC: 38, calciumHardness: 200, totalAlkalinity: 100, tds: 500 };
    expect(langelier({ ...base, cyanuricAcid: 50 }).lsi).toBeLessThan(langelier(base).lsi);
  });
  it("gives words and advice", () => {
    const c = langelier({ ph: 7.2, temperatureC: 38, calciumHardness: 50, totalAlkalinity: 50 });
    expect(c.verdict).toBe("corrosive");
    expect(c.advice.length).toBeGreaterThan(0);
    const s = langelier({ ph: 7.8, temperatureC: 38, calciumHardness: 600, totalAlkalinity: 180 });
    expect(s.verdict).toBe("scaling");
    expect(langelier({ ph: 7.5, temperatureC: 38, calciumHardness: 200, totalAlkalinity: 100 }).verdict).toBe("balanced");
  });
  // Cross-check with the thermodynamic calcite saturation index (Plummer & Busenberg constants,
  // Davies activities): chemistry.md §4.5 says within about ±0.1 for spa waters; we allow ±0.2.
  it.each([
    [7.2, 80, 150, 38, 30], [7.5, 100, 200, 38, 0], [7.8, 120, 250, 38, 0], [7.4, 60, 100, 30, 0],
    [7.6, 100, 300, 40, 20], [7.0, 40, 50, 38, 0], [7.5, 150, 400, 36, 40],
  ])("thermodynamic SI agrees within ±0.2 (pH %f, TA %f, CH %f, %f °C, CYA %f)", (ph, ta, ch, t, cya) => {
    const r = langelier({ ph, totalAlkalinity: ta, calciumHardness: ch, temperatureC: t, cyanuricAcid: cya, tds: 500 });
    expect(Math.abs(r.lsi - r.calciteSaturationIndex)).toBeLessThan(0.2);
  });
});
