// Volume, units and the drain-and-refill interval.

import { LITRES_PER_US_GALLON } from "./constants";

export type Shape = "round" | "square" | "rectangular";

export type InsideDimsCm =
  | { diameter: number }
  | { side: number }
  | { length: number; width: number };

/**
 * Water one moulded seat displaces: a block about 50 × 50 cm, 40 cm high ≈ 100 L; a lounger about
 * twice that (common practice estimate, from memory). Footwells are already below the water depth.
 */
export const LITRES_PER_SEAT = 100;

/**
 * Water volume (L) from inside dimensions and water depth in cm, less what the seats displace
 * (an estimate; the tub's manual gives the true figure).
 */
export function estimateVolumeLitres(shape: Shape, insideDimsCm: InsideDimsCm, depthCm: number, o: { seats?: number } = {}): number {
  const pos = (n: unknown, what: string) => {
    if (typeof n !== "number" || !Number.isFinite(n) || n <= 0) throw new RangeError(`The ${what} must be a positive number of centimetres.`);
    return n;
  };
  const d = pos(depthCm, "water depth");
  let areaCm2: number;
  if (shape === "round") {
    const dia = pos((insideDimsCm as { diameter?: number }).diameter, "inside diameter");
    areaCm2 = Math.PI * (dia / 2) ** 2;
  } else if (shape === "square") {
    const s = pos((insideDimsCm as { side?: number }).side ?? (insideDimsCm as { length?: number }).length, "inside side");
    areaCm2 = s * s;
  } else if (shape === "rectangular") {
    const dims = insideDimsCm as { length?: number; width?: number };
    areaCm2 = pos(dims.length, "inside length") * pos(dims.width, "inside width");
  } else {
    throw new RangeError(`Unknown tub shape "${String(shape)}"; use round, square or rectangular.`);
  }
  const seats = Math.max(0, Math.min(12, Math.round(o.seats ?? 0)));
  const gross = (areaCm2 * d) / 1000;
  // never take away more than half the shell: a tiny tub with many seats is a typing slip
  return Math.max(gross / 2, gross - seats * LITRES_PER_SEAT);
}

/** US gallons → litres (1 US gal = 3.785411784 L exactly, NIST Handbook 44 App. C). */
export const litresFromUsGallons = (usGallons: number): number => usGallons * LITRES_PER_US_GALLON;
/** Litres → US gallons. */
export const usGallonsFromLitres = (litres: number): number => litres / LITRES_PER_US_GALLON;

/**
 * Drain-and-refill interval in whole days (rounded down, at least 1):
 * days = (V in US gal ÷ 3) ÷ bathers per day, capped at 365 — Maine 10-144 CMR ch. 202 App. B "Water
 * Replacement Interval" [P]; the same formula is in Montana ARM 37.115 [P].
 */
export function drainIntervalDays(volumeLitres: number, bathersPerDay: number): number {
  if (!(Number.isFinite(volumeLitres) && volumeLitres > 0)) throw new RangeError("The volume must be a positive number of litres.");
  if (!(Number.isFinite(bathersPerDay) && bathersPerDay > 0)) throw new RangeError("Bathers per day must be a positive number.");
  const days = usGallonsFromLitres(volumeLitres) / 3 / bathersPerDay;
  // Very light use gives very long intervals; cap at a year (common practice: drain at least yearly).
  return Math.min(365, Math.max(1, Math.floor(days)));
}
