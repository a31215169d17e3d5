// Water balance: Langelier Saturation Index.
//
// Primary method: the pool/spa factor form SI = pH + TF + CF + AF − C with the factor table of
// New York 10 NYCRR §6-1.30 and Montana ARM 37.115 Table 7 (identical tables [P]), linear
// interpolation between rows (the §6-1.30 worked example interpolates: 68 °F → TF 0.52,
// CH 140 → CF 1.76, TA 20 → AF 1.22), C = 12.1 when TDS < 1000 mg/L and 12.2 above (Montana
// Table 7 [P]). Why primary: it is the method the regulations define, inspectors and trade
// training use it, and its numbers can be checked against a published worked example.
// Cross-check: the thermodynamic calcite saturation index from the Plummer & Busenberg constants
// (carbonate.ts) agrees within about ±0.2 for spa waters (tested).
//
// AF uses carbonate alkalinity, i.e. TA minus the cyanurate (and borate) share (chemistry.md §3.3, §4.1 [S]).

import { calciteSaturationIndex, carbonateAlkalinity, type WaterState } from "./carbonate";
import type { Verdict } from "./types";

const TF_TABLE: [number, number][] = [
  [32, 0.0], [37, 0.1], [46, 0.2], [53, 0.3], [60, 0.4], [66, 0.5], [76, 0.6], [84, 0.7], [94, 0.8], [105, 0.9], [128, 1.0],
];
const CF_TABLE: [number, number][] = [
  [5, 0.3], [25, 1.0], [50, 1.3], [75, 1.5], [100, 1.6], [150, 1.8], [200, 1.9], [300, 2.1], [400, 2.2], [800, 2.5], [1000, 2.6],
];
const AF_TABLE: [number, number][] = [
  [5, 0.7], [25, 1.4], [50, 1.7], [75, 1.9], [100, 2.0], [150, 2.2], [200, 2.3], [300, 2.5], [400, 2.6], [800, 2.9], [1000, 3.0],
];

/** Linear interpolation in a factor table, clamped to its first and last rows. */
export function interpolateFactor(table: [number, number][], x: number): number {
  if (!(x > table[0]![0])) return table[0]![1];
  const last = table[table.length - 1]!;
  if (x >= last[0]) return last[1];
  for (let i = 1; i < table.length; i++) {
    const [x1, y1] = table[i]!;
    const [x0, y0] = table[i - 1]!;
    if (x <= x1) return y0 + ((y1 - y0) * (x - x0)) / (x1 - x0);
  }
  return last[1];
}

export const temperatureFactor = (tempF: number) => interpolateFactor(TF_TABLE, tempF);
export const calciumFactor = (ch: number) => interpolateFactor(CF_TABLE, ch);
export const alkalinityFactor = (alk: number) => interpolateFactor(AF_TABLE, alk);

/** Montana Table 7: 12.1 when TDS < 1000 mg/L, 12.2 above; New York uses 12.1 always. */
export function tdsConstant(tds: number | null | undefined): number {
  return tds !== null && tds !== undefined && tds > 1000 ? 12.2 : 12.1;
}

export interface LangelierInput {
  ph: number;
  temperatureC: number;
  /** mg/L as CaCO3. */
  calciumHardness: number;
  /** mg/L as CaCO3. */
  totalAlkalinity: number;
  cyanuricAcid?: number | null;
  /** mg/L boron. */
  boron?: number | null;
  tds?: number | null;
}

export interface LangelierResult {
  lsi: number;
  verdict: Verdict;
  words: string;
  advice: string[];
  /** The pH at which this water would be just saturated (LSI 0). */
  phSaturation: number;
  carbonateAlkalinity: number;
  calciteSaturationIndex: number;
  factors: { TF: number; CF: number; AF: number; C: number };
}

/** Balanced band: −0.3 … +0.3 (common practice); New York §6-1.30 tolerates ±0.5 [P]. */
export const BALANCED_BAND = 0.3;

const round2 = (x: number) => Math.round(x * 100) / 100;

export function langelier(input: LangelierInput): LangelierResult {
  const w: WaterState = {
    temperatureC: input.temperatureC,
    tds: input.tds ?? 500,
    cyanuricAcid: input.cyanuricAcid ?? 0,
    boron: input.boron ?? 0,
  };
  const carbAlk = carbonateAlkalinity(input.ph, input.totalAlkalinity, w);
  const tempF = (input.temperatureC * 9) / 5 + 32;
  const TF = temperatureFactor(tempF);
  const CF = calciumFactor(input.calciumHardness);
  const AF = alkalinityFactor(carbAlk);
  const C = tdsConstant(input.tds);
  const lsi = input.ph + TF + CF + AF - C;
  const verdict: Verdict = lsi < -BALANCED_BAND ? "corrosive" : lsi > BALANCED_BAND ? "scaling" : "balanced";
  const phs = input.ph - lsi;
  const advice: string[] = [];
  let words: string;
  if (verdict === "corrosive") {
    words = `The water tends to corrode (LSI ${round2(lsi).toFixed(2)}): it can etch surfaces and attack the heater and metal parts.`;
    advice.push(
      `Raising pH toward ${round2(Math.min(7.8, phs)).toFixed(1)} (within the pH range) moves it toward balance.`,
      "Bring total alkalinity up into its range with sodium bicarbonate.",
      "If calcium hardness is low, raise it with calcium chloride.",
    );
  } else if (verdict === "scaling") {
    words = `The water tends to scale (LSI +${round2(lsi).toFixed(2)}): it can leave crust on the heater, jets and shell and turn cloudy.`;
    advice.push(
      `Lowering pH toward ${round2(Math.max(7.2, phs)).toFixed(1)} (within the pH range) moves it toward balance.`,
      "Keep total alkalinity at the low end of its range.",
      "If calcium hardness is high, replace part of the water with softer water; no product lowers hardness.",
    );
  } else {
    words = `The water is balanced (LSI ${lsi >= 0 ? "+" : ""}${round2(lsi).toFixed(2)}): neither corrosive nor scaling.`;
  }
  if (input.calciumHardness < 5 || carbAlk < 5)
    advice.push("Hardness or carbonate alkalinity is below the regulation table; the true index is lower than shown.");
  return {
    lsi,
    verdict,
    words,
    advice,
    phSaturation: phs,
    carbonateAlkalinity: carbAlk,
    calciteSaturationIndex: calciteSaturationIndex(input.ph, input.totalAlkalinity, input.calciumHardness, w),
    factors: { TF, CF, AF, C },
  };
}
