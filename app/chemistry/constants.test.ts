import { describe, expect, it } from "vitest";
import {
  AVAILABLE_CHLORINE,
  BROMINE_AS_BR2_PER_G_BCDMH,
  CH_PER_FC_FROM_CAL_HYPO,
  CYA_PER_FC_FROM_DICHLOR,
  EQUIVALENT_WEIGHT,
  MOLAR_MASS,
} from "./constants";
import { alkalinityDose, bromineDose, chlorineDose, hardnessDose } from "./doses";
import { DEFAULT_PRODUCTS } from "./products";
import type { Product } from "./types";
import { litresFromUsGallons } from "./volume";

const product = (p: Partial<Product> & Pick<Product, "chemical" | "form">): Product => ({
  id: "x",
  name: "test product",
  strength: 1,
  packageSize: { amount: 1, unit: "kg" },
  cautions: [],
  ...p,
});

// Molar masses from IUPAC conventional atomic weights (H 1.008, C 12.011, N 14.007, O 15.999,
// Na 22.990, S 32.06, Cl 35.45, Ca 40.078, Br 79.904).
describe("molar masses (IUPAC atomic weights)", () => {
  it("match the chemistry.md §2.1 table", () => {
    expect(MOLAR_MASS.dichlorAnhydrous).toBeCloseTo(219.94, 1);
    expect(MOLAR_MASS.dichlorDihydrate).toBeCloseTo(255.97, 1);
    expect(MOLAR_MASS.calciumHypochlorite).toBeCloseTo(142.98, 1);
    expect(MOLAR_MASS.sodiumHypochlorite).toBeCloseTo(74.44, 1);
    expect(MOLAR_MASS.bcdmh).toBeCloseTo(241.47, 1);
    expect(MOLAR_MASS.cyanuricAcid).toBeCloseTo(129.07, 1);
  });
});

describe("available chlorine from molar masses (n(Cl+) × M(Cl2) / M)", () => {
  it("dichlor dihydrate 55.4 %, anhydrous 64.5 %, Ca(OCl)2 99.2 %, NaOCl 95.25 %", () => {
    expect(AVAILABLE_CHLORINE.dichlorDihydrate * 100).toBeCloseTo(55.4, 1);
    expect(AVAILABLE_CHLORINE.dichlorAnhydrous * 100).toBeCloseTo(64.5, 1);
    expect(AVAILABLE_CHLORINE.calciumHypochlorite * 100).toBeCloseTo(99.2, 1);
    expect(AVAILABLE_CHLORINE.sodiumHypochlorite * 100).toBeCloseTo(95.25, 1);
  });
  it("by-products: 0.910 mg/L CYA per mg/L FC from dichlor (PWTAG fact sheet '0.91 ppm' [S]); 0.706 CH from cal hypo [D]", () => {
    expect(CYA_PER_FC_FROM_DICHLOR).toBeCloseTo(0.91, 2);
    expect(CH_PER_FC_FROM_CAL_HYPO).toBeCloseTo(0.706, 3);
  });
  it("grams per 1000 L per +1 mg/L (chemistry.md §2.2): dihydrate 1.805, anhydrous 1.551, cal hypo 65 % 1.538", () => {
    const dose = (p: Product) => chlorineDose(p, 1, 1000).grams!;
    expect(dose(product({ chemical: "sodium_dichloroisocyanurate_dihydrate", form: "granules" }))).toBeCloseTo(1.805, 2);
    expect(dose(product({ chemical: "sodium_dichloroisocyanurate_anhydrous", form: "granules" }))).toBeCloseTo(1.551, 2);
    // 65 % available chlorine expressed as active-ingredient fraction 0.65 / 0.9918
    expect(dose(product({ chemical: "calcium_hypochlorite", form: "granules", strength: 0.65 / AVAILABLE_CHLORINE.calciumHypochlorite }))).toBeCloseTo(1.538, 2);
  });
  it("check case: 1500 L needs 2.68 g of 56 % dichlor for +1 mg/L (chemistry.md §2.2 [D])", () => {
    // 56 % is above the dihydrate's theoretical 55.4 %, so express it on the anhydrous basis.
    const p = product({ chemical: "sodium_dichloroisocyanurate_anhydrous", form: "granules", strength: 0.56 / AVAILABLE_CHLORINE.dichlorAnhydrous });
    expect(chlorineDose(p, 1, 1500).grams!).toBeCloseTo(2.68, 2);
  });
  it("sodium hypochlorite by g/L available chlorine: 12.5 trade-% = 8.0 mL per 1000 L per +1 mg/L", () => {
    const p = DEFAULT_PRODUCTS.find((x) => x.id === "liquid-chlorine")!;
    expect(chlorineDose(p, 1, 1000).millilitres!).toBeCloseTo(8.0, 2);
    // the catalogue's strength × density agrees with its g/L figure within 1 %
    const { availableChlorineGPerL, ...byStrength } = p;
    expect(chlorineDose(byStrength as Product, 1, 1000).millilitres!).toBeCloseTo(8.0, 0);
    expect(availableChlorineGPerL).toBe(125);
  });
  it("BCDMH: 0.755 g per 1000 L per +1 mg/L total bromine; 0.787 g at 96 % (chemistry.md §2.6 [D])", () => {
    expect(1 / BROMINE_AS_BR2_PER_G_BCDMH).toBeCloseTo(0.755, 3);
    const p = product({ chemical: "bromochlorodimethylhydantoin", form: "granules", strength: 0.96 });
    expect(bromineDose(p, 1, 1000).grams!).toBeCloseTo(0.787, 3);
  });
});

describe("alkalinity and hardness doses from equivalent weights", () => {
  it("equivalent weights: CaCO3 50.04, NaHCO3 84.01, Na2CO3 52.99, NaHSO4 120.05, HCl 36.46, CaCl2 55.49", () => {
    expect(EQUIVALENT_WEIGHT.CaCO3).toBeCloseTo(50.04, 2);
    expect(EQUIVALENT_WEIGHT.NaHCO3).toBeCloseTo(84.01, 2);
    expect(EQUIVALENT_WEIGHT.Na2CO3).toBeCloseTo(52.99, 2);
    expect(EQUIVALENT_WEIGHT.NaHSO4).toBeCloseTo(120.05, 1);
    expect(EQUIVALENT_WEIGHT.HCl).toBeCloseTo(36.46, 2);
    expect(EQUIVALENT_WEIGHT.CaCl2).toBeCloseTo(55.49, 2);
  });
  it("g per 1000 L per 10 mg/L (chemistry.md §2.5): NaHCO3 16.8, Na2CO3 10.6, NaHSO4 24.0 (25.8 at 93 %), CaCl2 11.1", () => {
    expect(alkalinityDose(product({ chemical: "sodium_bicarbonate", form: "powder" }), 10, 1000).grams!).toBeCloseTo(16.8, 1);
    expect(alkalinityDose(product({ chemical: "sodium_carbonate", form: "powder" }), 10, 1000).grams!).toBeCloseTo(10.6, 1);
    expect(alkalinityDose(product({ chemical: "sodium_bisulfate", form: "granules" }), 10, 1000).grams!).toBeCloseTo(24.0, 1);
    expect(alkalinityDose(product({ chemical: "sodium_bisulfate", form: "granules", strength: 0.93 }), 10, 1000).grams!).toBeCloseTo(25.8, 1);
    expect(hardnessDose(product({ chemical: "calcium_chloride", form: "granules" }), 10, 1000).grams!).toBeCloseTo(11.1, 1);
  });
  it("hydrochloric acid 31.45 %, d 1.16: 20.0 mL per 1000 L per 10 mg/L (chemistry.md §2.5)", () => {
    const p = DEFAULT_PRODUCTS.find((x) => x.id === "hydrochloric-acid")!;
    expect(alkalinityDose(p, 10, 1000).millilitres!).toBeCloseTo(20.0, 1);
  });

  // New York State Sanitary Code 10 NYCRR §6-1.30 (casetext / Westlaw copy), "Alkalinity control".
  const LB = 453.59237;
  const gal = (n: number) => litresFromUsGallons(n);
  it("NY §6-1.30: 1½ lb NaHCO3 raises 10,000 gal by 10 mg/L (stoichiometry: 10.7, the code's figure is round)", () => {
    const gPer10 = alkalinityDose(product({ chemical: "sodium_bicarbonate", form: "powder" }), 10, gal(10000)).grams!;
    expect(gPer10 / LB).toBeCloseTo(1.4, 1);
    expect(((1.5 * LB) / gPer10) * 10).toBeCloseTo(10.7, 1);
  });
  it("NY §6-1.30: 1 pint of muriatic acid per 5,000 gal lowers TA by about 12 mg/L (model: 12.5)", () => {
    const p = DEFAULT_PRODUCTS.find((x) => x.id === "hydrochloric-acid")!;
    const mlPerMgL = alkalinityDose(p, 1, gal(5000)).millilitres!;
    const pintMl = gal(1 / 8) * 1000;
    const drop = pintMl / mlPerMgL;
    expect(drop).toBeGreaterThan(11.5);
    expect(drop).toBeLessThan(13);
  });
  it("NY §6-1.30: or 1.25 lb sodium bisulfate per 5,000 gal → about 12.5 mg/L", () => {
    const gPerMgL = alkalinityDose(product({ chemical: "sodium_bisulfate", form: "granules" }), 1, gal(5000)).grams!;
    expect((1.25 * LB) / gPerMgL).toBeCloseTo(12.5, 0);
  });
});
