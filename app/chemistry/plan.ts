// The treatment plan. Routine care: sanitiser first, then total alkalinity, then pH, then calcium
// hardness. First fill: a start-up shock (bromine: a bromide reserve, then an oxidiser to activate
// it), then alkalinity, pH and hardness. One product per step; each later step waits for the retest,
// so its amount is an estimate from the water predicted after the earlier steps ("provisional").
//
// Safety rules the plan never breaks (each has a test):
// - no acid or base without a pH and an alkalinity reading; no calcium without a hardness reading;
// - an acid round never takes the predicted pH below ACID_ROUND_PH_FLOOR;
// - acid and base are never dosed in the same plan (after acid, pH rises by aeration);
// - no dose on top of a running wait (the lock in lock.ts);
// - no dose from an estimated value (calcium is dosed only from a calcium or total-hardness reading,
//   never from 70 % of total hardness).

import {
  ACID_BASE_EFFECT,
  afterDose,
  borateAlkalinity,
  closedWaterFromReading,
  cyanurateAlkalinity,
  doseForPh,
  eqPerLFromMgCaCO3,
  equilibriumPhWithAir,
  mgCaCO3FromEqPerL,
  pHOf,
  type AcidBaseEffect,
  type WaterState,
} from "./carbonate";
import { analyteName, analyteWord } from "./analytes";
import { CH_PER_FC_FROM_CAL_HYPO, CYA_PER_FC_FROM_DICHLOR, MOLAR_MASS } from "./constants";
import { alkalinityDose, bromideDose, bromineDose, chlorineDose, hardnessDose, labelDose, molarDose, type Amount } from "./doses";
import { activeLock } from "./lock";
import { BALANCED_BAND, langelier } from "./lsi";
import { DEFAULT_PRODUCTS, SHOCK_RISE, cautionsFor, generalCautions, pickProduct, roleOf, waitHoursFor, type ProductRole } from "./products";
import { guidanceProfile, resolveTargets } from "./targets";
import type {
  Guidance,
  Headline,
  Judgement,
  LoggedTreatment,
  Mode,
  Parameter,
  PlanStep,
  PredictedWater,
  Product,
  Range,
  Readings,
  SideEffect,
  SlowTrends,
  TargetRanges,
  Units,
  WaterBalance,
  WaterInput,
  WaterPlan,
} from "./types";
import { displayAmount, roundAmount, temperatureWords, volumeWords } from "./units";
import { drainIntervalDays } from "./volume";

export interface PlanOptions {
  now?: Date;
  treatmentLog?: LoggedTreatment[];
  targets?: Partial<Record<Parameter, Partial<Range>>>;
  products?: Product[];
  /** IANA time zone for the "retest after HH:MM" words; UTC by default. */
  timeZone?: string;
  /** BCP 47 locale for those words ("en-GB": 14:35, "en-US": 2:35 PM); en-GB by default. */
  locale?: string;
  guidance?: Guidance;
  units?: Units;
  mode?: Mode;
}

export const DEFAULT_TEMPERATURE_C = 38;
/** Typical spa TDS used for activity corrections when none is given (I = 0.0125). */
export const DEFAULT_TDS = 500;
/** Calcium share of total hardness, for the water-balance index only: 10 NYCRR §6-1.30 worked example uses 0.70 [P]. */
export const CALCIUM_SHARE_OF_TOTAL_HARDNESS = 0.7;
/** Lowest pH an acid round may take the water to (common practice for the aeration method). */
export const ACID_ROUND_PH_FLOOR = 7.0;
/** First-fill shock: 10 mg/L, as New York §6-1.25 superchlorinates spas while closed [P]. */
export const START_UP_SHOCK_MG_L = 10;
/** Bromide reserve for a new bromine tub: about 30 mg/L bromide (common practice, from memory; the label decides). */
export const BROMIDE_RESERVE_MG_L = 30;
/** Breakpoint: free chlorine to about 10 × combined chlorine (common practice; Maine App. A notes NSPI-2 shock). */
export const BREAKPOINT_FACTOR = 10;
/** TDS rise over the fill water that calls for a drain: Maine 10-144 CMR ch. 202 App. B, 1500 mg/L [P]. */
export const TDS_RISE_DRAIN = 1500;

export const AUTHORITY_NOTE =
  "Product labels, local codes and, for public or commercial spas, licensed operators decide; this plan is guidance for a private tub.";


const finite = (x: number | null | undefined): x is number => typeof x === "number" && Number.isFinite(x);
const r1 = (x: number) => Math.round(x * 10) / 10;
const r2 = (x: number) => Math.round(x * 100) / 100;
const unitOf = (p: Parameter) => (p === "ph" ? "" : " mg/L");
const fmt = (p: Parameter, x: number) => (p === "ph" ? r2(x).toFixed(1) : String(r1(x)));

/** When a dose went in, in the same zone and locale as the retest time: "at 14:35", or "on Tue 2 Dec, 14:35" on another day. */
function addedWords(d: Date, now: Date, timeZone: string, locale = "en-GB"): string {
  try {
    const day = (x: Date) => new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" }).format(x);
    if (day(d) === day(now)) return `at ${timeWords(d, timeZone, locale)}`;
    const s = new Intl.DateTimeFormat(locale, { weekday: "short", day: "numeric", month: "short", hour: "numeric", minute: "2-digit", timeZone }).format(d);
    return `on ${s}${timeZone === "UTC" ? " UTC" : ""}`;
  } catch {
    return `at ${d.toISOString().slice(0, 16).replace("T", " ")} UTC`;
  }
}

/** A clock time in the zone and the locale, as the app writes times (Intl, timeStyle short). */
function timeWords(d: Date, timeZone: string, locale = "en-GB"): string {
  try {
    const s = new Intl.DateTimeFormat(locale, { timeStyle: "short", timeZone }).format(d);
    return timeZone === "UTC" ? `${s} UTC` : s;
  } catch {
    return `${d.toISOString().slice(11, 16)} UTC`;
  }
}

function judge(parameter: Parameter, value: number | null, range: Range, judged: number | null = value): Judgement {
  const status = judged === null ? "not_measured" : judged < range.min ? "low" : judged > range.max ? "high" : "in_range";
  return { parameter, value: value === null ? null : r2(value), min: range.min, max: range.max, status };
}

/** The water as the plan moves through its steps. */
interface Sim {
  san: number | null;
  combined: number | null;
  ph: number | null;
  ta: number | null;
  ch: number | null;
  cya: number | null;
}

interface Ctx {
  volume: number;
  water: WaterState;
  products: Product[];
  targets: TargetRanges;
  notes: string[];
  steps: PlanStep[];
  units: Units;
  sanitiser: "chlorine" | "bromine";
  sim: Sim;
  acidDosed: boolean;
  baseDosed: boolean;
  /** Water was replaced: every reading must be taken again. */
  replaced?: boolean;
}

function pushStep(ctx: Ctx, s: Omit<PlanStep, "order" | "provisional">) {
  ctx.steps.push({ order: ctx.steps.length + 1, ...s, provisional: ctx.steps.length > 0 });
}

function doseStep(
  ctx: Ctx,
  product: Product,
  parameter: Parameter,
  direction: "raise" | "lower",
  from: number,
  to: number,
  amount: Amount,
  sideEffects: SideEffect[],
  extraWords = "",
  opts: { shock?: boolean; lead?: string } = {},
) {
  const hours = waitHoursFor(product, { shock: opts.shock });
  const shown = displayAmount(product, amount, ctx.units);
  const lead = opts.lead ?? `${direction === "raise" ? "Raise" : "Lower"} ${analyteWord(parameter)} from ${fmt(parameter, from)} to about ${fmt(parameter, to)}${unitOf(parameter)}`;
  const words =
    `${lead}: add ${shown.text} of ${product.name}. ${extraWords}` +
    (opts.shock
      ? `Cover off, jets on, nobody in the tub; retest after ${hours} h.`
      : hours > 0
        ? `Then wait ${hours < 1 ? `${Math.round(hours * 60)} min` : `${hours} h`} with the jets running and retest before the next step.`
        : "");
  pushStep(ctx, {
    kind: "dose",
    parameter,
    direction,
    from: r2(from),
    to: r2(to),
    chemical: product.chemical,
    productId: product.id,
    productName: product.name,
    grams: roundAmount(amount.grams),
    millilitres: roundAmount(amount.millilitres),
    tablets: amount.tablets === null ? null : Math.max(0.5, Math.round(amount.tablets * 2) / 2),
    ounces: shown.ounces,
    fluidOunces: shown.fluidOunces,
    kitchenMeasure: shown.kitchenMeasure,
    amountText: shown.text,
    shock: opts.shock ?? false,
    retestAfterHours: hours,
    words: words.replace(/\s+/g, " ").trim(),
    sideEffects,
    cautions: cautionsFor(product),
  });
  const role = roleOf(product);
  if (role === "acid") ctx.acidDosed = true;
  if (role === "alkalinity_up" || role === "ph_up") ctx.baseDosed = true;
}

function missingProduct(ctx: Ctx, what: string) {
  ctx.notes.push(`No ${what} product is in the catalogue, so the plan cannot give an amount; add one to the product list.`);
}

/** Main entry: validated input → plan. */
export function planTreatment(input: WaterInput, options: PlanOptions = {}): WaterPlan {
  const products = options.products ?? input.products ?? DEFAULT_PRODUCTS;
  const guidanceId = options.guidance ?? input.guidance ?? "us_home";
  const guidance = guidanceProfile(guidanceId);
  const targets = resolveTargets(input.sanitiser, { ...(input.targets ?? {}), ...(options.targets ?? {}) }, guidance.id);
  const units: Units = options.units ?? input.units ?? "metric";
  const mode: Mode = options.mode ?? input.mode ?? "routine";
  const notes: string[] = [];
  const setTemperatureC = finite(input.setTemperatureC) ? input.setTemperatureC : finite(input.temperatureC) ? input.temperatureC : DEFAULT_TEMPERATURE_C;
  const temperatureC = finite(input.temperatureC) ? input.temperatureC : setTemperatureC;
  if (!finite(input.temperatureC) && !finite(input.setTemperatureC)) notes.push(`No water temperature given; the plan assumes ${temperatureWords(DEFAULT_TEMPERATURE_C, units)}.`);
  if (Math.max(temperatureC, setTemperatureC) > 40) notes.push("The water is above 40 °C (104 °F), the usual upper limit for hot tubs (CDC); turn the heater down.");
  notes.push(`Ranges follow ${guidance.name}; the tub's settings can choose other guidance.`);
  const rd: Readings = input.readings ?? {};
  const val = (x: number | null | undefined) => (finite(x) ? x : null);
  const now = options.now ?? (input.now ? new Date(input.now) : new Date());
  const timeZone = options.timeZone ?? "UTC";
  const locale = options.locale ?? "en-GB";

  // Calcium: a calcium reading, or total hardness as an upper bound (calcium is part of it).
  const chMeasured = val(rd.calcium_hardness);
  const th = val(rd.total_hardness);
  const chBound = chMeasured ?? th; // what a dose may rely on: never more calcium than this
  const chForBalance = chMeasured ?? (th !== null ? th * CALCIUM_SHARE_OF_TOTAL_HARDNESS : null);
  if (chMeasured === null && th !== null)
    notes.push(`Calcium was not measured: the water balance uses 70 % of total hardness (${r1(th * CALCIUM_SHARE_OF_TOTAL_HARDNESS)} mg/L, as in the New York §6-1.30 example), an estimate; no dose is based on it. A calcium test is better.`);
  const cya = val(rd.cyanuric_acid);
  const water: WaterState = { temperatureC, tds: finite(input.tds) ? input.tds : DEFAULT_TDS, cyanuricAcid: cya ?? 0, boron: val(rd.borate) ?? 0 };
  const phRaw = val(rd.ph);
  const ta = val(rd.total_alkalinity);
  const sanParam: Parameter = input.sanitiser === "chlorine" ? "free_chlorine" : "bromine";

  // Sanitiser reading. A bromine tub with only a chlorine pad: total bromine = chlorine-scale reading × 2.25 (MAHC Annex 5.7.3.1.2.2 [P]).
  let san = val(input.sanitiser === "chlorine" ? rd.free_chlorine : rd.bromine);
  if (input.sanitiser === "bromine" && san === null) {
    const clScale = val(rd.total_chlorine) ?? val(rd.free_chlorine);
    if (clScale !== null) {
      san = r1(clScale * 2.25);
      notes.push(`No bromine pad was read: bromine taken as the chlorine pad's ${clScale} mg/L × 2.25 = ${san} mg/L (MAHC Annex 5.7.3.1.2.2).`);
    }
  } else if (input.sanitiser === "bromine" && finite(rd.free_chlorine) && rd.free_chlorine > 0) {
    notes.push("A chlorine pad was read in a bromine tub; the plan used the bromine reading.");
  }
  if (input.sanitiser === "chlorine" && finite(rd.bromine) && rd.bromine > 0) notes.push("A bromine reading was given for a chlorine tub; it was not used.");
  if (mode === "first_fill" && san === null) {
    san = 0;
    notes.push("First fill: fresh water is taken to have no sanitiser.");
  }
  const combined = input.sanitiser === "chlorine" && finite(rd.total_chlorine) && san !== null ? Math.max(0, r2(rd.total_chlorine - san)) : null;

  // pH readings outside what any spa reaches are more likely a bad test than bad water.
  const phUsable = phRaw !== null && phRaw >= 5.5 && phRaw <= 9.5;
  if (phRaw !== null && !phUsable)
    notes.push(`A pH of ${phRaw} is far outside what hot tub water reaches; retest with a fresh strip or a liquid kit before adding any pH or alkalinity product.`);
  const ph = phUsable ? phRaw : null;

  // Total alkalinity is judged as carbonate alkalinity: TA minus the cyanurate share (chemistry.md §3.3, §4.1).
  const taJudged = ta !== null && ph !== null && ((cya ?? 0) >= 1 || water.boron > 0) ? Math.max(0, ta - cyanurateAlkalinity(ph, water) - borateAlkalinity(ph, water)) : ta;
  if (ta !== null && taJudged !== null && taJudged !== ta)
    notes.push(`Total alkalinity ${r1(ta)} mg/L includes about ${r1(ta - taJudged)} mg/L from cyanuric acid; the range check uses the carbonate alkalinity, ${r1(taJudged)} mg/L (chemistry.md §3.3).`);

  const judgements: Judgement[] = [
    judge(sanParam, san, targets[sanParam]),
    judge("ph", phRaw, targets.ph),
    { ...judge("total_alkalinity", ta, targets.total_alkalinity, taJudged), judgedValue: taJudged === null ? null : r1(taJudged) },
    chMeasured !== null
      ? judge("calcium_hardness", chMeasured, targets.calcium_hardness)
      : th !== null
        ? { ...judge("calcium_hardness", chForBalance, targets.calcium_hardness, th < targets.calcium_hardness.min ? th : chForBalance), estimated: true }
        : judge("calcium_hardness", null, targets.calcium_hardness),
  ];
  if (input.sanitiser === "chlorine") judgements.push(judge("cyanuric_acid", cya, targets.cyanuric_acid));
  if (combined !== null)
    judgements.push({ parameter: "combined_chlorine", value: combined, min: 0, max: guidance.combinedChlorineMax, status: combined > guidance.combinedChlorineMax ? "high" : "in_range" });
  for (const j of judgements)
    if (j.status === "not_measured" && j.parameter !== "cyanuric_acid" && j.parameter !== "combined_chlorine")
      notes.push(`${analyteName(j.parameter)} was not measured, so the plan could not judge it.`);

  const drain = finite(input.bathersPerDay) && input.bathersPerDay > 0 ? drainIntervalDays(input.volumeLitres, input.bathersPerDay) : null;
  if (drain !== null)
    notes.push(`Drain and refill about every ${drain} days at ${input.bathersPerDay} bathers a day (Maine 10-144 CMR ch. 202 App. B formula), or sooner if the water turns cloudy or foamy.`);

  const ctx: Ctx = {
    volume: input.volumeLitres,
    water,
    products,
    targets,
    notes,
    steps: [],
    units,
    sanitiser: input.sanitiser,
    sim: { san, combined, ph, ta, ch: chBound, cya },
    acidDosed: false,
    baseDosed: false,
  };

  const finish = (lockUntil: Date | null = null): WaterPlan => {
    if (ctx.steps.filter((s) => s.kind === "dose").length > 1)
      notes.push("Amounts after the first step are estimates from the water predicted after the earlier steps; retest and make a new plan before each one.");
    notes.push("One product at a time: never add the next product until the retest for the one before.");
    notes.push(AUTHORITY_NOTE);
    const waterBalance = balance(ph, ta, chForBalance, temperatureC, setTemperatureC, water, input.tds, targets, taJudged, chMeasured === null && th !== null);
    const predicted = predict(ctx, { now, timeZone, locale, lockUntil, temperatureC, setTemperatureC, chEstimated: chMeasured === null, th, tds: input.tds });
    const trends = slowTrends(ctx, input, { cya, ch: chMeasured, products, bathersPerDay: finite(input.bathersPerDay) ? input.bathersPerDay : 2 });
    const headline = makeHeadline(ctx, { judgements, lockUntil, timeZone, locale, predicted, san, combined, guidanceMax: guidance.combinedChlorineMax, mode });
    return {
      headline,
      steps: ctx.steps,
      waterBalance,
      predicted,
      judgements,
      drainIntervalDays: drain,
      trends,
      guidance: { id: guidance.id, name: guidance.name },
      mode,
      units,
      notes,
    };
  };

  // 0. Something added recently: wait, never dose on top.
  const log = options.treatmentLog ?? input.treatmentLog ?? [];
  const lock = activeLock(log, { products, volumeLitres: input.volumeLitres, now });
  if (lock) {
    const at = new Date(lock.until);
    const hoursLeft = Math.max(0.1, Math.ceil(((at.getTime() - now.getTime()) / 3600_000) * 10) / 10);
    const product = products.find((p) => p.id === lock.productId) ?? DEFAULT_PRODUCTS.find((p) => p.id === lock.productId) ?? null;
    const role = product ? roleOf(product) : null;
    pushStep(ctx, {
      kind: "wait",
      parameter: role ? ROLE_PARAMETER[role] : null,
      direction: "wait",
      from: null,
      to: null,
      chemical: lock.chemical,
      productId: lock.productId,
      productName: product?.name ?? null,
      grams: null,
      millilitres: null,
      retestAfterHours: hoursLeft,
      retestAt: lock.until,
      shock: lock.shock,
      words: `Wait — retest after ${timeWords(at, timeZone, locale)}. ${lock.productName} was added ${addedWords(new Date(lock.addedAt), now, timeZone, locale)}${lock.shock ? " as a shock" : ""} and needs time to mix and act.`,
      sideEffects: [],
      cautions: [
        "Do not add another product (or a second dose) until the retest.",
        "Keep everyone out of the tub until the retest shows sanitiser and pH in range.",
        "Keep the jets running so the product mixes.",
        "Store the opened product closed, away from children and pets.",
      ],
    });
    notes.push("A product was added recently; the next amounts depend on the retest, so the plan waits.");
    return finish(at);
  }

  // 0a. Dissolved solids far above the fill water: drain and refill first (Maine 10-144 CMR ch. 202 App. B [P]); nothing dosed into old water.
  if (finite(input.tds) && finite(input.fillTds) && input.tds - input.fillTds > TDS_RISE_DRAIN) {
    replaceWater(ctx, 1, `Dissolved solids are ${r1(input.tds - input.fillTds)} mg/L above the fill water (more than ${TDS_RISE_DRAIN}, Maine 10-144 CMR ch. 202 App. B): old water foams and resists treatment. Drain the tub and refill with fresh water, then start again with the first-fill steps.`, "tds");
    return finish();
  }

  // 0b. Stabiliser too high in a chlorine tub: only water replacement lowers it, and it changes everything else.
  const cyaRange = targets.cyanuric_acid;
  if (input.sanitiser === "chlorine" && cya !== null && cya > cyaRange.max) {
    const aimCya = Math.max(10, Math.min(cyaRange.aim, cyaRange.max * 0.8));
    const fraction = Math.min(1, 1 - aimCya / cya);
    replaceWater(ctx, fraction, `Cyanuric acid is ${cya} mg/L, above ${cyaRange.max}; no product lowers it. Replace about ${Math.round(fraction * 100)} % of the water (${volumeWords(fraction * input.volumeLitres, units)}) with fresh water, run the jets 2 h, then retest all pads.`, "cyanuric_acid");
    ctx.sim.cya = r1(cya * (1 - fraction));
    notes.push("After refilling, retest every pad and make a new plan: fresh water changes all the readings.");
    return finish();
  }
  if (input.sanitiser === "bromine" && cya !== null && cya > 0)
    notes.push(`Cyanuric acid (${cya} mg/L) does not stabilise bromine and is not needed in a bromine tub; it leaves with the next water change (no drain needed for it).`);

  // 1. Sanitiser (first fill: the start-up shock; bromine: the bromide reserve first).
  if (mode === "first_fill") firstFillSanitiser(ctx, san ?? 0, cya, guidance.combinedChlorineMax);
  else sanitiserStage(ctx, san, cya, combined, guidance.combinedChlorineMax);

  // 2. Total alkalinity, 3. pH: acids and bases need both readings.
  if (ph === null && (ta !== null || phRaw !== null)) {
    if (ta !== null && (taJudged! < targets.total_alkalinity.min || taJudged! > targets.total_alkalinity.max))
      notes.push(`Measure pH first: total alkalinity is out of range, but acid or alkali added without a pH reading can push pH out of the safe range.`);
  } else if (ph !== null && ta === null) {
    if (ph < targets.ph.min || ph > targets.ph.max)
      notes.push("Total alkalinity was not measured; the pH dose depends on it, so measure total alkalinity before adjusting pH.");
  } else if (ph !== null && ta !== null) {
    alkalinityStage(ctx, taJudged!);
    phStage(ctx);
  } else if (mode === "first_fill") {
    notes.push("Test the new water's pH and total alkalinity after the shock has mixed (30 minutes), then make a new plan for the alkalinity and pH steps.");
  }

  // 4. Calcium hardness.
  hardnessStage(ctx, chMeasured, th);

  return finish();
}

/** Replace part (or all) of the water: everything but what was asked for must be measured again. */
function replaceWater(ctx: Ctx, fraction: number, words: string, what: "cyanuric_acid" | "tds") {
  const litres = fraction * ctx.volume;
  pushStep(ctx, {
    kind: "replace_water",
    parameter: what === "cyanuric_acid" ? "cyanuric_acid" : null,
    direction: "lower",
    from: what === "cyanuric_acid" ? ctx.sim.cya : null,
    to: what === "cyanuric_acid" && ctx.sim.cya !== null ? r1(ctx.sim.cya * (1 - fraction)) : null,
    chemical: "fresh_water",
    productId: null,
    productName: null,
    grams: null,
    millilitres: null,
    litres: roundAmount(litres),
    amountText: `${volumeWords(litres, ctx.units)} of water`,
    retestAfterHours: 2,
    words,
    sideEffects: [],
    cautions: [
      "Switch the tub's power off before draining; refill before switching the heater back on.",
      "Drain where local rules allow; chlorinated water can harm plants and streams.",
      ...generalCautions(),
    ],
  });
  // fresh water changes every reading: the plan predicts none of them
  ctx.sim = { san: null, combined: null, ph: null, ta: null, ch: null, cya: what === "tds" ? null : ctx.sim.cya };
  ctx.replaced = true;
}

const ROLE_PARAMETER: Record<ProductRole, Parameter | null> = {
  chlorine: "free_chlorine",
  bromine: "bromine",
  bromide: "bromine",
  oxidiser: null,
  alkalinity_up: "total_alkalinity",
  ph_up: "ph",
  acid: "ph",
  hardness_up: "calcium_hardness",
  antifoam: null,
};

function chlorineSideEffects(ctx: Ctx, product: Product, delta: number): { effects: SideEffect[]; extra: string } {
  const effects: SideEffect[] = [];
  let extra = "";
  if (product.chemical.startsWith("sodium_dichloroisocyanurate")) {
    const dCya = delta * CYA_PER_FC_FROM_DICHLOR;
    const base = ctx.sim.cya ?? 0;
    effects.push({ parameter: "cyanuric_acid", change: r1(dCya), to: r1(base + dCya), words: `Adds about ${r1(dCya)} mg/L cyanuric acid (0.91 mg/L per mg/L chlorine from dichlor).` });
    extra = "Dichlor is close to pH-neutral. ";
    if (ctx.sim.cya !== null && ctx.sanitiser === "chlorine" && base + dCya > ctx.targets.cyanuric_acid.max)
      ctx.notes.push("Cyanuric acid will pass its maximum with this dose; plan a partial water change or switch to an unstabilised chlorine.");
    if (ctx.sim.cya !== null) ctx.sim.cya = r1(base + dCya);
  } else if (product.chemical === "calcium_hypochlorite") {
    const dCh = delta * CH_PER_FC_FROM_CAL_HYPO;
    effects.push({ parameter: "calcium_hardness", change: r1(dCh), to: r1((ctx.sim.ch ?? 0) + dCh), words: `Adds about ${r1(dCh)} mg/L calcium hardness (0.71 mg/L per mg/L chlorine).` });
    extra = "Calcium hypochlorite raises pH slightly. ";
    if (ctx.sim.ch !== null) ctx.sim.ch = r1(ctx.sim.ch + dCh);
  } else if (product.chemical === "sodium_hypochlorite") {
    extra = "Sodium hypochlorite raises pH slightly. ";
  }
  return { effects, extra };
}

function sanitiserStage(ctx: Ctx, san: number | null, cya: number | null, combined: number | null, ccMax: number) {
  const param: Parameter = ctx.sanitiser === "chlorine" ? "free_chlorine" : "bromine";
  const range = ctx.targets[param];
  void cya;
  if (san === null) return;
  if (san > range.max) {
    ctx.notes.push(
      `${analyteName(param)} is ${san} mg/L, above ${range.max}: add no sanitiser and keep everyone out until it falls into range (cover off, jets on).` +
        (san > 10 ? " Above 10 mg/L with bathers present is an imminent health hazard in the Model Aquatic Health Code." : ""),
    );
    return;
  }
  // Combined chlorine: break it (breakpoint chlorination), or oxidise it with a non-chlorine shock.
  if (ctx.sanitiser === "chlorine" && combined !== null && combined > ccMax) {
    const mps = pickProduct(ctx.products, "oxidiser");
    if (mps && san >= range.min && mps.labelRatePer1000L) {
      const amount = labelDose(mps, ctx.volume);
      doseStep(ctx, mps, "free_chlorine", "raise", san, san, amount, [], `Combined chlorine is ${combined} mg/L (above ${ccMax}): the non-chlorine shock oxidises it without raising free chlorine (label-style rate ${mps.labelRatePer1000L} g per 1000 L; the label decides). Cover off, jets on. `, {
        lead: `Oxidise combined chlorine (${combined} mg/L)`,
      });
      ctx.sim.combined = 0;
      return;
    }
    const product = pickProduct(ctx.products, "chlorine");
    if (!product) return missingProduct(ctx, "chlorine");
    const target = Math.max(range.aim, r1(BREAKPOINT_FACTOR * combined));
    const delta = target - san;
    const amount = chlorineDose(product, delta, ctx.volume);
    const { effects, extra } = chlorineSideEffects(ctx, product, delta);
    doseStep(ctx, product, "free_chlorine", "raise", san, target, amount, effects, `Combined chlorine is ${combined} mg/L (above ${ccMax}): breakpoint chlorination takes free chlorine to about 10 × combined, which burns off the chloramines. ${extra}`, {
      shock: delta > SHOCK_RISE.chlorine,
      lead: `Break the combined chlorine: raise free chlorine from ${r1(san)} to about ${target} mg/L`,
    });
    ctx.sim.san = target;
    ctx.sim.combined = 0;
    return;
  }
  if (san >= range.min) return;
  const delta = range.aim - san;
  if (ctx.sanitiser === "chlorine") {
    const product = pickProduct(ctx.products, "chlorine");
    if (!product) return missingProduct(ctx, "chlorine");
    const amount = chlorineDose(product, delta, ctx.volume);
    const { effects, extra } = chlorineSideEffects(ctx, product, delta);
    doseStep(ctx, product, param, "raise", san, range.aim, amount, effects, extra);
  } else {
    const product = pickProduct(ctx.products, "bromine");
    if (!product) return missingProduct(ctx, "bromine");
    const amount = bromineDose(product, delta, ctx.volume);
    const extra = product.form === "tablets" ? "Tablets dissolve slowly in a floater; the rise takes hours. " : "";
    doseStep(ctx, product, param, "raise", san, range.aim, amount, [], extra);
  }
  ctx.sim.san = range.aim;
}

/** New water: a start-up shock well above the routine aim; bromine first builds a bromide reserve. */
function firstFillSanitiser(ctx: Ctx, san: number, cya: number | null, ccMax: number) {
  void cya;
  void ccMax;
  if (ctx.sanitiser === "chlorine") {
    const product = pickProduct(ctx.products, "chlorine");
    if (!product) return missingProduct(ctx, "chlorine");
    const target = Math.max(START_UP_SHOCK_MG_L, san);
    if (target <= san) return;
    const delta = target - san;
    const amount = chlorineDose(product, delta, ctx.volume);
    const { effects, extra } = chlorineSideEffects(ctx, product, delta);
    doseStep(ctx, product, "free_chlorine", "raise", san, target, amount, effects, `New water: a start-up shock to ${target} mg/L (New York §6-1.25 superchlorinates spas to 10 mg/L while closed) clears what came in with the fill. ${extra}`, {
      shock: true,
      lead: `Start-up shock: raise free chlorine from ${r1(san)} to about ${target} mg/L`,
    });
    ctx.sim.san = target;
    return;
  }
  // Bromine: 1) bromide reserve, 2) an oxidiser turns it into bromine (shock level), 3) tablets keep it up.
  const bromide = pickProduct(ctx.products, "bromide");
  if (!bromide) missingProduct(ctx, "sodium bromide (bromide reserve)");
  else {
    const amount = bromideDose(bromide, BROMIDE_RESERVE_MG_L, ctx.volume);
    doseStep(ctx, bromide, "bromine", "raise", san, san, amount, [], `This is not a sanitiser yet: the next step's oxidiser turns the bromide into bromine. `, {
      lead: `Build the bromide reserve (about ${BROMIDE_RESERVE_MG_L} mg/L bromide, common practice)`,
    });
  }
  const target = Math.max(START_UP_SHOCK_MG_L, san);
  const delta = target - san;
  // Oxidiser: unstabilised chlorine first (no cyanuric acid in a bromine tub), then a non-chlorine shock, then any chlorine.
  const chlorines = ctx.products.filter((p) => roleOf(p) === "chlorine");
  const oxidiser = chlorines.find((p) => !p.chemical.startsWith("sodium_dichloroisocyanurate")) ?? pickProduct(ctx.products, "oxidiser") ?? chlorines[0] ?? null;
  if (!oxidiser) return missingProduct(ctx, "oxidiser (shock)");
  let amount: Amount;
  let extra = "";
  if (roleOf(oxidiser) === "oxidiser") {
    amount = labelDose(oxidiser, ctx.volume);
    extra = `Label-style rate ${oxidiser.labelRatePer1000L} g per 1000 L (the label decides). `;
  } else {
    // Each Cl2-equivalent oxidises one Br⁻ to one HOBr (as Br2): mg/L Cl2 = mg/L Br2 × M(Cl2)/M(Br2) (stoichiometry).
    amount = chlorineDose(oxidiser, delta * (MOLAR_MASS.Cl2 / MOLAR_MASS.Br2), ctx.volume);
    if (oxidiser.chemical.startsWith("sodium_dichloroisocyanurate")) extra = "Dichlor leaves cyanuric acid, which bromine does not need; an unstabilised chlorine is better for bromine tubs. ";
  }
  doseStep(ctx, oxidiser, "bromine", "raise", san, target, amount, [], `The oxidiser turns the bromide reserve into bromine. ${extra}Afterwards keep bromine at ${ctx.targets.bromine.min}–${ctx.targets.bromine.max} mg/L with bromine tablets in a floater. `, {
    shock: true,
    lead: `Activate the bromide: shock to about ${target} mg/L bromine`,
  });
  ctx.sim.san = target;
}

function acidOrBase(product: Product): AcidBaseEffect {
  return ACID_BASE_EFFECT[product.chemical as keyof typeof ACID_BASE_EFFECT];
}

/** Alkalinity stage on the carbonate alkalinity (TA minus cyanurate); sim.ph and sim.ta are set. */
function alkalinityStage(ctx: Ctx, taJudged: number) {
  const range = ctx.targets.total_alkalinity;
  const phRange = ctx.targets.ph;
  const ta = ctx.sim.ta!;
  const ph = ctx.sim.ph!;
  if (taJudged >= range.min && taJudged <= range.max) return;
  if (taJudged < range.min) {
    const product = pickProduct(ctx.products, "alkalinity_up");
    if (!product) return missingProduct(ctx, "alkalinity increaser");
    const delta = range.aim - taJudged;
    const amount = alkalinityDose(product, delta, ctx.volume);
    const effect = acidOrBase(product);
    const w0 = closedWaterFromReading(ph, ta, ctx.water);
    const newPh = pHOf(afterDose(w0, effect, eqPerLFromMgCaCO3(delta) / effect.alkEqPerMol), ctx.water);
    const effects: SideEffect[] = [{ parameter: "ph", change: r2(newPh - ph), to: r2(newPh), words: `Moves pH a little, to about ${r2(newPh).toFixed(2)}.` }];
    if (ph < phRange.min) ctx.notes.push("Low alkalinity and low pH: raise alkalinity with bicarbonate first; then pH climbs with aeration, and soda ash is rarely needed.");
    if (ph > phRange.max) ctx.notes.push("Low alkalinity with high pH (typical of soft water): raise alkalinity first; after the retest a new plan lowers pH with a little acid.");
    doseStep(ctx, product, "total_alkalinity", "raise", ta, ta + delta, amount, effects, product.chemical === "sodium_bicarbonate" ? "Bicarbonate moves pH only a little. " : "");
    ctx.sim.ta = ta + delta;
    ctx.sim.ph = newPh;
    return;
  }
  // TA too high: acid in rounds. Keep pH from falling below the round floor; aerate between rounds.
  const product = pickProduct(ctx.products, "acid");
  if (!product) return missingProduct(ctx, "acid (pH decreaser)");
  const effect = acidOrBase(product);
  const floor = Math.max(ACID_ROUND_PH_FLOOR, Math.min(phRange.min, ACID_ROUND_PH_FLOOR));
  let w0 = closedWaterFromReading(ph, ta, ctx.water);
  let startPh = ph;
  if (ph <= floor + 0.05) {
    // pH already low: aerate first (raises pH without changing alkalinity), then acid.
    const toPh = Math.min(phRange.max, equilibriumPhWithAir(w0.alk, ctx.water));
    pushAerationStep(ctx, ph, toPh, "pH is low but alkalinity is high: do not add soda ash.");
    w0 = closedWaterFromReading(toPh, ta, ctx.water);
    startPh = toPh;
  }
  const wantEq = eqPerLFromMgCaCO3(taJudged - range.aim);
  let n = wantEq / -effect.alkEqPerMol;
  let after = afterDose(w0, effect, n);
  let newPh = pHOf(after, ctx.water);
  let capped = false;
  if (newPh < floor) {
    const nFloor = doseForPh(w0, effect, floor, ctx.water);
    n = nFloor !== null && nFloor > 0 ? nFloor : 0;
    after = afterDose(w0, effect, n);
    newPh = pHOf(after, ctx.water);
    capped = true;
  }
  if (n <= 0) {
    ctx.notes.push("Alkalinity is high but pH is already at the lowest an acid round may reach; aerate first, retest, then make a new plan.");
    return;
  }
  const newTa = mgCaCO3FromEqPerL(after.alk);
  const amount = molarDose(product, n, ctx.volume);
  const effects: SideEffect[] = [
    { parameter: "ph", change: r2(newPh - startPh), to: r2(newPh), words: `Lowers pH to about ${r2(newPh).toFixed(2)} (closed-system carbonate balance at ${ctx.water.temperatureC} °C).` },
  ];
  if (capped) {
    const rounds = acidRounds(ctx, ta, startPh, range.aim + (ta - taJudged), effect, floor);
    ctx.notes.push(
      `High alkalinity${startPh > phRange.max ? " and high pH" : ""} (typical of hard fill water): lower alkalinity in rounds. Add the acid, then run the jets and blower with the cover off for a few hours so pH climbs back without changing alkalinity, retest, and repeat${rounds > 1 ? ` — about ${rounds} rounds` : ""}.`,
    );
  }
  doseStep(ctx, product, "total_alkalinity", "lower", ta, newTa, amount, effects, capped ? `This is one round; pH must not fall below ${floor.toFixed(1)}. ` : "");
  ctx.sim.ta = newTa;
  ctx.sim.ph = newPh;
}

/** Rounds of (acid to the pH floor, aerate back to startPh) needed to bring TA down to the aim. */
function acidRounds(ctx: Ctx, ta: number, startPh: number, aimTa: number, effect: AcidBaseEffect, floor: number): number {
  let cur = ta;
  for (let i = 1; i <= 12; i++) {
    const w0 = closedWaterFromReading(startPh, cur, ctx.water);
    const n = doseForPh(w0, effect, floor, ctx.water);
    if (n === null || n <= 0) return i;
    cur = mgCaCO3FromEqPerL(afterDose(w0, effect, n).alk);
    if (cur <= aimTa + 1) return i;
  }
  return 12;
}

function phStage(ctx: Ctx) {
  const range = ctx.targets.ph;
  const taRange = ctx.targets.total_alkalinity;
  const ta = ctx.sim.ta!;
  const ph = ctx.sim.ph!;
  if (ph >= range.min && ph <= range.max) return;
  const w0 = closedWaterFromReading(ph, ta, ctx.water);
  const airPh = equilibriumPhWithAir(w0.alk, ctx.water);
  if (ph < range.min) {
    // Open system: water holding more CO2 than air loses it when aerated, and pH rises with no chemical.
    const aerate = (why: string) => {
      const toPh = Math.min(range.aim, airPh);
      pushAerationStep(ctx, ph, toPh, why);
      ctx.sim.ph = toPh;
    };
    if (ctx.acidDosed) return aerate("Acid went in earlier in this plan: raise pH by aeration, not by a base, so the two do not undo each other.");
    if (ta > taRange.max) return aerate("pH is low but alkalinity is high: do not add soda ash.");
    const product = pickProduct(ctx.products, "ph_up");
    if (!product) return aerate("No pH increaser is in the catalogue.");
    const effect = acidOrBase(product);
    const n = doseForPh(w0, effect, range.aim, ctx.water);
    const newTa = n === null ? Infinity : mgCaCO3FromEqPerL(afterDose(w0, effect, n).alk);
    if (n === null || newTa > taRange.max)
      return aerate(`Soda ash would push alkalinity above ${taRange.max} mg/L here (the water holds extra carbon dioxide); aeration lets it escape instead.`);
    const effects: SideEffect[] = [
      { parameter: "total_alkalinity", change: r1(newTa - ta), to: r1(newTa), words: `Raises total alkalinity by about ${r1(newTa - ta)} mg/L (soda ash adds 2 equivalents per mole).` },
    ];
    doseStep(ctx, product, "ph", "raise", ph, range.aim, molarDose(product, n, ctx.volume), effects);
    ctx.sim.ph = range.aim;
    ctx.sim.ta = newTa;
    return;
  }
  if (ctx.baseDosed) {
    ctx.notes.push(`pH (${r2(ph).toFixed(1)}) is above ${range.max}: after the retest, a new plan lowers it with acid. Acid and alkali never go in the same plan.`);
    return;
  }
  const product = pickProduct(ctx.products, "acid");
  if (!product) return missingProduct(ctx, "pH decreaser");
  const effect = acidOrBase(product);
  const n = doseForPh(w0, effect, Math.max(range.aim, ACID_ROUND_PH_FLOOR), ctx.water);
  if (n === null || n <= 0) return void ctx.notes.push("The pH decreaser cannot reach the target pH in this water; retest.");
  const newTa = mgCaCO3FromEqPerL(afterDose(w0, effect, n).alk);
  const effects: SideEffect[] = [
    { parameter: "total_alkalinity", change: r1(newTa - ta), to: r1(newTa), words: `Lowers total alkalinity by about ${r1(ta - newTa)} mg/L (acid removes alkalinity one equivalent per equivalent).` },
  ];
  if (newTa < taRange.min)
    ctx.notes.push(`The acid will take alkalinity down to about ${r1(newTa)} mg/L, below its range (soft water): after the retest, expect a small bicarbonate dose again; keep each round small.`);
  doseStep(ctx, product, "ph", "lower", ph, range.aim, molarDose(product, n, ctx.volume), effects, "pH drifts up again as the jets run (CO2 escapes); that is normal. ");
  ctx.sim.ph = range.aim;
  ctx.sim.ta = newTa;
}

function hardnessStage(ctx: Ctx, chMeasured: number | null, th: number | null) {
  const range = ctx.targets.calcium_hardness;
  if (chMeasured === null && th === null) return;
  if (chMeasured !== null && chMeasured > range.max) {
    ctx.notes.push(`Calcium hardness is ${r1(chMeasured)} mg/L, above ${range.max}: no product lowers it; keep pH and alkalinity at the low end of their ranges, or replace part of the water with softer water.`);
    return;
  }
  // Calcium is dosed only from a reading: a calcium test, or total hardness (calcium is at most that much).
  const base = chMeasured ?? th!;
  if (base >= range.min) {
    if (chMeasured === null && th! > range.max) ctx.notes.push(`Total hardness is ${r1(th!)} mg/L: measure calcium hardness; if it is above ${range.max}, replace part of the water with softer water.`);
    return;
  }
  const product = pickProduct(ctx.products, "hardness_up");
  if (!product) return missingProduct(ctx, "calcium hardness increaser");
  const from = ctx.sim.ch ?? base;
  if (from >= range.min) return;
  const extra =
    chMeasured === null
      ? `Total hardness is ${r1(th!)} mg/L, so calcium is at most that: this amount cannot overshoot; a calcium test gives the exact figure. `
      : "";
  doseStep(ctx, product, "calcium_hardness", "raise", from, range.aim, hardnessDose(product, range.aim - from, ctx.volume), [], `${extra}Calcium chloride does not change pH or alkalinity noticeably. `);
  ctx.sim.ch = range.aim;
}

function balanceAdvice(verdict: "corrosive" | "balanced" | "scaling", ph: number, taJudged: number, ch: number, phs: number, targets: TargetRanges, chEstimated: boolean): string[] {
  const advice: string[] = [];
  const t = targets;
  if (verdict === "corrosive") {
    if (ph < t.ph.max) advice.push(`Raising pH toward ${r2(Math.min(t.ph.max, phs)).toFixed(1)} (within the pH range) moves it toward balance.`);
    if (taJudged < t.total_alkalinity.min) advice.push("Bring total alkalinity up into its range with sodium bicarbonate.");
    if (ch < t.calcium_hardness.min) advice.push(chEstimated ? "Calcium may be low: measure calcium hardness; if it is low, raise it with calcium chloride." : "Calcium hardness is low: raise it with calcium chloride.");
    if (advice.length === 0) advice.push("Every reading is inside its range; aim pH and alkalinity toward the upper half of their ranges.");
  } else if (verdict === "scaling") {
    if (ph > t.ph.min) advice.push(`Lowering pH toward ${r2(Math.max(t.ph.min, phs)).toFixed(1)} (within the pH range) moves it toward balance.`);
    if (taJudged > t.total_alkalinity.aim) advice.push("Keep total alkalinity at the low end of its range.");
    if (ch > t.calcium_hardness.max) advice.push("Calcium hardness is high: replace part of the water with softer water; no product lowers hardness.");
    if (advice.length === 0) advice.push("Every reading is inside its range; aim pH and alkalinity toward the lower half of their ranges.");
  }
  return advice;
}

function balance(
  ph: number | null,
  ta: number | null,
  ch: number | null,
  temperatureC: number,
  setTemperatureC: number,
  water: WaterState,
  tds: number | undefined,
  targets: TargetRanges,
  taJudged: number | null,
  chEstimated: boolean,
): WaterBalance {
  const method = "Langelier index, factor method of 10 NYCRR §6-1.30 / Montana ARM 37.115 Table 7, with carbonate alkalinity";
  if (ph === null || ta === null || ch === null)
    return {
      lsi: null,
      verdict: null,
      words: "Water balance needs pH, total alkalinity and hardness readings.",
      advice: [],
      method,
      calciteSaturationIndex: null,
      temperatureC,
      lsiAtSetTemperature: null,
      setTemperatureC,
    };
  const r = langelier({ ph, totalAlkalinity: ta, calciumHardness: ch, temperatureC, cyanuricAcid: water.cyanuricAcid, boron: water.boron, tds: tds ?? null });
  const atSet = langelier({ ph, totalAlkalinity: ta, calciumHardness: ch, temperatureC: setTemperatureC, cyanuricAcid: water.cyanuricAcid, boron: water.boron, tds: tds ?? null });
  let words = r.words + (chEstimated ? " (calcium estimated from total hardness)" : "");
  if (Math.abs(setTemperatureC - temperatureC) >= 3)
    words += ` At the tub's running temperature (${setTemperatureC} °C) the index is ${atSet.lsi >= 0 ? "+" : ""}${r2(atSet.lsi).toFixed(2)}${atSet.verdict !== r.verdict ? `: ${atSet.verdict === "scaling" ? "it will tend to scale once heated" : atSet.verdict === "corrosive" ? "it will tend to corrode once cooled" : "balanced once at temperature"}` : ""}.`;
  return {
    lsi: r2(r.lsi),
    verdict: r.verdict,
    words,
    advice: balanceAdvice(atSet.verdict, ph, taJudged ?? ta, ch, atSet.phSaturation, targets, chEstimated),
    method: `${method}; balanced within ±${BALANCED_BAND}`,
    calciteSaturationIndex: r2(r.calciteSaturationIndex),
    temperatureC,
    lsiAtSetTemperature: r2(atSet.lsi),
    setTemperatureC,
  };
}

/** Aeration: CO2 escapes and pH rises without changing alkalinity (chemistry.md §3.1 item 6). */
function pushAerationStep(ctx: Ctx, ph: number, toPh: number, why: string) {
  pushStep(ctx, {
    kind: "aerate",
    parameter: "ph",
    direction: "raise",
    from: r2(ph),
    to: r2(toPh),
    chemical: null,
    productId: null,
    productName: null,
    grams: null,
    millilitres: null,
    retestAfterHours: 4,
    words: `${why} Run the jets and air blower with the cover off for a few hours; CO2 escapes and pH rises toward ${r2(toPh).toFixed(1)} without changing alkalinity. Then retest.`,
    sideEffects: [],
    cautions: ["Keep everyone out while the cover is off and the jets run unattended.", "Never leave the tub uncovered where children or pets can reach it."],
  });
}

function predict(
  ctx: Ctx,
  o: { now: Date; timeZone: string; locale: string; lockUntil: Date | null; temperatureC: number; setTemperatureC: number; chEstimated: boolean; th: number | null; tds: number | undefined },
): PredictedWater {
  const s = ctx.sim;
  const sanRange = ctx.targets[ctx.sanitiser === "chlorine" ? "free_chlorine" : "bromine"];
  const chForLsi = o.chEstimated && s.ch !== null && o.th !== null && s.ch === o.th ? o.th * CALCIUM_SHARE_OF_TOTAL_HARDNESS : s.ch;
  let lsi: number | null = null;
  let lsiSet: number | null = null;
  if (s.ph !== null && s.ta !== null && chForLsi !== null) {
    const base = { ph: s.ph, totalAlkalinity: s.ta, calciumHardness: chForLsi, cyanuricAcid: s.cya ?? 0, boron: ctx.water.boron, tds: o.tds ?? null };
    lsi = r2(langelier({ ...base, temperatureC: o.temperatureC }).lsi);
    lsiSet = r2(langelier({ ...base, temperatureC: o.setTemperatureC }).lsi);
  }
  const shockStep = [...ctx.steps].reverse().find((x) => x.shock && x.kind === "dose");
  const phOk = s.ph !== null && s.ph >= ctx.targets.ph.min && s.ph <= ctx.targets.ph.max;
  const sanOk = s.san !== null && s.san >= sanRange.min && (s.san <= sanRange.max || Boolean(shockStep));
  const sanName = analyteWord(ctx.sanitiser === "chlorine" ? "free_chlorine" : "bromine");
  const totalHours = ctx.steps.reduce((h, x) => h + (x.kind === "wait" ? 0 : x.retestAfterHours), 0);
  let usableAfter: string | null = null;
  let usableWords: string;
  if (ctx.replaced) {
    usableWords = "After refilling: retest every pad; the new water needs its own plan (start with the first-fill steps).";
  } else if (o.lockUntil) {
    usableAfter = sanOk && phOk ? o.lockUntil.toISOString() : null;
    usableWords = usableAfter
      ? `After the retest at ${timeWords(o.lockUntil, o.timeZone, o.locale)}, if ${sanName} and pH read in range.`
      : `Not until the retest at ${timeWords(o.lockUntil, o.timeZone, o.locale)} shows ${sanName} and pH in range.`;
  } else if (s.san === null || s.ph === null) {
    usableWords = `Unknown: ${s.san === null ? sanName : "pH"} was not measured. Test before anyone uses the tub.`;
  } else if (s.san > sanRange.max && !shockStep) {
    usableWords = `Not until ${sanName} has fallen to ${sanRange.max} mg/L or below (cover off, jets on); retest in a few hours.`;
  } else if (!sanOk || !phOk) {
    usableWords = `Not yet: after these steps ${!sanOk ? sanName : "pH"} is still predicted out of range; retest and make a new plan.`;
  } else if (ctx.steps.length === 0) {
    usableAfter = o.now.toISOString();
    usableWords = "Now: sanitiser and pH are in range.";
  } else {
    const at = new Date(o.now.getTime() + totalHours * 3600_000);
    usableAfter = at.toISOString();
    usableWords = shockStep
      ? `After the shock: once ${sanName} is back to ${sanRange.max} mg/L or below, about ${timeWords(at, o.timeZone, o.locale)} if every step is done now (retest first).`
      : `About ${timeWords(at, o.timeZone, o.locale)} if every step is done now, once the last retest shows ${sanName} and pH in range.`;
  }
  return {
    free_chlorine: ctx.sanitiser === "chlorine" && s.san !== null ? r2(s.san) : null,
    combined_chlorine: s.combined,
    bromine: ctx.sanitiser === "bromine" && s.san !== null ? r2(s.san) : null,
    ph: s.ph === null ? null : r2(s.ph),
    total_alkalinity: s.ta === null ? null : r1(s.ta),
    calcium_hardness: chForLsi === null ? null : r1(chForLsi),
    cyanuric_acid: s.cya === null ? null : r1(s.cya),
    lsi,
    lsiAtSetTemperature: lsiSet,
    usableAfter,
    usableWords,
  };
}

/**
 * Chlorine used per day in a home tub, for the stabiliser forecast: about 1 mg/L a day standing plus
 * 0.5 mg/L per bather-day in 1500 L (common practice estimate, from memory; real demand varies).
 */
export function dailyChlorineUse(volumeLitres: number, bathersPerDay: number): number {
  return 1 + 0.5 * bathersPerDay * (1500 / volumeLitres);
}

function slowTrends(ctx: Ctx, input: WaterInput, o: { cya: number | null; ch: number | null; products: Product[]; bathersPerDay: number }): SlowTrends {
  const out: SlowTrends = { cyanuricAcidPerDay: null, daysUntilCyanuricAcidLimit: null, drains: [], words: [] };
  const V = input.volumeLitres;
  const units = ctx.units;
  const drainTo = (parameter: SlowTrends["drains"][number]["parameter"], now: number, aim: number, fill: number, why: string) => {
    const fraction = Math.min(1, Math.max(0, (now - aim) / Math.max(1e-9, now - fill)));
    const litres = roundAmount(fraction * V)!;
    out.drains.push({ parameter, litres, percent: Math.round(fraction * 100), words: `${why}: replace about ${Math.round(fraction * 100)} % of the water (${volumeWords(fraction * V, units)}).` });
  };
  const cyaRange = ctx.targets.cyanuric_acid;
  if (ctx.sanitiser === "chlorine") {
    const chlorine = pickProduct(o.products, "chlorine");
    if (chlorine && chlorine.chemical.startsWith("sodium_dichloroisocyanurate")) {
      const perDay = r2(dailyChlorineUse(V, o.bathersPerDay) * 0.91);
      out.cyanuricAcidPerDay = perDay;
      if (o.cya !== null) {
        const days = o.cya >= cyaRange.max ? 0 : Math.floor((cyaRange.max - o.cya) / perDay);
        out.daysUntilCyanuricAcidLimit = days;
        out.words.push(
          days === 0
            ? `Cyanuric acid is at or above its limit (${cyaRange.max} mg/L).`
            : `Dichlor adds about ${perDay} mg/L cyanuric acid a day at ${o.bathersPerDay} bathers a day (0.91 mg/L per mg/L chlorine; chlorine use is an estimate): about ${days} days until it reaches ${cyaRange.max} mg/L.`,
        );
        const aim = Math.max(10, Math.min(cyaRange.aim, cyaRange.max * 0.6));
        const at = Math.max(o.cya, cyaRange.max);
        drainTo("cyanuric_acid", at, aim, 0, o.cya >= cyaRange.max ? "Cyanuric acid is too high" : `When it reaches ${cyaRange.max} mg/L`);
      } else out.words.push(`Dichlor adds about ${perDay} mg/L cyanuric acid a day at this use; test cyanuric acid monthly.`);
    }
  }
  const chRange = ctx.targets.calcium_hardness;
  if (o.ch !== null && o.ch > chRange.max) {
    drainTo("calcium_hardness", o.ch, chRange.aim, 0, `Calcium hardness ${r1(o.ch)} mg/L is above ${chRange.max} (assuming soft fill water; more if yours is hard)`);
  }
  if (finite(input.tds) && finite(input.fillTds)) {
    const rise = input.tds - input.fillTds;
    if (rise > TDS_RISE_DRAIN) {
      out.drains.push({ parameter: "tds", litres: roundAmount(V)!, percent: 100, words: `Dissolved solids are ${r1(rise)} mg/L above the fill water (more than ${TDS_RISE_DRAIN}, Maine 10-144 CMR ch. 202 App. B): drain and refill.` });
    } else out.words.push(`Dissolved solids are ${Math.max(0, r1(rise))} mg/L above the fill water; drain when that passes ${TDS_RISE_DRAIN} mg/L (Maine App. B).`);
  } else if (finite(input.tds)) {
    out.words.push(`Dissolved solids ${input.tds} mg/L: compare with the fill water; drain when they are ${TDS_RISE_DRAIN} mg/L above it (Maine App. B).`);
  }
  for (const d of out.drains) out.words.push(d.words);
  return out;
}

function makeHeadline(
  ctx: Ctx,
  o: { judgements: Judgement[]; lockUntil: Date | null; timeZone: string; locale: string; predicted: PredictedWater; san: number | null; combined: number | null; guidanceMax: number; mode: Mode },
): Headline {
  const sanParam = ctx.sanitiser === "chlorine" ? "free_chlorine" : "bromine";
  const sanName = analyteName(sanParam);
  const range = ctx.targets[sanParam];
  const first = ctx.steps[0];
  const todo = first ? (first.kind === "dose" ? `First: ${first.words.split(":")[0]}: ${first.amountText ?? ""}.`.replace(/: \./, ".") : first.words.split(". ")[0] + ".") : "";
  const usable = o.predicted.usableWords;
  if (o.lockUntil)
    return { tone: "caution", title: `Wait: nothing goes in until ${timeWords(o.lockUntil, o.timeZone, o.locale)}`, detail: `Retest then. Keep everyone out until the retest shows the water in range.`, usableNow: false };
  if (o.san !== null && o.san > range.max)
    return {
      tone: "alert",
      title: `${sanName} is too high (${o.san} mg/L, range ${range.min}–${range.max}): keep everyone out`,
      detail: `Add no sanitiser; leave the cover off with the jets on until it falls into range, then retest.${o.san > 10 ? " Above 10 mg/L with bathers present is an imminent health hazard (Model Aquatic Health Code)." : ""}`,
      usableNow: false,
    };
  if (first?.kind === "replace_water") return { tone: "alert", title: "Replace water before anything else", detail: first.words, usableNow: false };
  if (o.combined !== null && o.combined > o.guidanceMax)
    return { tone: "alert", title: `Combined chlorine is high (${o.combined} mg/L): do not use the tub until it is broken`, detail: `${todo} Usable: ${usable}`, usableNow: false };
  if (o.mode === "first_fill")
    return { tone: "caution", title: "New water: start-up steps before anyone uses the tub", detail: `${todo} Usable: ${usable}`, usableNow: false };
  if (o.san !== null && o.san < range.min)
    return { tone: "alert", title: `${sanName} is too low (${o.san} mg/L, range ${range.min}–${range.max}): do not use the tub yet`, detail: `${todo} Usable: ${usable}`, usableNow: false };
  const ph = o.judgements.find((j) => j.parameter === "ph");
  if (ph && ph.value !== null && (ph.value < 7.0 || ph.value > 8.0))
    return { tone: "alert", title: `pH is ${ph.value < 7 ? "too low" : "too high"} (${ph.value}, range ${ph.min}–${ph.max}): do not use the tub yet`, detail: `${todo || "Retest pH."} Usable: ${usable}`, usableNow: false };
  if (o.san === null)
    return { tone: "caution", title: `${sanName} was not measured: test it before anyone uses the tub`, detail: todo || "Take a reading with the sanitiser pad.", usableNow: null };
  if (!ph || ph.value === null)
    return { tone: "caution", title: "pH was not measured: test it before adding anything or using the tub", detail: "Acid or alkali is never added without a pH reading.", usableNow: null };
  const out = o.judgements.filter((j) => j.status === "low" || j.status === "high");
  if (out.length > 0) {
    const names = out.map((j) => `${j.parameter === "ph" ? "pH" : j.parameter.replace(/_/g, " ")} ${j.status === "low" ? "low" : "high"} (${j.judgedValue ?? j.value})`);
    const phOk = ph.status === "in_range";
    return {
      tone: "caution",
      title: `Balance the water: ${names.join(", ")}`,
      detail: `${todo ? todo + " " : ""}${phOk ? `${sanName} and pH are in range, so the tub may be used between steps once each retest is done (never while dosing).` : `Use the tub once pH is back in range.`}`,
      usableNow: phOk,
    };
  }
  const missing = o.judgements.filter((j) => j.status === "not_measured" && j.parameter !== "cyanuric_acid").map((j) => (j.parameter === "ph" ? "pH" : j.parameter.replace(/_/g, " ")));
  if (missing.length > 0) return { tone: "caution", title: `In range as far as measured; not measured: ${missing.join(", ")}`, detail: "The tub may be used; test those before the next use.", usableNow: true };
  return { tone: "ok", title: "Every reading is in range: nothing to add", detail: "The tub may be used. Test again before the next use.", usableNow: true };
}
