// Guided routines with timers: first fill, routine top-ups, foam treatment.

import { bromineDose, chlorineDose, labelDose, type Amount } from "./doses";
import { planTreatment } from "./plan";
import { DEFAULT_PRODUCTS, cautionsFor, generalCautions, pickProduct } from "./products";
import { resolveTargets } from "./targets";
import type { Product, Readings, Sanitiser } from "./types";
import { drainIntervalDays } from "./volume";

export interface RoutineStep {
  order: number;
  /** What to do, in plain words. */
  words: string;
  /** A timer to start after this step, in minutes (null = none). */
  timerMinutes: number | null;
  productId: string | null;
  chemical: string | null;
  grams: number | null;
  millilitres: number | null;
  cautions: string[];
}

export interface RoutineOptions {
  volumeLitres: number;
  sanitiser: Sanitiser;
  products?: Product[];
  temperatureC?: number;
}

const round = (x: number | null) => (x === null ? null : x < 10 ? Math.round(x * 10) / 10 : Math.round(x));

function build(items: Omit<RoutineStep, "order">[]): RoutineStep[] {
  return items.map((s, i) => ({ ...s, order: i + 1 }));
}

const plain = (words: string, timerMinutes: number | null = null): Omit<RoutineStep, "order"> => ({
  words,
  timerMinutes,
  productId: null,
  chemical: null,
  grams: null,
  millilitres: null,
  cautions: [],
});

function dosed(words: string, timerMinutes: number | null, product: Product, a: Amount): Omit<RoutineStep, "order"> {
  return { words, timerMinutes, productId: product.id, chemical: product.chemical, grams: round(a.grams), millilitres: round(a.millilitres), cautions: cautionsFor(product) };
}

function sanitiserDose(o: RoutineOptions, delta: number): { product: Product; amount: Amount } | null {
  const products = o.products ?? DEFAULT_PRODUCTS;
  const product = pickProduct(products, o.sanitiser === "chlorine" ? "chlorine" : "bromine");
  if (!product) return null;
  const amount = o.sanitiser === "chlorine" ? chlorineDose(product, delta, o.volumeLitres) : bromineDose(product, delta, o.volumeLitres);
  return { product, amount };
}

const amountText = (a: Amount, p: Product) => (a.millilitres !== null ? `${round(a.millilitres)} mL of ${p.name}` : `${round(a.grams)} g of ${p.name}`);

/**
 * First fill: sanitiser, wait; alkalinity, wait ≥ 2 h; pH, wait ≥ 2 h; ready when every pad is in range.
 * With fill-water readings the alkalinity and pH amounts come from the plan; otherwise the owner tests first.
 */
export function firstFillRoutine(o: RoutineOptions & { fillReadings?: Readings }): RoutineStep[] {
  const t = resolveTargets(o.sanitiser);
  const sanParam = o.sanitiser === "chlorine" ? "free_chlorine" : "bromine";
  const aim = t[sanParam].aim;
  const items: Omit<RoutineStep, "order">[] = [
    plain("Fill the tub through the filter housing with a garden hose, switch on, and run the jets and heater so the water circulates.", 30),
  ];
  const s = sanitiserDose(o, aim);
  if (s)
    items.push(
      dosed(`Add the sanitiser: ${amountText(s.amount, s.product)} brings fresh water to about ${aim} mg/L ${sanParam === "free_chlorine" ? "free chlorine" : "bromine"}. Jets on, cover off.`, 30, s.product, s.amount),
    );
  items.push(plain("Test the water with a strip (after about 30 minutes of circulation, common practice).", null));
  let taWords = "Adjust total alkalinity to 80–120 mg/L with the amount the plan gives for your reading.";
  let phWords = "Adjust pH to 7.2–7.8 with the amount the plan gives for your new reading.";
  let taStep: ReturnType<typeof planTreatment>["steps"][number] | undefined;
  let phStep: typeof taStep;
  if (o.fillReadings) {
    const plan = planTreatment(
      { volumeLitres: o.volumeLitres, sanitiser: o.sanitiser, temperatureC: o.temperatureC, readings: { ...o.fillReadings, [sanParam]: aim } },
      { products: o.products },
    );
    taStep = plan.steps.find((x) => x.parameter === "total_alkalinity");
    phStep = plan.steps.find((x) => x.parameter === "ph");
    if (taStep) taWords = taStep.words;
    else taWords = "Total alkalinity of the fill water is in range; nothing to add.";
    if (phStep) phWords = phStep.words;
    else phWords = "pH should be in range after the alkalinity step; retest to confirm.";
  }
  const fromPlan = (words: string, minutes: number, st: typeof taStep): Omit<RoutineStep, "order"> => ({
    words,
    timerMinutes: minutes,
    productId: st?.productId ?? null,
    chemical: st?.chemical ?? null,
    grams: st?.grams ?? null,
    millilitres: st?.millilitres ?? null,
    cautions: st?.cautions ?? generalCautions(),
  });
  items.push(fromPlan(taWords, 120, taStep), plain("Wait at least 2 hours with the jets running, then retest.", null));
  items.push(fromPlan(phWords, 120, phStep), plain("Wait at least 2 hours with the jets running, then retest every pad.", null));
  items.push(plain("The tub is ready when every pad is in range (sanitiser, pH, alkalinity). If not, make a new plan from the new reading.", null));
  return build(items);
}

/** Routine care: test before use, small sanitiser top-ups, a shock after heavy use, weekly checks. */
export function routineTopUp(o: RoutineOptions & { bathersPerDay?: number }): RoutineStep[] {
  const items: Omit<RoutineStep, "order">[] = [
    plain("Before each use (at least daily while in use): test sanitiser and pH (common practice).", null),
  ];
  const per1 = sanitiserDose(o, 1);
  if (per1)
    items.push(
      dosed(`Top up: ${amountText(per1.amount, per1.product)} raises ${o.sanitiser === "chlorine" ? "free chlorine" : "bromine"} by 1 mg/L in this tub; add it for each 1 mg/L below the aim, after use or at least an hour before the next.`, 60, per1.product, per1.amount),
    );
  if (o.sanitiser === "chlorine") {
    const shock = sanitiserDose(o, 10);
    if (shock)
      items.push(
        dosed(`After heavy use, shock with the cover off: ${amountText(shock.amount, shock.product)} adds about 10 mg/L (New York §6-1.25 superchlorinates spas to 10 mg/L while closed). Nobody in until free chlorine is back to 4 mg/L or less.`, 24 * 60, shock.product, shock.amount),
      );
  }
  items.push(plain("Weekly: test total alkalinity, hardness and (chlorine tubs) cyanuric acid; rinse the filter.", null));
  if (o.bathersPerDay && o.bathersPerDay > 0)
    items.push(plain(`Drain and refill about every ${drainIntervalDays(o.volumeLitres, o.bathersPerDay)} days (Maine App. B formula), or sooner if the water is cloudy or foams.`, null));
  return build(items);
}

/** Foam: check sanitiser, knock foam down with antifoam at its label rate, then deal with the cause. */
export function foamTreatment(o: RoutineOptions): RoutineStep[] {
  const products = o.products ?? DEFAULT_PRODUCTS;
  const items: Omit<RoutineStep, "order">[] = [
    plain("Test sanitiser first: foam often means low sanitiser or body oils, lotions and soaps in the water.", null),
  ];
  const antifoam = pickProduct(products, "antifoam");
  if (antifoam && antifoam.labelRatePer1000L) {
    const a = labelDose(antifoam, o.volumeLitres);
    items.push(
      dosed(`Add ${amountText(a, antifoam)} onto the foam with the jets running (label-style rate of ${antifoam.labelRatePer1000L} per 1000 L, common practice; your product's label decides).`, 15, antifoam, a),
    );
  }
  const shock = sanitiserDose(o, o.sanitiser === "chlorine" ? 5 : 5);
  if (shock)
    items.push(dosed(`If foam comes back, shock after use with the cover off: ${amountText(shock.amount, shock.product)} (+5 mg/L). Wait 24 h, then retest before anyone uses the tub.`, 24 * 60, shock.product, shock.amount));
  items.push(plain("Rinse or soak the filter. If foam keeps returning, drain and refill: old water with dissolved solids foams.", null));
  return build(items);
}
