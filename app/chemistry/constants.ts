// Molar masses and equivalent weights, computed from atomic weights rather than typed in.
//
// Source: IUPAC Commission on Isotopic Abundances and Atomic Weights, conventional / abridged
// standard atomic weights (H 1.008, C 12.011, N 14.007, O 15.999, Na 22.990, S 32.06,
// Cl 35.45, Ca 40.078, Br 79.904, B 10.81), as listed in chemistry.md §2.1 [D].

export const ATOMIC_WEIGHT = {
  H: 1.008,
  B: 10.81,
  C: 12.011,
  N: 14.007,
  O: 15.999,
  Na: 22.99,
  S: 32.06,
  Cl: 35.45,
  Ca: 40.078,
  Br: 79.904,
  K: 39.098,
} as const;

type Element = keyof typeof ATOMIC_WEIGHT;

/** Molar mass (g/mol) of a formula given as element counts, e.g. { Na: 1, H: 1, C: 1, O: 3 }. */
export function molarMass(formula: Partial<Record<Element, number>>): number {
  let m = 0;
  for (const [el, n] of Object.entries(formula) as [Element, number][]) m += ATOMIC_WEIGHT[el] * n;
  return m;
}

const W = { H: 1.008, O: 15.999 };
const WATER = 2 * W.H + W.O;

export const MOLAR_MASS = {
  Cl2: molarMass({ Cl: 2 }),
  Br2: molarMass({ Br: 2 }),
  CaCO3: molarMass({ Ca: 1, C: 1, O: 3 }),
  NaHCO3: molarMass({ Na: 1, H: 1, C: 1, O: 3 }),
  Na2CO3: molarMass({ Na: 2, C: 1, O: 3 }),
  NaHSO4: molarMass({ Na: 1, H: 1, S: 1, O: 4 }),
  HCl: molarMass({ H: 1, Cl: 1 }),
  CaCl2: molarMass({ Ca: 1, Cl: 2 }),
  /** Sodium dichloroisocyanurate, anhydrous: NaCl2C3N3O3. */
  dichlorAnhydrous: molarMass({ Na: 1, Cl: 2, C: 3, N: 3, O: 3 }),
  /** Sodium dichloroisocyanurate dihydrate: NaCl2C3N3O3·2H2O. */
  dichlorDihydrate: molarMass({ Na: 1, Cl: 2, C: 3, N: 3, O: 3 }) + 2 * WATER,
  /** Calcium hypochlorite Ca(OCl)2. */
  calciumHypochlorite: molarMass({ Ca: 1, O: 2, Cl: 2 }),
  /** Sodium hypochlorite NaOCl. */
  sodiumHypochlorite: molarMass({ Na: 1, O: 1, Cl: 1 }),
  /** 1-bromo-3-chloro-5,5-dimethylhydantoin C5H6BrClN2O2. */
  bcdmh: molarMass({ C: 5, H: 6, Br: 1, Cl: 1, N: 2, O: 2 }),
  /** Sodium bromide NaBr. */
  NaBr: molarMass({ Na: 1, Br: 1 }),
  /** Potassium peroxymonosulfate KHSO5. */
  KHSO5: molarMass({ K: 1, H: 1, S: 1, O: 5 }),
  /** Cyanuric acid C3H3N3O3. */
  cyanuricAcid: molarMass({ C: 3, H: 3, N: 3, O: 3 }),
} as const;

/** Equivalent weights (g/eq) for alkalinity / hardness bookkeeping (chemistry.md §2.5). */
export const EQUIVALENT_WEIGHT = {
  CaCO3: MOLAR_MASS.CaCO3 / 2, // 50.04
  NaHCO3: MOLAR_MASS.NaHCO3 / 1, // 84.01, 1 eq TA per mol
  Na2CO3: MOLAR_MASS.Na2CO3 / 2, // 52.99, 2 eq TA per mol
  NaHSO4: MOLAR_MASS.NaHSO4 / 1, // 120.05, 1 eq acid per mol (HSO4- pKa ≈ 2, fully spent at spa pH)
  HCl: MOLAR_MASS.HCl / 1, // 36.46
  CaCl2: MOLAR_MASS.CaCl2 / 2, // 55.49, 2 eq hardness per mol
} as const;

/**
 * Available chlorine fraction of a pure compound = n(Cl+) × M(Cl2) / M(compound)
 * (each Cl(+1) accepts two electrons, like one Cl2). chemistry.md §2.1.
 */
export const AVAILABLE_CHLORINE = {
  dichlorDihydrate: (2 * MOLAR_MASS.Cl2) / MOLAR_MASS.dichlorDihydrate, // 0.554
  dichlorAnhydrous: (2 * MOLAR_MASS.Cl2) / MOLAR_MASS.dichlorAnhydrous, // 0.645
  calciumHypochlorite: (2 * MOLAR_MASS.Cl2) / MOLAR_MASS.calciumHypochlorite, // 0.992
  sodiumHypochlorite: MOLAR_MASS.Cl2 / MOLAR_MASS.sodiumHypochlorite, // 0.952
} as const;

/**
 * Bromine "as Br2" delivered per gram of BCDMH. One mole releases one HOBr and one HOCl; the
 * HOCl re-oxidises bromide to HOBr, so a total-bromine test reads two 2-electron oxidants, i.e.
 * 2 × M(Br2) per mole (chemistry.md §2.6 [D]): 0.755 g BCDMH per 1000 L per +1 mg/L.
 */
export const BROMINE_AS_BR2_PER_G_BCDMH = (2 * MOLAR_MASS.Br2) / MOLAR_MASS.bcdmh;

/** Cyanuric acid added per mg/L free chlorine from dichlor: M(CYA) / (2 M(Cl2)) = 0.910. */
export const CYA_PER_FC_FROM_DICHLOR = MOLAR_MASS.cyanuricAcid / (2 * MOLAR_MASS.Cl2);

/** Calcium hardness (as CaCO3) added per mg/L FC from pure Ca(OCl)2: M(CaCO3)/(2 M(Cl2)) = 0.706. */
export const CH_PER_FC_FROM_CAL_HYPO = MOLAR_MASS.CaCO3 / (2 * MOLAR_MASS.Cl2);

/** 1 US gallon = 3.785411784 L exactly (NIST Handbook 44, Appendix C). */
export const LITRES_PER_US_GALLON = 3.785411784;

/** 1 avoirdupois ounce = 28.349523125 g; 1 US fluid ounce = 29.5735295625 mL (NIST Handbook 44, Appendix C). */
export const GRAMS_PER_OUNCE = 28.349523125;
export const ML_PER_US_FL_OZ = 29.5735295625;
/** 1 imperial gallon = 4.54609 L exactly (UK Weights and Measures Act 1985). */
export const LITRES_PER_IMPERIAL_GALLON = 4.54609;
