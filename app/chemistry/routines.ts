// Guided routines with timers: first fill, routine top-ups, foam treatment.

import { analyteWord } from "./analytes";
import { bromineDose, chlorineDose, labelDose, type Amount } from "./doses";
import { planTreatment } from "./plan";
import { DEFAULT_PRODUCTS, WAIT_HOURS, cautionsFor, pickProduct } from "./products";
import { resolveTargets } from "./targets";
import type { Guidance, Product, Readings, Sanitiser, Units } from "./types";
import { displayAmount } from "./units";
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
  /** The amount in the owner's units, with a kitchen measure for small doses. */
  amountText?: string;
  /** A shock dose: the tub stays closed longer. */
  shock?: boolean;
  cautions: string[];
}

export interface RoutineOptions {
  volumeLitres: number;
  sanitiser: Sanitiser;
  products?: Product[];
  temperatureC?: number;
  units?: Units;
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

function dosed(words: string, timerMinutes: number | null, product: Product, a: Amount, units: Units = "metric", shock = false): Omit<RoutineStep, "order"> {
  return { words, timerMinutes, productId: product.id, chemical: product.chemical, grams: round(a.grams), millilitres: round(a.millilitres), amountText: displayAmount(product, a, units).text, shock, cautions: cautionsFor(product) };
}

function sanitiserDose(o: RoutineOptions, delta: number): { product: Product; amount: Amount } | null {
  const products = o.products ?? DEFAULT_PRODUCTS;
  const product = pickProduct(products, o.sanitiser === "chlorine" ? "chlorine" : "bromine");
  if (!product) return null;
  const amount = o.sanitiser === "chlorine" ? chlorineDose(product, delta, o.volumeLitres) : bromineDose(product, delta, o.volumeLitres);
  return { product, amount };
}

const amountText = (a: Amount, p: Product, units: Units = "metric") => `${displayAmount(p, a, units).text} of ${p.name}`;

/**
 * First fill: the plan's start-up steps (a shock well above the routine aim; bromine: a bromide
 * reserve, then an oxidiser to activate it), then alkalinity, pH and hardness from the fill-water
 * reading, each with the wait the plan gives it. Without a fill-water reading, the owner tests
 * after the shock has mixed and the routine gives the amounts from that reading.
 */
export function firstFillRoutine(o: RoutineOptions & { fillReadings?: Readings; units?: Units; guidance?: Guidance }): RoutineStep[] {
  const t = resolveTargets(o.sanitiser, undefined, o.guidance);
  const sanParam = o.sanitiser === "chlorine" ? "free_chlorine" : "bromine";
  const items: Omit<RoutineStep, "order">[] = [
    plain("Fill the tub through the filter housing with a garden hose, switch on, and run the jets and heater so the water circulates.", 30),
  ];
  const readings: Readings = { ...(o.fillReadings ?? {}) };
  const plan = planTreatment(
    { volumeLitres: o.volumeLitres, sanitiser: o.sanitiser, setTemperatureC: o.temperatureC, readings, mode: "first_fill", units: o.units, guidance: o.guidance },
    { products: o.products },
  );
  const hasBalance = readings.ph !== undefined && readings.ph !== null && readings.total_alkalinity !== undefined && readings.total_alkalinity !== null;
  for (const st of plan.steps) {
    const minutes = Math.round(st.retestAfterHours * 60);
    if (st.kind === "dose")
      items.push({ words: st.words, timerMinutes: minutes > 0 ? minutes : null, productId: st.productId, chemical: st.chemical, grams: st.grams, millilitres: st.millilitres, amountText: st.amountText, shock: st.shock ?? false, cautions: st.cautions });
    else items.push(plain(st.words, minutes > 0 ? minutes : null));
  }
  if (!hasBalance)
    items.push(
      plain(
        `Test the water with a strip after about 30 minutes of circulation (common practice): the routine then gives the amounts for total alkalinity (${t.total_alkalinity.min}–${t.total_alkalinity.max} mg/L), pH (${t.ph.min}–${t.ph.max}) and hardness.`,
        null,
      ),
    );
  items.push(
    plain(
      `The tub is ready when every pad is in range (${analyteWord(sanParam)} ${t[sanParam].min}–${t[sanParam].max} mg/L after the start-up shock has fallen back, pH, alkalinity). If not, make a new plan from the new reading.`,
      null,
    ),
  );
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
      dosed(`Top up: ${amountText(per1.amount, per1.product, o.units)} raises ${analyteWord(o.sanitiser === "chlorine" ? "free_chlorine" : "bromine")} by 1 mg/L in this tub; add it for each 1 mg/L below the aim, after use or at least an hour before the next.`, WAIT_HOURS.sanitiser * 60, per1.product, per1.amount, o.units),
    );
  if (o.sanitiser === "chlorine") {
    const shock = sanitiserDose(o, 10);
    if (shock)
      items.push(
        dosed(`After heavy use, shock with the cover off: ${amountText(shock.amount, shock.product, o.units)} adds about 10 mg/L (New York §6-1.25 superchlorinates spas to 10 mg/L while closed). Nobody in until free chlorine is back to 4 mg/L or less; retest after ${WAIT_HOURS.shock} h.`, WAIT_HOURS.shock * 60, shock.product, shock.amount, o.units, true),
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
      dosed(`Add ${amountText(a, antifoam, o.units)} onto the foam with the jets running (label-style rate of ${antifoam.labelRatePer1000L} per 1000 L, common practice; your product's label decides).`, 15, antifoam, a, o.units),
    );
  }
  const rise = o.sanitiser === "chlorine" ? 10 : 10;
  const shock = sanitiserDose(o, rise);
  if (shock)
    items.push(
      dosed(`If foam comes back, shock after use with the cover off: ${amountText(shock.amount, shock.product, o.units)} (+${rise} mg/L). Wait ${WAIT_HOURS.shock} h, then retest before anyone uses the tub.`, WAIT_HOURS.shock * 60, shock.product, shock.amount, o.units, true),
    );
  items.push(plain("Rinse or soak the filter. If foam keeps returning, drain and refill: old water with dissolved solids foams.", null));
  return build(items);
}
