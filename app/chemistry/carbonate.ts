// Carbonate equilibrium of spa water (closed system), chemistry.md §3.
//
// Temperature-dependent constants: Plummer & Busenberg (1982), Geochim. Cosmochim. Acta
// 46:1011–1040, as coded in the USGS PHREEQC / WATEQ4F databases; Kw from the PHREEQC database
// (Nordstrom et al. 1990); borate from WATEQ4F (log K −9.24, ΔH 3.224 kcal/mol, van 't Hoff);
// cyanuric acid first pKa = 1743/T + 1.12 (Wahman 2018, Environ. Sci.: Water Res. Technol.
// 4:1522, fitted 5–35 °C, used here up to spa temperatures). Activities by the Davies equation
// with I ≈ 2.5e-5 × TDS (Tchobanoglous et al. 2003).

import { EQUIVALENT_WEIGHT, MOLAR_MASS, ATOMIC_WEIGHT } from "./constants";

const LN10 = Math.LN10;

export interface CarbonateConstants {
  /** log10 of the thermodynamic constants (I = 0). */
  logK1: number;
  logK2: number;
  logKw: number;
  logKspCalcite: number;
  logKH: number;
  logKBorate: number;
  logKCyanuric: number;
}

export function carbonateConstants(temperatureC: number): CarbonateConstants {
  const T = temperatureC + 273.15;
  const lg = Math.log10(T);
  return {
    logK1: -356.3094 - 0.06091964 * T + 21834.37 / T + 126.8339 * lg - 1684915 / (T * T),
    logK2: -107.8871 - 0.03252849 * T + 5151.79 / T + 38.92561 * lg - 563713.9 / (T * T),
    logKw: -283.971 - 0.05069842 * T + 13323.0 / T + 102.24447 * lg - 1119669 / (T * T),
    logKspCalcite: -171.9065 - 0.077993 * T + 2839.319 / T + 71.595 * lg,
    logKH: 108.3865 + 0.01985076 * T - 6919.53 / T - 40.45154 * lg + 669365 / (T * T),
    // van 't Hoff from 25 °C: log K(T) = log K25 − ΔH/(R ln10) (1/T − 1/298.15)
    logKBorate: -9.24 - (3.224 / (1.98720425864083e-3 * LN10)) * (1 / T - 1 / 298.15),
    logKCyanuric: -(1743 / T + 1.12),
  };
}

/** Davies activity coefficient for charge z. A(t) ≈ 0.4883 + 8.074e-4 t (°C), a common fit for 0–60 °C. */
export function daviesGamma(z: number, ionicStrength: number, temperatureC: number): number {
  const A = 0.4883 + 8.074e-4 * temperatureC;
  const s = Math.sqrt(Math.max(0, ionicStrength));
  const logG = -A * z * z * (s / (1 + s) - 0.3 * ionicStrength);
  return 10 ** logG;
}

/** Ionic strength from TDS (mg/L), I ≈ 2.5e-5 × TDS (Tchobanoglous et al. 2003). */
export function ionicStrengthFromTds(tds: number): number {
  return 2.5e-5 * Math.max(0, tds);
}

export interface WaterState {
  temperatureC: number;
  /** mg/L; default 500 when unknown (typical spa water, I = 0.0125). */
  tds: number;
  /** mg/L cyanuric acid. */
  cyanuricAcid: number;
  /** mg/L boron (as B). */
  boron: number;
}

interface Conditional {
  K1: number;
  K2: number;
  Kw: number;
  Kcy: number;
  Kb: number;
  g1: number;
  g2: number;
  Ksp: number;
}

/** Mixed (conditional) constants: H+ as activity (what a pH reading gives), others as concentrations. */
function conditional(w: WaterState): Conditional {
  const k = carbonateConstants(w.temperatureC);
  const I = ionicStrengthFromTds(w.tds);
  const g1 = daviesGamma(1, I, w.temperatureC);
  const g2 = daviesGamma(2, I, w.temperatureC);
  return {
    K1: 10 ** k.logK1 / g1,
    K2: (10 ** k.logK2 * g1) / g2,
    Kw: 10 ** k.logKw / g1,
    Kcy: 10 ** k.logKCyanuric / g1,
    Kb: 10 ** k.logKBorate / g1,
    g1,
    g2,
    Ksp: 10 ** k.logKspCalcite,
  };
}

/** mg/L as CaCO3 → eq/L. */
export const eqPerLFromMgCaCO3 = (mg: number) => mg / (EQUIVALENT_WEIGHT.CaCO3 * 1000);
/** eq/L → mg/L as CaCO3. */
export const mgCaCO3FromEqPerL = (eq: number) => eq * EQUIVALENT_WEIGHT.CaCO3 * 1000;

function carbonateFractions(pH: number, c: Conditional) {
  const h = 10 ** -pH;
  const d = h * h + c.K1 * h + c.K1 * c.K2;
  return { a1: (c.K1 * h) / d, a2: (c.K1 * c.K2) / d, h };
}

/** Non-carbonate alkalinity (eq/L): cyanurate + borate + OH- − H+. */
function otherAlkalinity(pH: number, w: WaterState, c: Conditional): number {
  const h = 10 ** -pH;
  const cyT = w.cyanuricAcid / (MOLAR_MASS.cyanuricAcid * 1000);
  const bT = w.boron / (ATOMIC_WEIGHT.B * 1000);
  const cy = (cyT * c.Kcy) / (h + c.Kcy);
  const b = (bT * c.Kb) / (h + c.Kb);
  return cy + b + c.Kw / h - h / c.g1;
}

/** Cyanurate alkalinity (mg/L as CaCO3) — the §3.3 correction factor times CYA. */
export function cyanurateAlkalinity(pH: number, w: WaterState): number {
  const c = conditional(w);
  const h = 10 ** -pH;
  const cyT = w.cyanuricAcid / (MOLAR_MASS.cyanuricAcid * 1000);
  return mgCaCO3FromEqPerL((cyT * c.Kcy) / (h + c.Kcy));
}

/** Borate alkalinity (mg/L as CaCO3). */
export function borateAlkalinity(pH: number, w: WaterState): number {
  const c = conditional(w);
  const h = 10 ** -pH;
  const bT = w.boron / (ATOMIC_WEIGHT.B * 1000);
  return mgCaCO3FromEqPerL((bT * c.Kb) / (h + c.Kb));
}

/** Carbonate alkalinity (mg/L as CaCO3) = TA − cyanurate − borate − OH + H, never below 0. */
export function carbonateAlkalinity(pH: number, totalAlkalinity: number, w: WaterState): number {
  const c = conditional(w);
  return Math.max(0, mgCaCO3FromEqPerL(eqPerLFromMgCaCO3(totalAlkalinity) - otherAlkalinity(pH, w, c)));
}

/** A closed-system water: total carbonate C_T (mol/L) and total alkalinity (eq/L). */
export interface ClosedWater {
  ct: number;
  alk: number;
}

/** From a pH and TA reading, compute C_T and the alkalinity (closed system). */
export function closedWaterFromReading(pH: number, totalAlkalinity: number, w: WaterState): ClosedWater {
  const c = conditional(w);
  const { a1, a2 } = carbonateFractions(pH, c);
  const alk = eqPerLFromMgCaCO3(totalAlkalinity);
  const carb = Math.max(1e-7, alk - otherAlkalinity(pH, w, c));
  return { ct: carb / (a1 + 2 * a2), alk };
}

/** Alkalinity (eq/L) of a closed water with C_T at a given pH. */
function alkalinityAt(pH: number, ct: number, w: WaterState, c: Conditional): number {
  const { a1, a2 } = carbonateFractions(pH, c);
  return ct * (a1 + 2 * a2) + otherAlkalinity(pH, w, c);
}

/** pH of a closed water (C_T, Alk) by bisection on pH in [2, 12]; alkalinity rises monotonically with pH. */
export function pHOf(water: ClosedWater, w: WaterState): number {
  const c = conditional(w);
  let lo = 2;
  let hi = 12;
  for (let i = 0; i < 80; i++) {
    const mid = (lo + hi) / 2;
    if (alkalinityAt(mid, water.ct, w, c) > water.alk) hi = mid;
    else lo = mid;
  }
  return (lo + hi) / 2;
}

/** How one mole of a product changes the water: alkalinity (eq) and total carbonate (mol). */
export interface AcidBaseEffect {
  alkEqPerMol: number;
  ctMolPerMol: number;
}

export const ACID_BASE_EFFECT = {
  sodium_bicarbonate: { alkEqPerMol: 1, ctMolPerMol: 1 },
  sodium_carbonate: { alkEqPerMol: 2, ctMolPerMol: 1 },
  sodium_bisulfate: { alkEqPerMol: -1, ctMolPerMol: 0 },
  hydrochloric_acid: { alkEqPerMol: -1, ctMolPerMol: 0 },
} as const satisfies Record<string, AcidBaseEffect>;

export function afterDose(water: ClosedWater, effect: AcidBaseEffect, molPerL: number): ClosedWater {
  return { ct: water.ct + effect.ctMolPerMol * molPerL, alk: water.alk + effect.alkEqPerMol * molPerL };
}

/**
 * Dose (mol/L of product) that brings a closed water to the target pH, by bisection on the dose.
 * Returns null when the product moves pH the wrong way or cannot reach the target.
 */
export function doseForPh(
  water: ClosedWater,
  effect: AcidBaseEffect,
  targetPh: number,
  w: WaterState,
): number | null {
  const pH0 = pHOf(water, w);
  const raising = effect.alkEqPerMol > 0;
  if (raising ? targetPh <= pH0 : targetPh >= pH0) return 0;
  // Upper bound: for an acid, never more than the whole alkalinity (which would take pH to ~4.5);
  // for a base, grow the bracket until the pH passes the target.
  let lo = 0;
  let hi: number;
  if (!raising) {
    hi = water.alk / -effect.alkEqPerMol;
    if (pHOf(afterDose(water, effect, hi), w) > targetPh) return null;
  } else {
    hi = 1e-4;
    let n = 0;
    while (pHOf(afterDose(water, effect, hi), w) < targetPh) {
      hi *= 2;
      if (++n > 40) return null;
    }
  }
  for (let i = 0; i < 80; i++) {
    const mid = (lo + hi) / 2;
    const p = pHOf(afterDose(water, effect, mid), w);
    if (raising ? p < targetPh : p > targetPh) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** pH a closed water reaches when aerated at constant alkalinity to the given C_T (CO2 loss). */
export function equilibriumPhWithAir(alkEqPerL: number, w: WaterState, pCO2Atm = 4.2e-4): number {
  // Open system: [H2CO3*] = KH pCO2; solve alk(pH) = alkalinity by bisection.
  const c = conditional(w);
  const k = carbonateConstants(w.temperatureC);
  const h2co3 = 10 ** k.logKH * pCO2Atm;
  let lo = 2;
  let hi = 12;
  for (let i = 0; i < 80; i++) {
    const mid = (lo + hi) / 2;
    const h = 10 ** -mid;
    const hco3 = (c.K1 * h2co3) / h;
    const co3 = (c.K2 * hco3) / h;
    const alk = hco3 + 2 * co3 + otherAlkalinity(mid, w, c);
    if (alk > alkEqPerL) hi = mid;
    else lo = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Thermodynamic calcite saturation index SI = log10({Ca2+}{CO3 2-}/Ksp) (chemistry.md §4.1, [D]),
 * calcium hardness in mg/L as CaCO3.
 */
export function calciteSaturationIndex(
  pH: number,
  totalAlkalinity: number,
  calciumHardness: number,
  w: WaterState,
): number {
  const c = conditional(w);
  const water = closedWaterFromReading(pH, totalAlkalinity, w);
  const { a2 } = carbonateFractions(pH, c);
  const ca = Math.max(1e-9, calciumHardness / (MOLAR_MASS.CaCO3 * 1000));
  const co3 = Math.max(1e-15, water.ct * a2);
  return Math.log10((c.g2 * ca * c.g2 * co3) / c.Ksp);
}
