// Input validation: structure with zod 4, then plausibility (wrong units, absurd values) in plain words.

import { z } from "zod";
import { AVAILABLE_CHLORINE, LITRES_PER_US_GALLON } from "./constants";
import { ANALYTES } from "./analytes";
import { GUIDANCE_IDS } from "./targets";
import type { WaterInput } from "./types";

/** Bad input; the message is one line a tub owner understands. */
export class WaterInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "WaterInputError";
  }
}

const LABELS: Record<string, string> = {
  volumeLitres: "The volume (volumeLitres)",
  volumeGallons: "The volume (volumeGallons)",
  temperatureC: "The water temperature (temperatureC)",
  temperatureF: "The water temperature (temperatureF)",
  setTemperatureC: "The set temperature (setTemperatureC)",
  mode: "The mode",
  units: "The units",
  guidance: "The guidance",
  fillTds: "The fill water's dissolved solids (fillTds)",
  sanitiser: "The sanitiser",
  readings: "The readings",
  tds: "Total dissolved solids (tds)",
  bathersPerDay: "Bathers per day",
  products: "The product list",
  targets: "The target ranges",
  treatmentLog: "The treatment log",
  now: "The time now",
  ...Object.fromEntries(Object.entries(ANALYTES).map(([k, w]) => [k, w.name])),
};

function label(path: PropertyKey[]): string {
  const parts = path.map(String);
  const last = [...parts].reverse().find((p) => !/^\d+$/.test(p)) ?? "input";
  const base = LABELS[last] ?? `"${parts.join(".")}"`;
  const idx = parts.find((p) => /^\d+$/.test(p));
  if (parts[0] === "products" && idx !== undefined) return `Product ${Number(idx) + 1}: ${last}`;
  if (parts[0] === "treatmentLog" && idx !== undefined) return `Treatment log entry ${Number(idx) + 1}: ${last}`;
  return base;
}

const num = z.number().refine(Number.isFinite);
const reading = num.nullable().optional();
const isoTime = z.string().refine((s) => !Number.isNaN(Date.parse(s)), "must be a date and time such as 2025-06-01T18:30:00Z");

const productSchema = z.strictObject({
  id: z.string().min(1),
  name: z.string().min(1),
  chemical: z.string().min(1),
  form: z.enum(["granules", "powder", "liquid", "tablets"]),
  strength: num.optional(),
  availableChlorine: num.optional(),
  bulkDensityGPerMl: num.optional(),
  densityGPerMl: num.optional(),
  availableChlorineGPerL: num.optional(),
  tabletMassG: num.optional(),
  labelRatePer1000L: num.optional(),
  packageSize: z.strictObject({ amount: num, unit: z.enum(["g", "kg", "mL", "L"]) }).optional(),
  cautions: z.array(z.string()).optional(),
  retestAfterHours: num.optional(),
});

const rangeSchema = z.strictObject({ min: num.optional(), max: num.optional(), aim: num.optional(), source: z.string().optional() });

const inputSchema = z.strictObject({
  volumeLitres: num.optional(),
  volumeGallons: num.optional(),
  temperatureC: num.nullable().optional(),
  temperatureF: num.nullable().optional(),
  setTemperatureC: num.nullable().optional(),
  mode: z.enum(["routine", "first_fill"]).optional(),
  units: z.enum(["metric", "us"]).optional(),
  guidance: z.enum(GUIDANCE_IDS as [string, ...string[]]).optional(),
  fillTds: num.nullable().optional(),
  sanitiser: z.string(),
  readings: z.strictObject({
    free_chlorine: reading,
    total_chlorine: reading,
    bromine: reading,
    ph: reading,
    total_alkalinity: reading,
    total_hardness: reading,
    calcium_hardness: reading,
    cyanuric_acid: reading,
    borate: reading,
  }),
  tds: num.nullable().optional(),
  bathersPerDay: num.nullable().optional(),
  products: z.array(productSchema).optional(),
  targets: z.partialRecord(z.enum(["free_chlorine", "bromine", "ph", "total_alkalinity", "calcium_hardness", "cyanuric_acid"]), rangeSchema).optional(),
  treatmentLog: z
    .array(
      z.strictObject({
        productId: z.string().min(1),
        chemical: z.string().optional(),
        amount: num,
        unit: z.enum(["g", "mL", "tablets"]),
        addedAt: isoTime,
        shock: z.boolean().optional(),
      }),
    )
    .optional(),
  now: isoTime.optional(),
});

function where(path: PropertyKey[]): string {
  if (path.length === 0) return "in the input";
  const parts = path.map(String);
  if (parts[0] === "products" && parts[1] !== undefined) return `in product ${Number(parts[1]) + 1}`;
  if (parts[0] === "treatmentLog" && parts[1] !== undefined) return `in treatment log entry ${Number(parts[1]) + 1}`;
  return `in ${parts.join(".")}`;
}

function describeIssue(issue: z.core.$ZodIssue): string {
  const who = label(issue.path);
  switch (issue.code) {
    case "unrecognized_keys":
      return `Unknown field${issue.keys.length > 1 ? "s" : ""} ${issue.keys.map((k) => `"${k}"`).join(", ")} ${where(issue.path)}; check the spelling (volume in litres is volumeLitres, in US gallons volumeGallons).`;
    case "invalid_key":
      return `Unknown target ${where(issue.path)}; targets may set free_chlorine, bromine, ph, total_alkalinity, calcium_hardness or cyanuric_acid.`;
    case "invalid_type":
      if (/received undefined/.test(issue.message)) return `${who} is missing.`;
      return `${who} must be ${issue.expected === "number" ? "a number" : issue.expected === "string" ? "text" : issue.expected === "array" ? "a list" : issue.expected === "object" ? "an object" : issue.expected}.`;
    case "invalid_value":
      return `${who} must be one of: ${issue.values.map(String).join(", ")}.`;
    case "too_small":
      return `${who} must not be empty.`;
    case "custom":
      return `${who} ${issue.message && issue.message !== "Invalid input" ? issue.message : "must be a finite number"}.`;
    default:
      return `${who} is not valid.`;
  }
}

interface Limit {
  key: string;
  max: number;
  unit: string;
  /** Non-zero values below this look like a different unit. */
  wrongUnitBelow?: number;
  wrongUnitHint?: string;
  tooHighHint?: string;
}

const READING_LIMITS: Limit[] = [
  { key: "free_chlorine", max: 50, unit: "mg/L", tooHighHint: "no hot tub reads that; is it a redox (ORP) value in mV, or a different unit?" },
  { key: "total_chlorine", max: 50, unit: "mg/L", tooHighHint: "no hot tub reads that; check the unit" },
  { key: "bromine", max: 60, unit: "mg/L", tooHighHint: "no hot tub reads that; check the unit" },
  {
    key: "total_alkalinity",
    max: 1000,
    unit: "mg/L as CaCO3",
    wrongUnitBelow: 10,
    wrongUnitHint: "looks like meq/L or mmol/L; give mg/L as CaCO3 (1 meq/L = 50 mg/L)",
  },
  {
    key: "total_hardness",
    max: 2000,
    unit: "mg/L as CaCO3",
    wrongUnitBelow: 5,
    wrongUnitHint: "looks like mmol/L or degrees of hardness; give mg/L as CaCO3 (1 mmol/L = 100 mg/L)",
  },
  {
    key: "calcium_hardness",
    max: 2000,
    unit: "mg/L as CaCO3",
    wrongUnitBelow: 5,
    wrongUnitHint: "looks like mmol/L or degrees of hardness; give mg/L as CaCO3 (1 mmol/L = 100 mg/L)",
  },
  { key: "cyanuric_acid", max: 500, unit: "mg/L", tooHighHint: "that is beyond any test; check the reading" },
  { key: "borate", max: 200, unit: "mg/L boron", tooHighHint: "check the unit" },
];

/** Available chlorine of the pure compound (chemistry.md §2.1 [D]); a sodium hypochlorite product's strength is its NaOCl mass fraction. */
const CHLORINE_FRACTION: Record<string, number> = {
  sodium_dichloroisocyanurate_dihydrate: AVAILABLE_CHLORINE.dichlorDihydrate,
  sodium_dichloroisocyanurate_anhydrous: AVAILABLE_CHLORINE.dichlorAnhydrous,
  calcium_hypochlorite: AVAILABLE_CHLORINE.calciumHypochlorite,
  sodium_hypochlorite: AVAILABLE_CHLORINE.sodiumHypochlorite,
};

const fail = (msg: string): never => {
  throw new WaterInputError(msg);
};

/** Validate raw JSON into a WaterInput; throws WaterInputError with one plain-words line. */
export function validateWaterInput(json: unknown): WaterInput {
  if (json === null || typeof json !== "object" || Array.isArray(json))
    fail("The input must be one JSON object with volumeLitres, sanitiser and readings.");
  const parsed = inputSchema.safeParse(json);
  if (!parsed.success) {
    // Unknown fields first: a misspelt or unexpected field (a volume in gallons typed as litres) is the likeliest mistake.
    const unknown = parsed.error.issues.filter((i) => i.code === "unrecognized_keys");
    fail(describeIssue(unknown[0] ?? parsed.error.issues[0]!));
  }
  const d = parsed.data!;

  if (d.volumeLitres !== undefined && d.volumeGallons !== undefined)
    fail("Give the volume once: volumeLitres or volumeGallons (US gallons), not both.");
  if (d.volumeLitres === undefined && d.volumeGallons === undefined) fail("The volume is missing: give volumeLitres (or volumeGallons for US gallons).");
  if (d.volumeGallons !== undefined) {
    const g = d.volumeGallons;
    if (g <= 0) fail(`The volume must be above 0 US gallons (got ${g}).`);
    if (g < 26) fail(`A volume of ${g} US gallons is too small for a hot tub (a small tub holds about 160 US gallons).`);
    if (g > 13000) fail(`A volume of ${g} US gallons is a swimming pool, not a hot tub.`);
  }
  const v = d.volumeLitres ?? d.volumeGallons! * LITRES_PER_US_GALLON;
  if (v <= 0) fail(`The volume must be above 0 litres (got ${v}).`);
  if (v < 100) fail(`A volume of ${v} L is too small for a hot tub; give the volume in litres (a small tub holds about 600 L).`);
  if (v > 50000) fail(`A volume of ${v} L is a swimming pool, not a hot tub; give the tub's volume in litres.`);

  if (d.temperatureC != null && d.temperatureF != null) fail("Give the water temperature once: temperatureC or temperatureF, not both.");
  if (d.temperatureF != null && (d.temperatureF < 32 || d.temperatureF > 113))
    fail(`A water temperature of ${d.temperatureF} °F is ${d.temperatureF < 32 ? "below freezing" : "too hot for a hot tub"}; give it in °F (a hot tub runs at about 100 °F).`);
  const t = d.temperatureF != null ? Math.round((((d.temperatureF - 32) * 5) / 9) * 10) / 10 : d.temperatureC;
  const st = d.setTemperatureC;
  if (st !== null && st !== undefined && (st < 10 || st > 45))
    fail(`A set temperature of ${st} °C is not a hot tub's; give it in °C (hot tubs run at about 37–40 °C).`);
  if (d.fillTds != null && (d.fillTds < 0 || d.fillTds > 20000)) fail(`The fill water's dissolved solids of ${d.fillTds} mg/L is ${d.fillTds < 0 ? "negative" : "implausible"}.`);
  if (t !== null && t !== undefined) {
    if (t < 0) fail(`A water temperature of ${t} °C is below freezing; give the temperature in °C.`);
    if (t > 45) fail(`A water temperature of ${t} °C is too hot for a hot tub; if that is °F, give it in °C (${(((t - 32) * 5) / 9).toFixed(1)} °C).`);
  }

  const sanitiser = d.sanitiser.trim().toLowerCase();
  if (sanitiser !== "chlorine" && sanitiser !== "bromine")
    fail(`Unknown sanitiser "${d.sanitiser}"; use "chlorine" or "bromine".`);

  const r = d.readings as Record<string, number | null | undefined>;
  const ph = r.ph;
  if (ph !== null && ph !== undefined && (ph < 0 || ph > 14)) fail(`pH must be between 0 and 14 (got ${ph}).`);
  for (const [key, value] of Object.entries(r)) {
    if (value === null || value === undefined || key === "ph") continue;
    if (typeof value !== "number") continue;
    if (value < 0) fail(`${LABELS[key] ?? key} cannot be negative (got ${value}).`);
  }
  for (const lim of READING_LIMITS) {
    const value = r[lim.key];
    if (value === null || value === undefined) continue;
    const name = LABELS[lim.key]!;
    if (value > lim.max) fail(`${name} of ${value} ${lim.unit} is implausible: ${lim.tooHighHint ?? "check the unit"}.`);
    if (lim.wrongUnitBelow !== undefined && value > 0 && value < lim.wrongUnitBelow)
      fail(`${name} of ${value} ${lim.wrongUnitHint}.`);
  }

  if (d.tds !== null && d.tds !== undefined && (d.tds < 0 || d.tds > 20000))
    fail(`Total dissolved solids of ${d.tds} mg/L is ${d.tds < 0 ? "negative" : "implausible for a hot tub"}.`);
  if (d.bathersPerDay !== null && d.bathersPerDay !== undefined && (d.bathersPerDay < 0 || d.bathersPerDay > 1000))
    fail(`Bathers per day must be between 0 and 1000 (got ${d.bathersPerDay}).`);

  const isChlorine = (c: string) => c in CHLORINE_FRACTION;
  (d.products ?? []).forEach((p, i) => {
    const who = `Product ${i + 1} ("${p.name}")`;
    if (p.availableChlorine !== undefined) {
      if (!isChlorine(p.chemical)) fail(`${who} gives availableChlorine, but ${p.chemical.replace(/_/g, " ")} is not a chlorine product; give its strength.`);
      if (p.availableChlorine > 1 && p.availableChlorine <= 100) fail(`${who} availableChlorine ${p.availableChlorine} looks like a percentage; give it as a fraction (${p.availableChlorine / 100}).`);
      if (!(p.availableChlorine > 0 && p.availableChlorine <= 1)) fail(`${who} availableChlorine must be a fraction between 0 and 1, the figure the label prints (e.g. 0.56).`);
      const pure = CHLORINE_FRACTION[p.chemical]!;
      if (p.availableChlorine > pure + 0.01)
        fail(`${who} availableChlorine ${p.availableChlorine} is more than pure ${p.chemical.replace(/_/g, " ")} has (${Math.round(pure * 1000) / 1000}); check the chemical and the label.`);
      if (p.strength !== undefined) {
        const implied = p.strength * pure;
        if (Math.abs(implied - p.availableChlorine) > Math.max(0.02, 0.05 * p.availableChlorine))
          fail(`${who}: strength ${p.strength} and availableChlorine ${p.availableChlorine} disagree (strength ${p.strength} of ${p.chemical.replace(/_/g, " ")} gives ${Math.round(implied * 1000) / 1000} available chlorine); give one of them, or make them agree.`);
      }
      p.strength ??= Math.min(1, p.availableChlorine / pure);
    }
    if (p.strength === undefined) fail(`${who} needs a strength (the active-ingredient fraction, e.g. 0.93)${isChlorine(p.chemical) ? " or availableChlorine (the label's figure)" : ""}.`);
    const strength = p.strength!;
    if (strength <= 0) fail(`${who} has zero or negative strength; give the active-ingredient fraction, e.g. 0.56 for 56 %.`);
    if (strength > 1 && strength <= 100) fail(`${who} strength ${strength} looks like a percentage; give it as a fraction (${strength / 100}).`);
    if (strength > 1) fail(`${who} strength must be a fraction between 0 and 1.`);
    if (p.chemical.startsWith("sodium_dichloroisocyanurate") && p.availableChlorine === undefined && strength < 0.8)
      fail(`${who} strength ${strength} looks like the label's available chlorine, not purity: dichlor is sold nearly pure (pure dihydrate has 55.4 % available chlorine). Give it as availableChlorine: ${strength}, or give the purity as strength.`);
    if (p.bulkDensityGPerMl !== undefined && !(p.bulkDensityGPerMl > 0.2 && p.bulkDensityGPerMl < 3)) fail(`${who} bulk density must be between 0.2 and 3 g/mL.`);
    if (p.form === "liquid" && p.densityGPerMl !== undefined && !(p.densityGPerMl > 0.5 && p.densityGPerMl < 2.5))
      fail(`${who} density must be between 0.5 and 2.5 g/mL.`);
    if (p.availableChlorineGPerL !== undefined && !(p.availableChlorineGPerL > 0 && p.availableChlorineGPerL <= 250))
      fail(`${who} available chlorine must be above 0 and at most 250 g/L.`);
    if (p.tabletMassG !== undefined && !(p.tabletMassG > 0)) fail(`${who} tablet mass must be above 0 g.`);
    if (p.labelRatePer1000L !== undefined && !(p.labelRatePer1000L > 0)) fail(`${who} label rate must be above 0.`);
    if (p.retestAfterHours !== undefined && !(p.retestAfterHours >= 0 && p.retestAfterHours <= 168)) fail(`${who} retest wait must be 0–168 hours.`);
    if (p.packageSize && !(p.packageSize.amount > 0)) fail(`${who} package size must be above 0.`);
  });
  const ids = new Set<string>();
  for (const p of d.products ?? []) {
    if (ids.has(p.id)) fail(`Two products share the id "${p.id}"; each product needs its own id.`);
    ids.add(p.id);
  }
  (d.treatmentLog ?? []).forEach((e, i) => {
    if (e.amount < 0) fail(`Treatment log entry ${i + 1}: the amount cannot be negative.`);
  });
  for (const [key, rg] of Object.entries(d.targets ?? {})) {
    const lo = rg.min ?? -Infinity;
    const hi = rg.max ?? Infinity;
    if (lo > hi) fail(`The target range for ${key.replace(/_/g, " ")} has its minimum above its maximum.`);
    if ((rg.min ?? 0) < 0 || (rg.max ?? 0) < 0) fail(`The target range for ${key.replace(/_/g, " ")} cannot be negative.`);
  }

  const { volumeGallons: _g, temperatureF: _f, ...rest } = d;
  void _g;
  void _f;
  return {
    ...(rest as unknown as WaterInput),
    volumeLitres: v,
    sanitiser: sanitiser as WaterInput["sanitiser"],
    temperatureC: t ?? undefined,
    setTemperatureC: st ?? undefined,
    fillTds: d.fillTds ?? undefined,
    tds: d.tds ?? undefined,
    bathersPerDay: d.bathersPerDay ?? undefined,
    products: d.products?.map((p) => ({ cautions: [], packageSize: { amount: 1, unit: "kg" as const }, ...p })) as WaterInput["products"],
  };
}

/** True when any number in a plan (or any value) is NaN or ±Infinity: such a plan is never shown. */
export function hasNonFinite(x: unknown): boolean {
  if (typeof x === "number") return !Number.isFinite(x);
  if (Array.isArray(x)) return x.some(hasNonFinite);
  if (x && typeof x === "object") return Object.values(x).some(hasNonFinite);
  return false;
}
