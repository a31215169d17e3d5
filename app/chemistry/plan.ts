// The treatment plan: sanitiser first, then total alkalinity, then pH, then calcium hardness.
// One stage at a time, one product per stage; each later stage waits for the retest, so its
// amount is an estimate from the water predicted after the earlier stages ("provisional").

import {
  ACID_BASE_EFFECT,
  afterDose,
  closedWaterFromReading,
  doseForPh,
  eqPerLFromMgCaCO3,
  equilibriumPhWithAir,
  mgCaCO3FromEqPerL,
  pHOf,
  type AcidBaseEffect,
  type WaterState,
} from "./carbonate";
import { CH_PER_FC_FROM_CAL_HYPO, CYA_PER_FC_FROM_DICHLOR } from "./constants";
import {
  alkalinityDose,
  bromineDose,
  chlorineDose,
  hardnessDose,
  molarDose,
  type Amount,
} from "./doses";
import { BALANCED_BAND, langelier } from "./lsi";
import {
  DEFAULT_PRODUCTS,
  cautionsFor,
  generalCautions,
  pickProduct,
  retestHoursFor,
  roleOf,
  type ProductRole,
} from "./products";
import { resolveTargets } from "./targets";
import type {
  Judgement,
  LoggedTreatment,
  Parameter,
  PlanStep,
  Product,
  Range,
  Readings,
  SideEffect,
  TargetRanges,
  WaterBalance,
  WaterInput,
  WaterPlan,
} from "./types";
import { drainIntervalDays } from "./volume";

export interface PlanOptions {
  now?: Date;
  treatmentLog?: LoggedTreatment[];
  targets?: Partial<Record<Parameter, Partial<Range>>>;
  products?: Product[];
  /** IANA time zone for the "retest after HH:MM" words; UTC by default. */
  timeZone?: string;
}

export const DEFAULT_TEMPERATURE_C = 38;
/** Typical spa TDS used for activity corrections when none is given (I = 0.0125). */
export const DEFAULT_TDS = 500;
/** Calcium share of total hardness when only total hardness is read: 10 NYCRR §6-1.30 worked example uses 0.70 [P]. */
export const CALCIUM_SHARE_OF_TOTAL_HARDNESS = 0.7;
/** Lowest pH an acid round may aim at while lowering alkalinity (common practice for the aeration method). */
export const ACID_ROUND_PH_FLOOR = 7.0;

export const AUTHORITY_NOTE =
  "Product labels, local codes and, for public or commercial spas, licensed operators decide; this plan is guidance for a private tub.";

const PARAMETER_WORDS: Record<Parameter, string> = {
  free_chlorine: "free chlorine",
  bromine: "bromine",
  ph: "pH",
  total_alkalinity: "total alkalinity",
  calcium_hardness: "calcium hardness",
  cyanuric_acid: "cyanuric acid",
};

const finite = (x: number | null | undefined): x is number => typeof x === "number" && Number.isFinite(x);
function roundAmount(x: number | null): number | null {
  if (x === null || !Number.isFinite(x)) return null;
  if (x < 10) return Math.round(x * 10) / 10;
  if (x < 1000) return Math.round(x);
  return Math.round(x / 10) * 10;
}
const r1 = (x: number) => Math.round(x * 10) / 10;
const r2 = (x: number) => Math.round(x * 100) / 100;
const unitOf = (p: Parameter) => (p === "ph" ? "" : " mg/L");
const fmt = (p: Parameter, x: number) => (p === "ph" ? r2(x).toFixed(1) : String(r1(x)));

function amountWords(a: Amount, product: Product): string {
  if (a.millilitres !== null) return `${roundAmount(a.millilitres)} mL of ${product.name}`;
  const g = `${roundAmount(a.grams)} g of ${product.name}`;
  if (a.tablets !== null && a.tablets !== undefined) return `${g} (about ${Math.max(0.5, Math.round(a.tablets * 2) / 2)} tablets)`;
  return g;
}

function timeWords(d: Date, timeZone: string): string {
  try {
    const s = new Intl.DateTimeFormat("en-GB", { hour: "2-digit", minute: "2-digit", hour12: false, timeZone }).format(d);
    return timeZone === "UTC" ? `${s} UTC` : s;
  } catch {
    return `${d.toISOString().slice(11, 16)} UTC`;
  }
}

const ROLE_PARAMETER: Record<ProductRole, Parameter | null> = {
  chlorine: "free_chlorine",
  bromine: "bromine",
  alkalinity_up: "total_alkalinity",
  ph_up: "ph",
  acid: "ph",
  hardness_up: "calcium_hardness",
  antifoam: null,
};

function judge(parameter: Parameter, value: number | null, range: Range): Judgement {
  const status = value === null ? "not_measured" : value < range.min ? "low" : value > range.max ? "high" : "in_range";
  return { parameter, value, min: range.min, max: range.max, status };
}

interface Ctx {
  volume: number;
  water: WaterState;
  products: Product[];
  targets: TargetRanges;
  notes: string[];
  steps: PlanStep[];
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
) {
  const hours = retestHoursFor(product);
  const words =
    `${direction === "raise" ? "Raise" : "Lower"} ${PARAMETER_WORDS[parameter]} from ${fmt(parameter, from)} to about ${fmt(parameter, to)}${unitOf(parameter)}: ` +
    `add ${amountWords(amount, product)}. ${extraWords}` +
    `Then wait ${hours} h with the jets running and retest before the next step.`;
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
    retestAfterHours: hours,
    words: words.replace(/\s+/g, " ").trim(),
    sideEffects,
    cautions: cautionsFor(product),
  });
}

function missingProduct(ctx: Ctx, what: string) {
  ctx.notes.push(`No ${what} product is in the catalogue, so the plan cannot give an amount; add one to the product list.`);
}

/** Main entry: validated input → plan. */
export function planTreatment(input: WaterInput, options: PlanOptions = {}): WaterPlan {
  const products = options.products ?? input.products ?? DEFAULT_PRODUCTS;
  const targets = resolveTargets(input.sanitiser, { ...(input.targets ?? {}), ...(options.targets ?? {}) });
  const notes: string[] = [];
  const temperatureC = finite(input.temperatureC) ? input.temperatureC : DEFAULT_TEMPERATURE_C;
  if (!finite(input.temperatureC)) notes.push(`No water temperature given; the plan assumes ${DEFAULT_TEMPERATURE_C} °C.`);
  if (temperatureC > 40) notes.push("The water is above 40 °C (104 °F), the usual upper limit for hot tubs (CDC); turn the heater down.");
  const rd: Readings = input.readings ?? {};
  const val = (x: number | null | undefined) => (finite(x) ? x : null);

  let ch = val(rd.calcium_hardness);
  if (ch === null && finite(rd.total_hardness)) {
    ch = rd.total_hardness * CALCIUM_SHARE_OF_TOTAL_HARDNESS;
    notes.push(`Calcium hardness estimated as 70 % of total hardness (${r1(ch)} mg/L), as in the New York §6-1.30 example; a calcium test is better.`);
  }
  const cya = val(rd.cyanuric_acid);
  const water: WaterState = {
    temperatureC,
    tds: finite(input.tds) ? input.tds : DEFAULT_TDS,
    cyanuricAcid: cya ?? 0,
    boron: val(rd.borate) ?? 0,
  };
  const ph = val(rd.ph);
  const ta = val(rd.total_alkalinity);
  const sanParam: Parameter = input.sanitiser === "chlorine" ? "free_chlorine" : "bromine";
  const san = val(input.sanitiser === "chlorine" ? rd.free_chlorine : rd.bromine);

  const judgements: Judgement[] = [
    judge(sanParam, san, targets[sanParam]),
    judge("ph", ph, targets.ph),
    judge("total_alkalinity", ta, targets.total_alkalinity),
    judge("calcium_hardness", ch, targets.calcium_hardness),
    judge("cyanuric_acid", cya, targets.cyanuric_acid),
  ];
  for (const j of judgements)
    if (j.status === "not_measured" && !(j.parameter === "cyanuric_acid" && input.sanitiser === "bromine")) notes.push(`${cap(PARAMETER_WORDS[j.parameter])} was not measured, so the plan could not judge it.`);
  const known = new Set(["free_chlorine", "total_chlorine", "bromine", "ph", "total_alkalinity", "total_hardness", "calcium_hardness", "cyanuric_acid", "borate"]);
  for (const k of Object.keys(rd)) if (!known.has(k)) notes.push(`The reading "${k}" is not one the plan uses; it was ignored.`);

  const waterBalance = balance(ph, ta, ch, temperatureC, water, input.tds);
  const drain = finite(input.bathersPerDay) && input.bathersPerDay > 0 ? drainIntervalDays(input.volumeLitres, input.bathersPerDay) : null;
  if (drain !== null)
    notes.push(`Drain and refill about every ${drain} days at ${input.bathersPerDay} bathers a day (Maine 10-144 CMR ch. 202 App. B formula), or sooner if the water turns cloudy or foamy.`);

  const ctx: Ctx = { volume: input.volumeLitres, water, products, targets, notes, steps: [] };
  const finish = (): WaterPlan => {
    notes.push("One product at a time: never add the next product until the retest for the one before.");
    notes.push(AUTHORITY_NOTE);
    return { steps: ctx.steps, waterBalance, judgements, drainIntervalDays: drain, notes };
  };

  // 0. Something added recently: wait, never dose on top.
  const now = options.now ?? (input.now ? new Date(input.now) : new Date());
  const log = options.treatmentLog ?? input.treatmentLog ?? [];
  if (waitForLog(ctx, log, now, options.timeZone ?? "UTC")) return finish();

  // 0b. Stabiliser too high: only water replacement lowers it, and it changes everything else.
  const cyaRange = targets.cyanuric_acid;
  if (cya !== null && cya > cyaRange.max) {
    const aimCya = Math.min(cyaRange.aim, cyaRange.max * 0.8);
    const fraction = Math.min(1, 1 - aimCya / cya);
    const litres = fraction * input.volumeLitres;
    pushStep(ctx, {
      kind: "replace_water",
      parameter: "cyanuric_acid",
      direction: "lower",
      from: cya,
      to: r1(cya * (1 - fraction)),
      chemical: "fresh_water",
      productId: null,
      productName: null,
      grams: null,
      millilitres: null,
      litres: roundAmount(litres),
      retestAfterHours: 2,
      words:
        fraction >= 0.999
          ? `Cyanuric acid is ${cya} mg/L; no product lowers it. Drain the tub and refill with fresh water, then retest all pads.`
          : `Cyanuric acid is ${cya} mg/L; no product lowers it. Replace about ${Math.round(fraction * 100)} % of the water (${roundAmount(litres)} L) with fresh water, run the jets 2 h, then retest all pads.`,
      sideEffects: [],
      cautions: [
        "Switch the tub's power off before draining; refill before switching the heater back on.",
        "Drain where local rules allow; chlorinated water can harm plants and streams.",
        ...generalCautions(),
      ],
    });
    notes.push("After refilling, retest every pad and make a new plan: fresh water changes all the readings.");
    return finish();
  }

  // 0c. pH readings outside what any spa reaches are more likely a bad test than bad water.
  const phUsable = ph !== null && ph >= 5.5 && ph <= 9.5;
  if (ph !== null && !phUsable)
    notes.push(`A pH of ${ph} is far outside what hot tub water reaches; retest with a fresh strip or a liquid kit before adding any pH or alkalinity product.`);

  // 1. Sanitiser.
  sanitiserStage(ctx, input.sanitiser, san, cya, ch, rd);

  // Predicted water after stage 1 (dichlor adds CYA; calcium hypochlorite adds calcium).
  let curTa = ta;
  let curPh = phUsable ? ph : null;
  let curCh = ch;
  const s1 = ctx.steps[0];
  if (s1) for (const e of s1.sideEffects) {
    if (e.parameter === "cyanuric_acid") ctx.water.cyanuricAcid = e.to;
    if (e.parameter === "calcium_hardness") curCh = e.to;
  }

  // 2. Total alkalinity, 3. pH.
  if (curTa !== null && (curPh !== null || ph === null)) {
    const after = alkalinityStage(ctx, curTa, curPh);
    curTa = after.ta;
    curPh = after.ph;
  } else if (curTa === null && curPh !== null && (curPh < targets.ph.min || curPh > targets.ph.max)) {
    notes.push("Total alkalinity was not measured; the pH dose depends on it, so measure total alkalinity before adjusting pH.");
  }
  if (curTa !== null && curPh !== null) phStage(ctx, curTa, curPh);

  // 4. Calcium hardness.
  if (curCh !== null) hardnessStage(ctx, curCh);

  if (ctx.steps.length > 1)
    notes.push("Amounts after the first step are estimates from the water predicted after the earlier steps; retest and make a new plan before each one.");
  return finish();
}

const cap = (s: string) => (s.startsWith("pH") ? s : s.charAt(0).toUpperCase() + s.slice(1));

function waitForLog(ctx: Ctx, log: LoggedTreatment[], now: Date, timeZone: string): boolean {
  let latest: { until: number; entry: LoggedTreatment; product: Product | null } | null = null;
  for (const entry of log) {
    const added = Date.parse(entry.addedAt);
    if (!Number.isFinite(added)) continue;
    const product = ctx.products.find((p) => p.id === entry.productId) ?? DEFAULT_PRODUCTS.find((p) => p.id === entry.productId) ?? (entry.chemical ? ctx.products.find((p) => p.chemical === entry.chemical) ?? null : null);
    const hours = product ? retestHoursFor(product) : 2;
    const until = Math.max(added, Math.min(added, now.getTime())) + hours * 3600_000;
    if (until > now.getTime() && (!latest || until > latest.until)) latest = { until, entry, product };
  }
  if (!latest) return false;
  const at = new Date(latest.until);
  const hoursLeft = Math.max(0.1, Math.ceil(((latest.until - now.getTime()) / 3600_000) * 10) / 10);
  const role = latest.product ? roleOf(latest.product) : null;
  const name = latest.product?.name ?? latest.entry.chemical ?? latest.entry.productId;
  pushStep(ctx, {
    kind: "wait",
    parameter: role ? ROLE_PARAMETER[role] : null,
    direction: "wait",
    from: null,
    to: null,
    chemical: latest.product?.chemical ?? latest.entry.chemical ?? null,
    productId: latest.entry.productId,
    productName: latest.product?.name ?? null,
    grams: null,
    millilitres: null,
    retestAfterHours: hoursLeft,
    retestAt: at.toISOString(),
    words: `Wait — retest after ${timeWords(at, timeZone)}. ${name} was added ${new Date(latest.entry.addedAt).toISOString().slice(0, 16).replace("T", " ")} UTC and needs time to mix and act.`,
    sideEffects: [],
    cautions: [
      "Do not add another product (or a second dose) until the retest.",
      "Keep everyone out of the tub until the retest shows sanitiser and pH in range.",
      "Keep the jets running so the product mixes.",
      "Store the opened product closed, away from children and pets.",
    ],
  });
  ctx.notes.push("A product was added recently; the next amounts depend on the retest, so the plan waits.");
  return true;
}

function sanitiserStage(ctx: Ctx, sanitiser: "chlorine" | "bromine", san: number | null, cya: number | null, ch: number | null, rd: Readings) {
  const param: Parameter = sanitiser === "chlorine" ? "free_chlorine" : "bromine";
  const range = ctx.targets[param];
  if (sanitiser === "chlorine" && finite(rd.total_chlorine) && san !== null && rd.total_chlorine - san > 0.5)
    ctx.notes.push(`Combined chlorine is about ${r1(rd.total_chlorine - san)} mg/L (above 0.5, NSPI-2 as adopted in Maine App. A): shock the tub after use, with the cover off.`);
  if (sanitiser === "chlorine" && finite(rd.bromine) && rd.bromine > 0)
    ctx.notes.push("A bromine reading was given for a chlorine tub; it was not used.");
  if (sanitiser === "bromine" && finite(rd.free_chlorine) && rd.free_chlorine > 0)
    ctx.notes.push("In a bromine tub the chlorine pad reads bromine at about 1/2.25 of its value; the plan used the bromine reading.");
  if (san === null) return;
  if (san > range.max) {
    ctx.notes.push(
      `${cap(PARAMETER_WORDS[param])} is ${san} mg/L, above ${range.max}: add no sanitiser and keep everyone out until it falls into range (cover off, jets on).` +
        (san > 10 ? " Above 10 mg/L with bathers present is an imminent health hazard in the Model Aquatic Health Code." : ""),
    );
    return;
  }
  if (san >= range.min) return;
  const delta = range.aim - san;
  if (sanitiser === "chlorine") {
    const product = pickProduct(ctx.products, "chlorine");
    if (!product) return missingProduct(ctx, "chlorine");
    const amount = chlorineDose(product, delta, ctx.volume);
    const effects: SideEffect[] = [];
    let extra = "";
    if (product.chemical.startsWith("sodium_dichloroisocyanurate")) {
      const dCya = delta * CYA_PER_FC_FROM_DICHLOR;
      const base = cya ?? 0;
      effects.push({ parameter: "cyanuric_acid", change: r1(dCya), to: r1(base + dCya), words: `Adds about ${r1(dCya)} mg/L cyanuric acid (0.91 mg/L per mg/L chlorine from dichlor).` });
      extra = "Dichlor is close to pH-neutral. ";
      if (cya !== null && base + dCya > ctx.targets.cyanuric_acid.max)
        ctx.notes.push("Cyanuric acid will pass its maximum with this dose; plan a partial water change or switch to an unstabilised chlorine.");
    } else if (product.chemical === "calcium_hypochlorite") {
      const dCh = delta * CH_PER_FC_FROM_CAL_HYPO;
      effects.push({ parameter: "calcium_hardness", change: r1(dCh), to: r1((ch ?? 0) + dCh), words: `Adds about ${r1(dCh)} mg/L calcium hardness (0.71 mg/L per mg/L chlorine).` });
      extra = "Calcium hypochlorite raises pH slightly. ";
    } else if (product.chemical === "sodium_hypochlorite") {
      extra = "Sodium hypochlorite raises pH slightly. ";
    }
    doseStep(ctx, product, param, "raise", san, range.aim, amount, effects, extra);
  } else {
    const product = pickProduct(ctx.products, "bromine");
    if (!product) return missingProduct(ctx, "bromine");
    const amount = bromineDose(product, delta, ctx.volume);
    const extra = product.form === "tablets" ? "Tablets dissolve slowly in a floater; the rise takes hours. " : "";
    doseStep(ctx, product, param, "raise", san, range.aim, amount, [], extra);
  }
}

function acidOrBase(product: Product): AcidBaseEffect {
  return ACID_BASE_EFFECT[product.chemical as keyof typeof ACID_BASE_EFFECT];
}

function alkalinityStage(ctx: Ctx, ta: number, ph: number | null): { ta: number; ph: number | null } {
  const range = ctx.targets.total_alkalinity;
  const phRange = ctx.targets.ph;
  if (ta >= range.min && ta <= range.max) return { ta, ph };
  if (ta < range.min) {
    const product = pickProduct(ctx.products, "alkalinity_up");
    if (!product) {
      missingProduct(ctx, "alkalinity increaser");
      return { ta, ph };
    }
    const delta = range.aim - ta;
    const amount = alkalinityDose(product, delta, ctx.volume);
    const effects: SideEffect[] = [];
    let newPh = ph;
    if (ph !== null) {
      const w0 = closedWaterFromReading(ph, ta, ctx.water);
      newPh = pHOf(afterDose(w0, acidOrBase(product), eqPerLFromMgCaCO3(delta) / acidOrBase(product).alkEqPerMol), ctx.water);
      effects.push({ parameter: "ph", change: r2(newPh - ph), to: r2(newPh), words: `Moves pH a little, to about ${r2(newPh).toFixed(2)}.` });
      if (ph < phRange.min) ctx.notes.push("Low alkalinity and low pH: raise alkalinity with bicarbonate first, then re-check pH; it often needs only a little soda ash afterwards.");
      if (ph > phRange.max) ctx.notes.push("Low alkalinity with high pH (typical of soft water): raise alkalinity first; the acid for pH will lower it again, so expect a few small rounds of bicarbonate and acid.");
    }
    doseStep(ctx, product, "total_alkalinity", "raise", ta, range.aim, amount, effects, product.chemical === "sodium_bicarbonate" ? "Bicarbonate moves pH only a little. " : "");
    return { ta: range.aim, ph: newPh };
  }
  // TA too high: acid. Keep pH from falling below the round floor; aerate between rounds.
  const product = pickProduct(ctx.products, "acid");
  if (!product) {
    missingProduct(ctx, "acid (pH decreaser)");
    return { ta, ph };
  }
  const effect = acidOrBase(product);
  const floor = Math.min(ACID_ROUND_PH_FLOOR, phRange.min);
  if (ph === null) {
    const amount = alkalinityDose(product, ta - range.aim, ctx.volume);
    doseStep(ctx, product, "total_alkalinity", "lower", ta, range.aim, amount, [], "Acid also lowers pH; measure pH before and after. ");
    return { ta: range.aim, ph: null };
  }
  let w0 = closedWaterFromReading(ph, ta, ctx.water);
  let startPh = ph;
  if (ph <= floor + 0.05) {
    // pH already low: aerate first (raises pH without changing alkalinity), then acid.
    const airPh = equilibriumPhWithAir(w0.alk, ctx.water);
    const toPh = Math.min(phRange.max, airPh);
    pushAerationStep(ctx, ph, toPh);
    w0 = closedWaterFromReading(toPh, ta, ctx.water);
    startPh = toPh;
  }
  const wantEq = eqPerLFromMgCaCO3(ta - range.aim);
  let n = wantEq / -effect.alkEqPerMol;
  let after = afterDose(w0, effect, n);
  let newPh = pHOf(after, ctx.water);
  let capped = false;
  if (newPh < floor) {
    const nFloor = doseForPh(w0, effect, floor, ctx.water);
    if (nFloor !== null && nFloor > 0) {
      n = nFloor;
      after = afterDose(w0, effect, n);
      newPh = pHOf(after, ctx.water);
      capped = true;
    }
  }
  const newTa = mgCaCO3FromEqPerL(after.alk);
  const amount = molarDose(product, n, ctx.volume);
  const effects: SideEffect[] = [
    { parameter: "ph", change: r2(newPh - startPh), to: r2(newPh), words: `Lowers pH to about ${r2(newPh).toFixed(2)} (closed-system carbonate balance at ${ctx.water.temperatureC} °C).` },
  ];
  if (capped) {
    const rounds = acidRounds(ctx, ta, Math.max(startPh, Math.min(phRange.max, startPh)), range.aim, effect, floor);
    ctx.notes.push(
      `High alkalinity${startPh > phRange.max ? " and high pH" : ""} (typical of hard fill water): lower alkalinity in rounds. Add the acid, then run the jets and blower with the cover off for a few hours so pH climbs back without changing alkalinity, retest, and repeat${rounds > 1 ? ` — about ${rounds} rounds` : ""}.`,
    );
  }
  doseStep(ctx, product, "total_alkalinity", "lower", ta, newTa, amount, effects, capped ? "This is one round; pH must not fall below 7.0. " : "");
  return { ta: newTa, ph: newPh };
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

function phStage(ctx: Ctx, ta: number, ph: number) {
  const range = ctx.targets.ph;
  const taRange = ctx.targets.total_alkalinity;
  if (ph >= range.min && ph <= range.max) return;
  const w0 = closedWaterFromReading(ph, ta, ctx.water);
  if (ph < range.min) {
    if (ta > taRange.max) {
      const toPh = Math.min(range.aim, equilibriumPhWithAir(w0.alk, ctx.water));
      pushAerationStep(ctx, ph, toPh);
      return;
    }
    const product = pickProduct(ctx.products, "ph_up");
    if (!product) return missingProduct(ctx, "pH increaser");
    const effect = acidOrBase(product);
    const n = doseForPh(w0, effect, range.aim, ctx.water);
    if (n === null) return void ctx.notes.push("The pH increaser cannot reach the target pH in this water; retest.");
    const newTa = mgCaCO3FromEqPerL(afterDose(w0, effect, n).alk);
    const effects: SideEffect[] = [
      { parameter: "total_alkalinity", change: r1(newTa - ta), to: r1(newTa), words: `Raises total alkalinity by about ${r1(newTa - ta)} mg/L (soda ash adds 2 equivalents per mole).` },
    ];
    if (newTa > taRange.max) ctx.notes.push("The pH increaser will push alkalinity above its range; add it in two halves and retest between them.");
    doseStep(ctx, product, "ph", "raise", ph, range.aim, molarDose(product, n, ctx.volume), effects);
    return;
  }
  const product = pickProduct(ctx.products, "acid");
  if (!product) return missingProduct(ctx, "pH decreaser");
  const effect = acidOrBase(product);
  const n = doseForPh(w0, effect, range.aim, ctx.water);
  if (n === null) return void ctx.notes.push("The pH decreaser cannot reach the target pH in this water; retest.");
  const newTa = mgCaCO3FromEqPerL(afterDose(w0, effect, n).alk);
  const effects: SideEffect[] = [
    { parameter: "total_alkalinity", change: r1(newTa - ta), to: r1(newTa), words: `Lowers total alkalinity by about ${r1(ta - newTa)} mg/L (acid removes alkalinity one equivalent per equivalent).` },
  ];
  if (newTa < taRange.min)
    ctx.notes.push(`The acid will take alkalinity down to about ${r1(newTa)} mg/L, below its range (soft water): after the retest, expect a small bicarbonate dose again; keep each round small.`);
  doseStep(ctx, product, "ph", "lower", ph, range.aim, molarDose(product, n, ctx.volume), effects, "pH drifts up again as the jets run (CO2 escapes); that is normal. ");
}

function hardnessStage(ctx: Ctx, ch: number) {
  const range = ctx.targets.calcium_hardness;
  if (ch > range.max) {
    ctx.notes.push(`Calcium hardness is ${r1(ch)} mg/L, above ${range.max}: no product lowers it; keep pH and alkalinity at the low end of their ranges, or replace part of the water with softer water.`);
    return;
  }
  if (ch >= range.min) return;
  const product = pickProduct(ctx.products, "hardness_up");
  if (!product) return missingProduct(ctx, "calcium hardness increaser");
  doseStep(ctx, product, "calcium_hardness", "raise", ch, range.aim, hardnessDose(product, range.aim - ch, ctx.volume), [], "Calcium chloride does not change pH or alkalinity noticeably. ");
}

function balance(
  ph: number | null,
  ta: number | null,
  ch: number | null,
  temperatureC: number,
  water: WaterState,
  tds: number | undefined,
): WaterBalance {
  const method = "Langelier index, factor method of 10 NYCRR §6-1.30 / Montana ARM 37.115 Table 7 at the tub's temperature, with carbonate alkalinity";
  if (ph === null || ta === null || ch === null || ph < 4 || ph > 11)
    return {
      lsi: null,
      verdict: null,
      words: "Water balance needs pH, total alkalinity and hardness readings.",
      advice: [],
      method,
      calciteSaturationIndex: null,
    };
  const r = langelier({ ph, totalAlkalinity: ta, calciumHardness: ch, temperatureC, cyanuricAcid: water.cyanuricAcid, boron: water.boron, tds: tds ?? null });
  return {
    lsi: r2(r.lsi),
    verdict: r.verdict,
    words: r.words,
    advice: r.advice,
    method: `${method}; balanced within ±${BALANCED_BAND}`,
    calciteSaturationIndex: r2(r.calciteSaturationIndex),
  };
}

/** pH is low but alkalinity high: aeration (CO2 escapes) raises pH without changing alkalinity; soda ash would add more. */
function pushAerationStep(ctx: Parameters<typeof pushStep>[0], ph: number, toPh: number) {
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
    words: `pH is low but alkalinity is high: do not add soda ash. Run the jets and air blower with the cover off for a few hours; CO2 escapes and pH rises toward ${r2(toPh).toFixed(1)} without changing alkalinity. Then retest.`,
    sideEffects: [],
    cautions: ["Keep everyone out while the cover is off and the jets run unattended.", ...generalCautions()],
  });
}
