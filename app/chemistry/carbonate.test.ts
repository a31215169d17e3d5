import { describe, expect, it } from "vitest";
import {
  ACID_BASE_EFFECT,
  afterDose,
  carbonateConstants,
  closedWaterFromReading,
  cyanurateAlkalinity,
  borateAlkalinity,
  doseForPh,
  eqPerLFromMgCaCO3,
  mgCaCO3FromEqPerL,
  pHOf,
  type WaterState,
} from "./carbonate";

describe("carbonate constants (Plummer & Busenberg 1982; PHREEQC / WATEQ4F databases)", () => {
  // PHREEQC database log_k at 25 °C: HCO3- 10.329, CO2 16.681 → pK1 6.352, calcite −8.48,
  // CO2(g) −1.468; water 14.000.
  it("25 °C: pK1 6.352, pK2 10.329, pKw 14.000, pKsp calcite 8.48, log KH −1.468", () => {
    const k = carbonateConstants(25);
    expect(-k.logK1).toBeCloseTo(6.352, 3);
    expect(-k.logK2).toBeCloseTo(10.329, 3);
    expect(-k.logKw).toBeCloseTo(14.0, 2);
    expect(-k.logKspCalcite).toBeCloseTo(8.48, 2);
    expect(k.logKH).toBeCloseTo(-1.468, 3);
    expect(-k.logKBorate).toBeCloseTo(9.24, 3); // WATEQ4F
    expect(-k.logKCyanuric).toBeCloseTo(6.966, 3); // Wahman 2018: 1743/T + 1.12
  });
  it("38 °C row of chemistry.md §3.2 [D]: 6.302, 10.233, 13.600, 8.565, borate 9.141, CYA 6.722", () => {
    const k = carbonateConstants(38);
    expect(-k.logK1).toBeCloseTo(6.302, 2);
    expect(-k.logK2).toBeCloseTo(10.233, 2);
    expect(-k.logKw).toBeCloseTo(13.6, 2);
    expect(-k.logKspCalcite).toBeCloseTo(8.565, 2);
    expect(-k.logKBorate).toBeCloseTo(9.141, 2);
    expect(-k.logKCyanuric).toBeCloseTo(6.722, 2);
  });
});

describe("cyanurate and borate alkalinity (chemistry.md §3.3, I = 0.0125 i.e. TDS 500)", () => {
  const w = (t: number): WaterState => ({ temperatureC: t, tds: 500, cyanuricAcid: 100, boron: 100 });
  // Derived table [D]; published CYA factors 0.23–0.36 over pH 7.0–8.0 and the "⅓ rule" [S].
  it.each([
    [7.0, 25, 0.212], [7.5, 25, 0.307], [8.0, 25, 0.358], [7.2, 38, 0.299], [7.6, 38, 0.347],
  ])("CYA factor at pH %f, %f °C ≈ %f", (ph, t, f) => {
    expect(cyanurateAlkalinity(ph, w(t)) / 100).toBeCloseTo(f, 2);
  });
  it.each([
    [7.6, 25, 0.116], [7.6, 38, 0.145], [8.0, 25, 0.28],
  ])("borate factor (per mg/L B) at pH %f, %f °C ≈ %f", (ph, t, f) => {
    expect(borateAlkalinity(ph, w(t)) / 100).toBeCloseTo(f, 2);
  });
});

describe("closed-system acid/base doses", () => {
  const w: WaterState = { temperatureC: 38, tds: 500, cyanuricAcid: 30, boron: 0 };
  it("pHOf reproduces the reading it was built from", () => {
    for (const [ph, ta] of [[7.0, 40], [7.5, 100], [8.2, 180]] as const)
      expect(pHOf(closedWaterFromReading(ph, ta, w), w)).toBeCloseTo(ph, 6);
  });
  it("acid lowers TA 1:1 in equivalents (Wojtowicz, JSPSI, as quoted [S]); C_T unchanged", () => {
    const w0 = closedWaterFromReading(7.9, 120, w);
    const n = doseForPh(w0, ACID_BASE_EFFECT.sodium_bisulfate, 7.5, w)!;
    const w1 = afterDose(w0, ACID_BASE_EFFECT.sodium_bisulfate, n);
    expect(w1.ct).toBe(w0.ct);
    expect(mgCaCO3FromEqPerL(w0.alk - w1.alk)).toBeCloseTo(mgCaCO3FromEqPerL(n), 9);
    expect(pHOf(w1, w)).toBeCloseTo(7.5, 4);
  });
  it("soda ash by bisection matches the closed form n = (C_T f + g − Alk0)/(2 − f) at the target pH", () => {
    const w0 = closedWaterFromReading(7.0, 80, w);
    const n = doseForPh(w0, ACID_BASE_EFFECT.sodium_carbonate, 7.5, w)!;
    // closed form: f = α1 + 2α2 at target; g = other alkalinity at target, found from a zero-C_T water
    const probe = closedWaterFromReading(7.5, 100, w);
    const carbAt = (alkTa: number) => closedWaterFromReading(7.5, alkTa, w);
    // f from two waters at the same pH: Δalk / ΔC_T
    const a = carbAt(100), b = carbAt(150);
    const f = (b.alk - a.alk) / (b.ct - a.ct);
    const g = a.alk - a.ct * f;
    const closed = (w0.ct * f + g - w0.alk) / (2 - f);
    expect(n).toBeCloseTo(closed, 9);
    expect(probe.ct).toBeGreaterThan(0);
  });
  it("bicarbonate barely moves pH (chemistry.md §3.1 point 5): +40 mg/L at pH 7.4 moves it < 0.2", () => {
    const w0 = closedWaterFromReading(7.4, 60, w);
    const w1 = afterDose(w0, ACID_BASE_EFFECT.sodium_bicarbonate, eqPerLFromMgCaCO3(40));
    const d = pHOf(w1, w) - 7.4;
    expect(d).toBeGreaterThan(0);
    expect(d).toBeLessThan(0.2);
  });
});
