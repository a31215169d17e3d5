// Units people use: litres / US gallons / imperial gallons, °C / °F, grams and millilitres or
// ounces and US fluid ounces, with kitchen measures for small doses.
//
// Exact conversion factors: NIST Handbook 44 Appendix C (1 US gal = 3.785411784 L, 1 oz =
// 28.349523125 g, 1 US fl oz = 29.5735295625 mL, 1 US tsp = 1/6 fl oz, 1 tbsp = ½ fl oz,
// 1 cup = 8 fl oz); 1 imperial gallon = 4.54609 L (UK Weights and Measures Act 1985).
// Metric kitchen measures: 5 mL teaspoon, 15 mL tablespoon, 250 mL cup (common practice).

import { GRAMS_PER_OUNCE, LITRES_PER_IMPERIAL_GALLON, LITRES_PER_US_GALLON, ML_PER_US_FL_OZ } from "./constants";
import { BULK_DENSITY } from "./products";
import type { Product, Units } from "./types";

export const litresFromImperialGallons = (g: number) => g * LITRES_PER_IMPERIAL_GALLON;
export const imperialGallonsFromLitres = (l: number) => l / LITRES_PER_IMPERIAL_GALLON;
export const celsiusFromFahrenheit = (f: number) => ((f - 32) * 5) / 9;
export const fahrenheitFromCelsius = (c: number) => (c * 9) / 5 + 32;
export const ouncesFromGrams = (g: number) => g / GRAMS_PER_OUNCE;
export const fluidOuncesFromMillilitres = (ml: number) => ml / ML_PER_US_FL_OZ;
export const centimetresFromInches = (inch: number) => inch * 2.54;
export { LITRES_PER_US_GALLON };

const MEASURES: Record<Units, { name: string; plural: string; ml: number }[]> = {
  us: [
    { name: "cup", plural: "cups", ml: 8 * ML_PER_US_FL_OZ },
    { name: "tbsp", plural: "tbsp", ml: ML_PER_US_FL_OZ / 2 },
    { name: "tsp", plural: "tsp", ml: ML_PER_US_FL_OZ / 6 },
  ],
  metric: [
    { name: "cup", plural: "cups", ml: 250 },
    { name: "tbsp", plural: "tbsp", ml: 15 },
    { name: "tsp", plural: "tsp", ml: 5 },
  ],
};

const FRACTIONS: [number, string][] = [
  [0, ""],
  [0.25, "¼"],
  [1 / 3, "⅓"],
  [0.5, "½"],
  [2 / 3, "⅔"],
  [0.75, "¾"],
  [1, ""],
];

/** 2.3 → "2 ¼"; the nearest quarter or third. */
export function fractionWords(x: number): string {
  const whole = Math.floor(x);
  const rest = x - whole;
  let best = FRACTIONS[0]!;
  for (const f of FRACTIONS) if (Math.abs(f[0] - rest) < Math.abs(best[0] - rest)) best = f;
  const w = best[0] === 1 ? whole + 1 : whole;
  if (w === 0) return best[1] || "0";
  return best[1] ? `${w} ${best[1]}` : String(w);
}

/**
 * A kitchen measure for a volume in mL: teaspoons up to 3, tablespoons up to 4, then cups up to
 * 4 cups; larger doses are weighed or measured with a jug (null).
 */
export function kitchenMeasure(ml: number, units: Units): string | null {
  if (!(ml > 0)) return null;
  const [cup, tbsp, tsp] = MEASURES[units];
  const inTsp = ml / tsp!.ml;
  if (inTsp < 0.2) return "a pinch";
  if (inTsp <= 3) return `about ${fractionWords(inTsp)} ${inTsp > 1.1 ? tsp!.plural : tsp!.name}`;
  const inTbsp = ml / tbsp!.ml;
  if (inTbsp <= 4) return `about ${fractionWords(inTbsp)} ${tbsp!.plural}`;
  const inCup = ml / cup!.ml;
  if (inCup <= 4) return `about ${fractionWords(inCup)} ${inCup > 1.1 ? cup!.plural : cup!.name}`;
  return null;
}

/** Bulk density of a solid product (g/mL) for kitchen measures, or null when not known. */
export function bulkDensity(product: Pick<Product, "chemical" | "form" | "bulkDensityGPerMl">): number | null {
  if (product.form === "liquid" || product.form === "tablets") return null;
  return product.bulkDensityGPerMl ?? BULK_DENSITY[product.chemical] ?? null;
}

const r = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits;

/** Rounds an amount for people: one decimal below 10, whole numbers below 1000, tens above. */
export function roundAmount(x: number | null): number | null {
  if (x === null || !Number.isFinite(x)) return null;
  if (x < 10) return Math.round(x * 10) / 10;
  if (x < 1000) return Math.round(x);
  return Math.round(x / 10) * 10;
}

/** Ounces rounded for people: two decimals below 1, one below 10, whole numbers above. */
export function roundOunces(x: number): number {
  return x < 1 ? r(x, 2) : x < 10 ? r(x, 1) : Math.round(x);
}

export interface DisplayAmount {
  ounces: number | null;
  fluidOunces: number | null;
  kitchenMeasure: string | null;
  text: string;
}

/**
 * The amount in the chosen units: "8.1 g (about 2 ¼ tsp)" or, in US units,
 * "0.29 oz (8.1 g, about 1 ¾ tsp)"; liquids "12 mL" / "0.41 fl oz (12 mL, about 2 ½ tsp)".
 */
export function displayAmount(
  product: Pick<Product, "chemical" | "form" | "bulkDensityGPerMl">,
  amount: { grams: number | null; millilitres: number | null; tablets?: number | null },
  units: Units,
): DisplayAmount {
  const { grams, millilitres } = amount;
  if (millilitres !== null && millilitres !== undefined) {
    const floz = fluidOuncesFromMillilitres(millilitres);
    const km = kitchenMeasure(millilitres, units);
    const ml = `${roundAmount(millilitres)} mL`;
    return {
      ounces: null,
      fluidOunces: units === "us" ? roundOunces(floz) : null,
      kitchenMeasure: km,
      text: units === "us" ? `${roundOunces(floz)} fl oz (${ml}${km ? `, ${km}` : ""})` : `${ml}${km ? ` (${km})` : ""}`,
    };
  }
  if (grams !== null && grams !== undefined) {
    const density = bulkDensity(product);
    const km = density ? kitchenMeasure(grams / density, units) : null;
    const g = `${roundAmount(grams)} g`;
    const tabs = amount.tablets ? `about ${Math.max(0.5, Math.round(amount.tablets * 2) / 2)} tablets` : null;
    const extra = [km, tabs].filter(Boolean).join(", ");
    const oz = roundOunces(ouncesFromGrams(grams));
    return {
      ounces: units === "us" ? oz : null,
      fluidOunces: null,
      kitchenMeasure: km,
      text: units === "us" ? `${oz} oz (${g}${extra ? `, ${extra}` : ""})` : `${g}${extra ? ` (${extra})` : ""}`,
    };
  }
  return { ounces: null, fluidOunces: null, kitchenMeasure: null, text: "" };
}

/** A volume in the owner's units: "1500 L" or "396 US gal (1500 L)". */
export function volumeWords(litres: number, units: Units): string {
  return units === "us" ? `${Math.round(litres / LITRES_PER_US_GALLON)} US gal (${Math.round(litres)} L)` : `${Math.round(litres)} L`;
}

/** A temperature in the owner's units: "38 °C" or "100 °F (38 °C)". */
export function temperatureWords(c: number, units: Units): string {
  return units === "us" ? `${Math.round(fahrenheitFromCelsius(c))} °F (${r(c, 1)} °C)` : `${r(c, 1)} °C`;
}
