// Input validation: structure with zod 4, then plausibility (wrong units, absurd values) in plain words.

import { z } from "zod";
import { PARAMETER_NAMES } from "./names";
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
  temperatureC: "The water temperature (temperatureC)",
  sanitiser: "The sanitiser",
  readings: "The readings",
  tds: "Total dissolved solids (tds)",
  bathersPerDay: "Bathers per day",
  products: "The product list",
  targets: "The target ranges",
  treatmentLog: "The treatment log",
  now: "The time now",
  ...PARAMETER_NAMES,
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

const productSchema = z.looseObject({
  id: z.string().min(1),
  name: z.string().min(1),
  chemical: z.string().min(1),
  form: z.enum(["granules", "powder", "liquid", "tablets"]),
  strength: num,
  densityGPerMl: num.optional(),
  availableChlorineGPerL: num.optional(),
  tabletMassG: num.optional(),
  labelRatePer1000L: num.optional(),
  packageSize: z.object({ amount: num, unit: z.enum(["g", "kg", "mL", "L"]) }).optional(),
  cautions: z.array(z.string()).optional(),
  retestAfterHours: num.optional(),
});

const rangeSchema = z.object({ min: num.optional(), max: num.optional(), aim: num.optional(), source: z.string().optional() });

const inputSchema = z.looseObject({
  volumeLitres: num,
  temperatureC: num.nullable().optional(),
  sanitiser: z.string(),
  readings: z.looseObject({
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
  targets: z.record(z.string(), rangeSchema).optional(),
  treatmentLog: z
    .array(
      z.looseObject({
        productId: z.string().min(1),
        chemical: z.string().optional(),
        amount: num,
        unit: z.enum(["g", "mL", "tablets"]),
        addedAt: isoTime,
      }),
    )
    .optional(),
  now: isoTime.optional(),
});

function describeIssue(issue: z.core.$ZodIssue): string {
  const who = label(issue.path);
  switch (issue.code) {
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

const fail = (msg: string): never => {
  throw new WaterInputError(msg);
};

/** Validate raw JSON into a WaterInput; throws WaterInputError with one plain-words line. */
export function validateWaterInput(json: unknown): WaterInput {
  if (json === null || typeof json !== "object" || Array.isArray(json))
    fail("The input must be one JSON object with volumeLitres, sanitiser and readings.");
  const parsed = inputSchema.safeParse(json);
  if (!parsed.success) fail(describeIssue(parsed.error.issues[0]!));
  const d = parsed.data!;

  const v = d.volumeLitres;
  if (v <= 0) fail(`The volume must be above 0 litres (got ${v}).`);
  if (v < 100) fail(`A volume of ${v} L is too small for a hot tub; give the volume in litres (a small tub holds about 600 L).`);
  if (v > 50000) fail(`A volume of ${v} L is a swimming pool, not a hot tub; give the tub's volume in litres.`);

  const t = d.temperatureC;
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

  (d.products ?? []).forEach((p, i) => {
    const who = `Product ${i + 1} ("${p.name}")`;
    if (p.strength <= 0) fail(`${who} has zero or negative strength; give the active-ingredient fraction, e.g. 0.56 for 56 %.`);
    if (p.strength > 1 && p.strength <= 100) fail(`${who} strength ${p.strength} looks like a percentage; give it as a fraction (${p.strength / 100}).`);
    if (p.strength > 1) fail(`${who} strength must be a fraction between 0 and 1.`);
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

  return {
    ...(d as unknown as WaterInput),
    sanitiser: sanitiser as WaterInput["sanitiser"],
    temperatureC: t ?? undefined,
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
