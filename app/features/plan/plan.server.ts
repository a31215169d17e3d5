// The tub's plan: its latest reading, its volume, temperature and sanitiser, the owner's catalogue,
// its target ranges and its treatment log, handed to the pure water-chemistry engine.
import { and, desc, eq, gte } from "drizzle-orm";
import { isUuid } from "~/lib/ids";
import { padsByReading } from "~/features/readings/pads.server";
import { z } from "zod";
import {
  DEFAULT_TARGETS,
  ProductError,
  WaterInputError,
  analyteLabel,
  hasNonFinite,
  analyteName,
  planTreatment,
  resolveTargets,
  validateWaterInput,
  type LoggedTreatment,
  type Parameter,
  type Product,
  type Range,
  type Readings,
  type TargetRanges,
  type WaterPlan,
} from "~/chemistry";
import { activeLock, waitHoursForLogged } from "~/chemistry/lock";
import { GUIDANCE_IDS, READING_NAMES, type Guidance, type Units } from "~/chemistry";
import { reading, treatment, tub as tubTable } from "~/db/schema";
import { db } from "~/lib/db.server";
import type { Tub } from "~/lib/tub-access.server";
import { ownerProducts } from "./catalogue.server";
import { READING_KEYS, TARGET_PARAMETERS } from "./shared";
export { READING_KEYS, TARGET_PARAMETERS } from "./shared";
import { clock, dayOnly, fromLocalInput, safeZone } from "~/lib/tub-time";

export interface LatestReading {
  id: string;
  takenAt: string;
  status: string;
  confirmed: boolean;
  readings: Readings;
  pads: { analyte: string; value: number; unit: string | null; confirmed: boolean }[];
}

/** The newest reading of the tub with at least one pad value (confirmed value before the read one). */
export async function latestReading(tubId: string): Promise<LatestReading | null> {
  const recent = await db.select().from(reading).where(eq(reading.tubId, tubId)).orderBy(desc(reading.takenAt)).limit(10);
  if (recent.length === 0) return null;
  const pads = await padsByReading(recent.map((r) => r.id));
  for (const r of recent) {
    const mine = (pads.get(r.id) ?? []).filter((p) => (p.confirmedValue ?? p.readValue) !== null);
    if (mine.length === 0) continue;
    const readings: Readings = {};
    for (const p of mine) (readings as Record<string, number>)[p.analyte] = (p.confirmedValue ?? p.readValue)!;
    return {
      id: r.id,
      takenAt: r.takenAt.toISOString(),
      status: r.status,
      confirmed: r.status === "confirmed" || r.status === "manual",
      readings,
      pads: mine.map((p) => ({ analyte: p.analyte, value: (p.confirmedValue ?? p.readValue)!, unit: p.unit, confirmed: p.confirmedValue !== null })),
    };
  }
  return null;
}

export type TreatmentRow = typeof treatment.$inferSelect;

export async function recentTreatments(tubId: string, limit = 50): Promise<TreatmentRow[]> {
  return db.select().from(treatment).where(eq(treatment.tubId, tubId)).orderBy(desc(treatment.addedAt)).limit(limit);
}

/** The log as the engine reads it: the last week is enough for any wait. */
export async function treatmentLog(tubId: string, now: Date): Promise<LoggedTreatment[]> {
  const rows = await db
    .select()
    .from(treatment)
    .where(and(eq(treatment.tubId, tubId), gte(treatment.addedAt, new Date(now.getTime() - 7 * 86400_000))))
    .orderBy(desc(treatment.addedAt));
  return rows
    .filter((r) => r.addedAt.getTime() <= now.getTime() + 60_000)
    .map((r) => ({
      productId: r.productId ?? r.chemical,
      chemical: r.chemical,
      amount: r.amount,
      unit: (["g", "mL", "tablets"].includes(r.unit) ? r.unit : "g") as LoggedTreatment["unit"],
      addedAt: r.addedAt.toISOString(),
      ...(r.shock ? { shock: true } : {}),
    }));
}

export interface Timer {
  treatmentId: string;
  productName: string;
  addedAt: string;
  retestAt: string;
  /** "14:35" in the tub's time zone */
  retestClock: string;
  /** "Wed 2 Dec" in the tub's time zone */
  retestDay: string;
  /** the dose was a shock: the tub stays closed longer */
  shock: boolean;
}

/** The lock in force: the same rule the plan, the treatment log and the first-fill routine honour. */
export function activeTimer(t: Pick<Tub, "volumeLitres" | "timeZone">, rows: TreatmentRow[], products: Product[], now: Date, locale?: string): Timer | null {
  const zone = safeZone(t.timeZone);
  const log = rows
    .filter((r) => r.addedAt.getTime() <= now.getTime() + 60_000 && r.addedAt.getTime() >= now.getTime() - 7 * 86400_000)
    .map((r) => ({ id: r.id, entry: { productId: r.productId ?? r.chemical, chemical: r.chemical, amount: r.amount, unit: (["g", "mL", "tablets"].includes(r.unit) ? r.unit : "g") as LoggedTreatment["unit"], addedAt: r.addedAt.toISOString(), ...(r.shock ? { shock: true } : {}) } }));
  const lock = activeLock(log.map((l) => l.entry), { products, volumeLitres: t.volumeLitres, now });
  if (!lock) return null;
  const row = log.find((l) => l.entry.addedAt === lock.addedAt && l.entry.productId === lock.productId);
  const named = rows.find((r) => r.id === row?.id);
  return {
    treatmentId: row?.id ?? "",
    productName: named?.productName ?? lock.productName,
    addedAt: lock.addedAt,
    retestAt: lock.until,
    retestClock: clock(lock.until, zone, locale),
    retestDay: dayOnly(lock.until, zone, locale),
    shock: lock.shock,
  };
}

export function tubGuidance(t: Pick<Tub, "guidance">): Guidance {
  return (GUIDANCE_IDS as string[]).includes(t.guidance) ? (t.guidance as Guidance) : "us_home";
}

// ------------------------------------------------------------------ target ranges

const overrideSchema = z.record(z.string(), z.object({ min: z.number().optional(), max: z.number().optional(), aim: z.number().optional() }));

/** The tub's stored overrides; anything unreadable is ignored rather than breaking the plan. */
export function tubOverrides(t: Pick<Tub, "targets" | "sanitiser"> & Partial<Pick<Tub, "guidance">>): Partial<Record<Parameter, Partial<Range>>> {
  const parsed = overrideSchema.safeParse(t.targets ?? {});
  if (!parsed.success) return {};
  const out: Partial<Record<Parameter, Partial<Range>>> = {};
  for (const [k, v] of Object.entries(parsed.data)) if (k in DEFAULT_TARGETS[t.sanitiser]) out[k as Parameter] = v;
  try {
    resolveTargets(t.sanitiser, out, t.guidance ? tubGuidance({ guidance: t.guidance }) : undefined);
    return out;
  } catch {
    return {};
  }
}

export function tubTargets(t: Pick<Tub, "targets" | "sanitiser" | "guidance">): TargetRanges {
  return resolveTargets(t.sanitiser, tubOverrides(t), tubGuidance(t));
}

/** Upper limits for a per-tub range: beyond them it is not a hot tub target any more (common practice). */
const TARGET_LIMITS: Record<Parameter, number> = {
  free_chlorine: 10,
  bromine: 10,
  ph: 8.4,
  total_alkalinity: 300,
  calcium_hardness: 800,
  cyanuric_acid: 100,
};

export function parseTargets(t: Pick<Tub, "sanitiser">, form: FormData): { ok: true; targets: Partial<Record<Parameter, Partial<Range>>> } | { ok: false; fields: Record<string, string> } {
  const fields: Record<string, string> = {};
  const out: Partial<Record<Parameter, Partial<Range>>> = {};
  for (const p of TARGET_PARAMETERS(t.sanitiser)) {
    const def = DEFAULT_TARGETS[t.sanitiser][p];
    const raw = { min: String(form.get(`${p}.min`) ?? "").trim(), max: String(form.get(`${p}.max`) ?? "").trim() };
    const min = raw.min === "" ? def.min : Number(raw.min.replace(",", "."));
    const max = raw.max === "" ? def.max : Number(raw.max.replace(",", "."));
    const name = analyteName(p);
    if (!Number.isFinite(min) || !Number.isFinite(max)) fields[p] = `${name}: the lowest and highest values must be numbers.`;
    else if (min < 0 || max < 0) fields[p] = `${name}: the range cannot be negative.`;
    else if (min >= max) fields[p] = `${name}: the lowest value must be below the highest.`;
    else if (p === "ph" && min < 6.8) fields[p] = "pH: a target below 6.8 corrodes the tub and stings the eyes.";
    else if (max > TARGET_LIMITS[p]) fields[p] = `${name}: a highest value above ${TARGET_LIMITS[p]} is not a hot tub target.`;
    else if (p === "free_chlorine" || p === "bromine") {
      if (min < 1) fields[p] = `${name}: the lowest value must be at least 1 mg/L, or the water is not disinfected.`;
    }
    if (fields[p]) continue;
    if (min !== def.min || max !== def.max) out[p] = { min, max };
  }
  if (Object.keys(fields).length) return { ok: false, fields };
  try {
    resolveTargets(t.sanitiser, out);
  } catch (e) {
    return { ok: false, fields: { form: (e as Error).message } };
  }
  return { ok: true, targets: out };
}

export async function saveTargets(tubId: string, targets: Partial<Record<Parameter, Partial<Range>>>) {
  await db.update(tubTable).set({ targets }).where(eq(tubTable.id, tubId));
}

// ------------------------------------------------------------------ the plan

export interface TubPlan {
  tub: { id: string; name: string; volumeLitres: number; volumeUnit: string; sanitiser: "chlorine" | "bromine"; temperatureC: number; timeZone: string; bathersPerDay: number; firstFillCompletedAt: string | null };
  source: "reading" | "what-if" | "none";
  reading: LatestReading | null;
  whatIf: Readings | null;
  plan: WaterPlan | null;
  error: string | null;
  targets: TargetRanges;
  overridden: Parameter[];
  timer: Timer | null;
  units: Units;
  guidance: Guidance;
  now: string;
}

/** Runs the engine for this tub; bad readings become an error in plain words, never a NaN dose. */
export function runEngine(
  t: Pick<Tub, "volumeLitres" | "temperatureC" | "sanitiser" | "bathersPerDay" | "timeZone" | "targets" | "guidance">,
  readings: Readings,
  products: Product[],
  log: LoggedTreatment[],
  now: Date,
  units: Units = "metric",
  locale?: string,
): { plan: WaterPlan | null; error: string | null } {
  try {
    const input = validateWaterInput({
      volumeLitres: t.volumeLitres,
      // the tub's set temperature: a strip reading carries no water temperature
      setTemperatureC: t.temperatureC,
      sanitiser: t.sanitiser,
      bathersPerDay: t.bathersPerDay > 0 ? t.bathersPerDay : undefined,
      // only the analytes the engine knows: a chart may carry other pads
      readings: Object.fromEntries(Object.entries(readings).filter(([k]) => (READING_NAMES as readonly string[]).includes(k))),
    });
    const plan = planTreatment(input, { products, treatmentLog: log, targets: tubOverrides(t), now, timeZone: safeZone(t.timeZone), guidance: tubGuidance(t), units, locale });
    if (hasNonFinite(plan)) return { plan: null, error: "The plan could not be computed for these readings; please check them." };
    return { plan, error: null };
  } catch (e) {
    if (e instanceof WaterInputError || e instanceof ProductError || e instanceof RangeError) return { plan: null, error: e.message };
    throw e;
  }
}

/** Parses hand-entered what-if readings from a query string; null when none were given. */
export function parseWhatIf(params: URLSearchParams): { readings: Readings | null; error: string | null } {
  if (params.get("whatif") !== "1") return { readings: null, error: null };
  const readings: Record<string, number> = {};
  for (const key of READING_KEYS) {
    const raw = (params.get(key) ?? "").trim().replace(",", ".");
    if (raw === "") continue;
    const n = Number(raw);
    if (!Number.isFinite(n)) return { readings: null, error: `${analyteLabel(key)} must be a number (got "${raw}").` };
    readings[key] = n;
  }
  if (Object.keys(readings).length === 0) return { readings: null, error: "Enter at least one reading for a what-if plan." };
  return { readings, error: null };
}

export async function tubPlan(t: Tub, opts: { now?: Date; whatIf?: Readings | null; units?: Units; locale?: string } = {}): Promise<TubPlan> {
  const now = opts.now ?? new Date();
  const zone = safeZone(t.timeZone);
  const [products, rows, latest] = await Promise.all([ownerProducts(t.ownerId), recentTreatments(t.id, 20), latestReading(t.id)]);
  const log = await treatmentLog(t.id, now);
  const readings = opts.whatIf ?? latest?.readings ?? null;
  const { plan, error } = readings ? runEngine(t, readings, products, log, now, opts.units, opts.locale) : { plan: null, error: null };
  const overrides = tubOverrides(t);
  return {
    tub: {
      id: t.id,
      name: t.name,
      volumeLitres: t.volumeLitres,
      volumeUnit: t.volumeUnit,
      sanitiser: t.sanitiser,
      temperatureC: t.temperatureC,
      timeZone: zone,
      bathersPerDay: t.bathersPerDay,
      firstFillCompletedAt: t.firstFillCompletedAt?.toISOString() ?? null,
    },
    source: opts.whatIf ? "what-if" : latest ? "reading" : "none",
    reading: latest,
    whatIf: opts.whatIf ?? null,
    plan,
    error,
    targets: resolveTargets(t.sanitiser, overrides, tubGuidance(t)),
    overridden: Object.keys(overrides) as Parameter[],
    timer: activeTimer(t, rows, products, now, opts.locale),
    units: opts.units ?? "metric",
    guidance: tubGuidance(t),
    now: now.toISOString(),
  };
}

// ------------------------------------------------------------------ the treatment log

const logSchema = z.object({
  productId: z.string({ error: "Choose the product you added." }).trim().min(1, "Choose the product you added."),
  amount: z.preprocess(
    (v) => (typeof v === "string" ? v.trim().replace(",", ".") : (v ?? "")),
    z.string({ error: "Give the amount you added." }).min(1, "Give the amount you added.").pipe(z.coerce.number({ error: "The amount must be a number." })),
  ),
  unit: z.enum(["g", "mL", "tablets"], { error: "Choose grams, millilitres or tablets." }),
  addedAt: z.string().optional(),
  parameter: z.string().optional(),
  readingId: z.string().optional(),
  note: z.string().max(500, "Keep the note under 500 characters.").optional(),
});

export type LogResult = { ok: true; id: string; retestAt: Date } | { ok: false; fields: Record<string, string>; locked?: boolean };

export async function recordTreatment(t: Tub, userId: string, form: FormData, now = new Date(), locale?: string): Promise<LogResult> {
  const parsed = logSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const issue of parsed.error.issues) fields[String(issue.path[0] ?? "form")] ??= issue.message;
    return { ok: false, fields };
  }
  const v = parsed.data;
  const fields: Record<string, string> = {};
  const products = await ownerProducts(t.ownerId);
  const product = products.find((p) => p.id === v.productId);
  if (!product) fields.productId = "That product is not in your product list.";
  if (!Number.isFinite(v.amount) || v.amount <= 0) fields.amount = "The amount must be above 0.";
  else if (v.amount > 20_000) fields.amount = `${v.amount} ${v.unit} is far more than any hot tub dose; check the amount and unit.`;
  if (product && !fields.amount) {
    const solid = product.form !== "liquid";
    if (v.unit === "mL" && solid) fields.unit = `${product.name} is a solid; give the amount in grams${product.form === "tablets" ? " or tablets" : ""}.`;
    if (v.unit === "g" && !solid) fields.unit = `${product.name} is a liquid; give the amount in millilitres.`;
    if (v.unit === "tablets" && product.form !== "tablets") fields.unit = `${product.name} does not come as tablets.`;
  }
  const zone = safeZone(t.timeZone);
  let addedAt = now;
  if (v.addedAt && v.addedAt.trim() !== "") {
    const at = fromLocalInput(v.addedAt, zone);
    if (!at) fields.addedAt = "Give the time as a date and time, for example 2025-06-03 14:35.";
    else if (at.getTime() > now.getTime() + 5 * 60_000) fields.addedAt = "That time is in the future; give the time you added it.";
    else if (at.getTime() < now.getTime() - 30 * 86400_000) fields.addedAt = "That is more than 30 days ago; give a recent time.";
    else addedAt = at;
  }
  let readingId: string | null = null;
  if (v.readingId) {
    const r = await db.query.reading.findFirst({ where: and(eq(reading.id, v.readingId), eq(reading.tubId, t.id)) }).catch(() => undefined);
    readingId = r ? r.id : null;
  }
  if (Object.keys(fields).length || !product) return { ok: false, fields };
  // The lock: nothing else goes in before the retest. Recording a dose already added stays possible, on purpose.
  const lockNow = activeTimer(t, await recentTreatments(t.id, 20), products, now, locale);
  if (lockNow && form.get("alreadyAdded") !== "1")
    return {
      ok: false,
      fields: {
        form: `Nothing should go in until ${lockNow.retestClock} (${lockNow.productName} was added${lockNow.shock ? " as a shock" : ""}; retest first). If you have already added it, tick “I already added it” to record it.`,
      },
      locked: true,
    };
  const { hours, shock } = waitHoursForLogged(product, { amount: v.amount, unit: v.unit, ...(form.get("shock") === "1" ? { shock: true } : {}) }, t.volumeLitres);
  const retestAt = new Date(addedAt.getTime() + hours * 3600_000);
  const parameter = v.parameter && v.parameter in DEFAULT_TARGETS[t.sanitiser] ? v.parameter : null;
  const [row] = await db
    .insert(treatment)
    .values({
      tubId: t.id,
      readingId,
      productId: product.id,
      productName: product.name,
      chemical: product.chemical,
      parameter,
      amount: v.amount,
      unit: v.unit,
      addedAt,
      retestAt: hours > 0 ? retestAt : null,
      shock,
      addedBy: userId,
      note: v.note?.trim() || null,
    })
    .returning();
  return { ok: true, id: row!.id, retestAt };
}

export async function deleteTreatment(tubId: string, id: string) {
  if (!isUuid(id)) return;
  await db.delete(treatment).where(and(eq(treatment.id, id), eq(treatment.tubId, tubId)));
}
