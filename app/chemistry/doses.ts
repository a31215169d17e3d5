// Doses from stoichiometry (chemistry.md §2), never from a lookup table.

import {
  ATOMIC_WEIGHT,
  AVAILABLE_CHLORINE,
  BROMINE_AS_BR2_PER_G_BCDMH,
  EQUIVALENT_WEIGHT,
  MOLAR_MASS,
} from "./constants";
import type { Product } from "./types";

export class ProductError extends Error {}

export interface Amount {
  grams: number | null;
  millilitres: number | null;
  tablets: number | null;
}

/** Turn grams of active ingredient into the amount of this product (grams for solids, mL for liquids). */
export function productAmount(product: Product, gramsActive: number): Amount {
  if (!(product.strength > 0 && product.strength <= 1))
    throw new ProductError(`The product "${product.name}" needs a strength between 0 and 1 (a fraction, e.g. 0.56 for 56 %).`);
  return wholeProductAmount(product, gramsActive / product.strength);
}

/** Available chlorine (g Cl2) per gram of the pure active ingredient. */
export function availableChlorineOfChemical(chemical: string): number {
  switch (chemical) {
    case "sodium_dichloroisocyanurate_dihydrate":
      return AVAILABLE_CHLORINE.dichlorDihydrate;
    case "sodium_dichloroisocyanurate_anhydrous":
      return AVAILABLE_CHLORINE.dichlorAnhydrous;
    case "calcium_hypochlorite":
      return AVAILABLE_CHLORINE.calciumHypochlorite;
    case "sodium_hypochlorite":
      return AVAILABLE_CHLORINE.sodiumHypochlorite;
    default:
      throw new ProductError(`"${chemical}" is not a chlorine product the engine knows.`);
  }
}

/** Turn grams of the whole product into the amount (grams for solids, mL for liquids). */
function wholeProductAmount(product: Product, gramsProduct: number): Amount {
  if (product.form === "liquid") {
    const density = product.densityGPerMl ?? 1;
    if (!(density > 0)) throw new ProductError(`The liquid "${product.name}" needs a density above 0 g/mL.`);
    return { grams: null, millilitres: gramsProduct / density, tablets: null };
  }
  const tablets = product.form === "tablets" && product.tabletMassG && product.tabletMassG > 0 ? gramsProduct / product.tabletMassG : null;
  return { grams: gramsProduct, millilitres: null, tablets };
}

/**
 * The label's available chlorine (0–1) the product's strength implies: strength × the pure
 * compound's available chlorine (chemistry.md §2.1 [D]).
 */
export function impliedAvailableChlorine(product: Pick<Product, "chemical" | "strength">): number {
  return product.strength * availableChlorineOfChemical(product.chemical);
}

/**
 * Dichlor is sold nearly pure (the label's 55–62 % is its available chlorine, chemistry.md §2.1).
 * A strength below 0.8 on a dichlor product is almost surely that label figure typed as purity,
 * which would overdose 1.8×; refuse it unless the available chlorine is given as well.
 */
export function checkChlorineStrength(product: Product): void {
  if (!product.chemical.startsWith("sodium_dichloroisocyanurate")) return;
  if (product.availableChlorine !== undefined) return;
  if (product.strength < 0.8) {
    const pure = availableChlorineOfChemical(product.chemical);
    throw new ProductError(
      `The product "${product.name}" has strength ${product.strength}, which looks like the label's available chlorine: dichlor is sold nearly pure (pure ${product.chemical.endsWith("anhydrous") ? "anhydrous dichlor" : "dichlor dihydrate"} has ${Math.round(pure * 1000) / 10} % available chlorine). Give that label figure as availableChlorine, or the purity (e.g. 0.99) as strength.`,
    );
  }
}

/** Amount of a chlorine product that raises free chlorine by deltaMgL in volumeLitres. */
export function chlorineDose(product: Product, deltaMgL: number, volumeLitres: number): Amount {
  const gCl2 = (deltaMgL * volumeLitres) / 1000;
  if (product.availableChlorine !== undefined) {
    if (!(product.availableChlorine > 0 && product.availableChlorine <= 1))
      throw new ProductError(`The product "${product.name}" needs an available chlorine between 0 and 1 (e.g. 0.56 for 56 %).`);
    return wholeProductAmount(product, gCl2 / product.availableChlorine);
  }
  checkChlorineStrength(product);
  if (product.chemical === "sodium_hypochlorite" && product.form === "liquid" && product.availableChlorineGPerL !== undefined) {
    if (!(product.availableChlorineGPerL > 0))
      throw new ProductError(`The product "${product.name}" needs available chlorine above 0 g/L.`);
    return { grams: null, millilitres: (gCl2 / product.availableChlorineGPerL) * 1000, tablets: null };
  }
  return productAmount(product, gCl2 / availableChlorineOfChemical(product.chemical));
}

/**
 * Sodium bromide for a bromide reserve of bromideMgL (as Br⁻): M(NaBr)/M(Br) = 1.288 g per g of
 * bromide (stoichiometry, IUPAC atomic weights).
 */
export function bromideDose(product: Product, bromideMgL: number, volumeLitres: number): Amount {
  if (product.chemical !== "sodium_bromide") throw new ProductError(`"${product.chemical}" is not sodium bromide.`);
  return productAmount(product, ((bromideMgL * volumeLitres) / 1000) * (MOLAR_MASS.NaBr / ATOMIC_WEIGHT.Br));
}

/** Amount of a BCDMH product that raises total bromine (as Br2) by deltaMgL (chemistry.md §2.6). */
export function bromineDose(product: Product, deltaMgL: number, volumeLitres: number): Amount {
  const gBr2 = (deltaMgL * volumeLitres) / 1000;
  return productAmount(product, gBr2 / BROMINE_AS_BR2_PER_G_BCDMH);
}

const MOLAR_MASS_BY_CHEMICAL: Record<string, number> = {
  sodium_bicarbonate: MOLAR_MASS.NaHCO3,
  sodium_carbonate: MOLAR_MASS.Na2CO3,
  sodium_bisulfate: MOLAR_MASS.NaHSO4,
  hydrochloric_acid: MOLAR_MASS.HCl,
  calcium_chloride: MOLAR_MASS.CaCl2,
};

/** Amount of an acid/base product for molPerL of active ingredient in volumeLitres. */
export function molarDose(product: Product, molPerL: number, volumeLitres: number): Amount {
  const M = MOLAR_MASS_BY_CHEMICAL[product.chemical];
  if (M === undefined) throw new ProductError(`"${product.chemical}" is not an acid, base or hardness product the engine knows.`);
  return productAmount(product, molPerL * volumeLitres * M);
}

/**
 * Amount to change total alkalinity by |deltaMgL| (mg/L as CaCO3) from equivalent weights:
 * g = Δ(meq/L) × V(L) × EW(g/eq) / 1000.
 */
export function alkalinityDose(product: Product, deltaMgL: number, volumeLitres: number): Amount {
  const meqPerL = Math.abs(deltaMgL) / EQUIVALENT_WEIGHT.CaCO3;
  const ew: Record<string, number> = {
    sodium_bicarbonate: EQUIVALENT_WEIGHT.NaHCO3,
    sodium_carbonate: EQUIVALENT_WEIGHT.Na2CO3,
    sodium_bisulfate: EQUIVALENT_WEIGHT.NaHSO4,
    hydrochloric_acid: EQUIVALENT_WEIGHT.HCl,
  };
  const e = ew[product.chemical];
  if (e === undefined) throw new ProductError(`"${product.chemical}" does not adjust total alkalinity.`);
  return productAmount(product, (meqPerL * volumeLitres * e) / 1000);
}

/** Calcium chloride to raise calcium hardness by deltaMgL (as CaCO3): 2 eq per mol, EW 55.49. */
export function hardnessDose(product: Product, deltaMgL: number, volumeLitres: number): Amount {
  if (product.chemical !== "calcium_chloride") throw new ProductError(`"${product.chemical}" does not raise calcium hardness.`);
  const meqPerL = deltaMgL / EQUIVALENT_WEIGHT.CaCO3;
  return productAmount(product, (meqPerL * volumeLitres * EQUIVALENT_WEIGHT.CaCl2) / 1000);
}

/** Label-style dose (foam remover): rate per 1000 L. Common practice / label-defined. */
export function labelDose(product: Product, volumeLitres: number): Amount {
  const rate = product.labelRatePer1000L;
  if (!(rate !== undefined && rate > 0)) throw new ProductError(`The product "${product.name}" needs a label rate per 1000 L.`);
  const qty = (rate * volumeLitres) / 1000;
  return product.form === "liquid" ? { grams: null, millilitres: qty, tablets: null } : { grams: qty, millilitres: null, tablets: null };
}
