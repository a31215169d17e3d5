// What may go in now: one lock, read by the plan, the treatment log and the first-fill routine.
// After any dose nothing else goes in until its wait is over (the wait rule is waitHoursFor in
// products.ts: a shock keeps the tub closed longer than a maintenance top-up).

import { bromineDose, chlorineDose } from "./doses";
import { DEFAULT_PRODUCTS, SHOCK_RISE, roleOf, waitHoursFor } from "./products";
import type { LoggedTreatment, Product } from "./types";

export interface Lock {
  /** Nothing goes in before this time (ISO 8601). */
  until: string;
  addedAt: string;
  productId: string;
  productName: string;
  chemical: string | null;
  shock: boolean;
  waitHours: number;
}

/** The sanitiser rise (mg/L) a logged amount gives in this tub, or null for other products. */
export function sanitiserRise(product: Product, amount: number, unit: LoggedTreatment["unit"], volumeLitres: number): number | null {
  const role = roleOf(product);
  if (role !== "chlorine" && role !== "bromine") return null;
  try {
    const per1 = role === "chlorine" ? chlorineDose(product, 1, volumeLitres) : bromineDose(product, 1, volumeLitres);
    if (unit === "mL") return per1.millilitres ? amount / per1.millilitres : per1.grams ? amount / per1.grams : null;
    const grams = unit === "tablets" ? amount * (product.tabletMassG ?? 20) : amount;
    if (per1.grams) return grams / per1.grams;
    if (per1.millilitres) return grams / (per1.millilitres * (product.densityGPerMl ?? 1));
    return null;
  } catch {
    return null;
  }
}

/** A dose is a shock when it raises the sanitiser by more than the top of the routine range. */
export function isShockDose(product: Product, amount: number, unit: LoggedTreatment["unit"], volumeLitres: number): boolean {
  const rise = sanitiserRise(product, amount, unit, volumeLitres);
  if (rise === null) return false;
  return rise > (roleOf(product) === "bromine" ? SHOCK_RISE.bromine : SHOCK_RISE.chlorine);
}

/** The wait after one logged dose (hours): the same rule the plan gives its steps. */
export function waitHoursForLogged(product: Product, entry: Pick<LoggedTreatment, "amount" | "unit" | "shock">, volumeLitres: number): { hours: number; shock: boolean } {
  const shock = entry.shock ?? isShockDose(product, entry.amount, entry.unit, volumeLitres);
  return { hours: waitHoursFor(product, { shock }), shock };
}

function findProduct(products: Product[], entry: LoggedTreatment): Product | null {
  return (
    products.find((p) => p.id === entry.productId) ??
    DEFAULT_PRODUCTS.find((p) => p.id === entry.productId) ??
    (entry.chemical ? (products.find((p) => p.chemical === entry.chemical) ?? DEFAULT_PRODUCTS.find((p) => p.chemical === entry.chemical) ?? null) : null)
  );
}

/** The lock in force now: the logged dose whose wait ends last, if any wait is still running. */
export function activeLock(log: LoggedTreatment[], o: { products: Product[]; volumeLitres: number; now: Date }): Lock | null {
  let best: Lock | null = null;
  let bestUntil = -Infinity;
  for (const entry of log) {
    const added = Date.parse(entry.addedAt);
    if (!Number.isFinite(added) || added > o.now.getTime() + 60_000) continue;
    const product = findProduct(o.products, entry);
    const { hours, shock } = product
      ? waitHoursForLogged(product, entry, o.volumeLitres)
      : { hours: 2, shock: entry.shock ?? false };
    const until = added + hours * 3600_000;
    if (until > o.now.getTime() && until > bestUntil) {
      bestUntil = until;
      best = {
        until: new Date(until).toISOString(),
        addedAt: new Date(added).toISOString(),
        productId: entry.productId,
        productName: product?.name ?? entry.chemical ?? entry.productId,
        chemical: product?.chemical ?? entry.chemical ?? null,
        shock,
        waitHours: hours,
      };
    }
  }
  return best;
}
