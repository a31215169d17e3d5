// The default product catalogue (generic, no brands) and the cautions that go with every dose.
// Owners edit strength, form and package size; the engine takes the catalogue as input.

import type { Product } from "./types";

export const OXIDISER_CAUTION =
  "Oxidiser: keep it dry and away from acids, other chlorine or bromine products, fuels and organic matter; mixing can give off toxic gas, heat or fire.";
export const ACID_CAUTION =
  "Acid: corrosive to skin and eyes; never let it meet chlorine or bromine products (it releases chlorine gas); pour slowly with the jets running.";
// J. Toxicol. Clin. Toxicol. 1995;33(4):349–54 (chemistry.md §5 [P]).
export const NO_HYPO_WITH_DICHLOR =
  "Never let calcium hypochlorite and dichlor or trichlor meet, even as dust in a scoop: they react violently.";

export const DEFAULT_PRODUCTS: Product[] = [
  {
    id: "dichlor-granules",
    name: "Chlorine granules (dichlor)",
    chemical: "sodium_dichloroisocyanurate_dihydrate",
    form: "granules",
    strength: 1.0, // pure dihydrate = 55.4 % available chlorine; commercial "55–56 %" (chemistry.md §2.1 [S])
    packageSize: { amount: 1, unit: "kg" },
    cautions: [OXIDISER_CAUTION, NO_HYPO_WITH_DICHLOR, "Adds cyanuric acid (stabiliser) each time; it builds up until water is replaced."],
  },
  {
    id: "bromine-tablets",
    name: "Bromine tablets (BCDMH)",
    chemical: "bromochlorodimethylhydantoin",
    form: "tablets",
    strength: 0.96, // ~96 % BCDMH (chemistry.md §2.1 [M])
    tabletMassG: 20, // common practice: 20 g tablets
    packageSize: { amount: 1, unit: "kg" },
    cautions: [
      OXIDISER_CAUTION,
      "Use tablets only in a floater or feeder made for bromine; never put chlorine tablets in a bromine feeder.",
      "Tablets dissolve over hours to days; for a quick rise use bromine granules or a chlorine shock to reactivate the bromide.",
    ],
  },
  {
    id: "bromine-granules",
    name: "Bromine granules (BCDMH)",
    chemical: "bromochlorodimethylhydantoin",
    form: "granules",
    strength: 0.96,
    packageSize: { amount: 1, unit: "kg" },
    cautions: [OXIDISER_CAUTION],
  },
  {
    id: "alkalinity-up",
    name: "Alkalinity increaser (sodium bicarbonate)",
    chemical: "sodium_bicarbonate",
    form: "powder",
    strength: 1.0,
    packageSize: { amount: 1, unit: "kg" },
    cautions: ["Raises total alkalinity and pH a little; add no more than the planned amount, then retest."],
  },
  {
    id: "ph-up",
    name: "pH increaser (sodium carbonate, soda ash)",
    chemical: "sodium_carbonate",
    form: "powder",
    strength: 1.0,
    packageSize: { amount: 1, unit: "kg" },
    cautions: ["Alkaline and irritating to eyes and skin; too much clouds the water and can cause scale."],
  },
  {
    id: "ph-down",
    name: "pH decreaser (sodium bisulfate)",
    chemical: "sodium_bisulfate",
    form: "granules",
    strength: 0.93, // 93 % purity (chemistry.md §2.5 [D] uses 93 %)
    packageSize: { amount: 1.5, unit: "kg" },
    cautions: [ACID_CAUTION],
  },
  {
    id: "hardness-up",
    name: "Calcium hardness increaser (calcium chloride)",
    chemical: "calcium_chloride",
    form: "granules",
    strength: 0.94, // anhydrous grade, ~94 % CaCl2 [M]
    packageSize: { amount: 1, unit: "kg" },
    cautions: ["Gets hot as it dissolves: add it slowly to a bucket of water, never water onto it."],
  },
  {
    id: "foam-remover",
    name: "Foam remover (silicone antifoam, liquid)",
    chemical: "silicone_antifoam",
    form: "liquid",
    strength: 1.0,
    densityGPerMl: 1.0,
    // Label-defined; a common label-style rate is about ½ US fl oz per 500 US gal ≈ 8 mL per 1000 L
    // (common practice, from memory). The product's own label decides.
    labelRatePer1000L: 8,
    packageSize: { amount: 500, unit: "mL" },
    cautions: ["It only knocks foam down; foam comes back until its cause (body oils, soaps, low sanitiser, old water) is dealt with."],
  },
  // Optional entries: liquid chlorine and liquid acid.
  {
    id: "liquid-chlorine",
    name: "Liquid chlorine (sodium hypochlorite, 12.5 trade-%)",
    chemical: "sodium_hypochlorite",
    form: "liquid",
    // 125 g/L available chlorine at density 1.20: NaOCl mass fraction = 125 / (0.9525 × 1200) ≈ 0.109
    strength: 0.109,
    densityGPerMl: 1.2,
    availableChlorineGPerL: 125,
    packageSize: { amount: 5, unit: "L" },
    cautions: [OXIDISER_CAUTION, "Raises pH a little when added; loses strength in storage (keep cool and dark)."],
  },
  {
    id: "hydrochloric-acid",
    name: "Hydrochloric acid, 31.45 %",
    chemical: "hydrochloric_acid",
    form: "liquid",
    strength: 0.3145, // 31.45 % HCl, density 1.16 (chemistry.md §2.5; Wojtowicz uses the same [S])
    densityGPerMl: 1.16,
    packageSize: { amount: 5, unit: "L" },
    cautions: [ACID_CAUTION, "Gives off choking fumes: open and pour outdoors, standing upwind."],
  },
];

/** Cautions for every dose, whatever the product (RULES; Maryland Dept. of Health pool-operator guidance [P]). */
export function generalCautions(product?: Pick<Product, "form">): string[] {
  const out = [
    "Add chemical to water, never water to chemical.",
    "Never mix products: add one product at a time, never put different products in the same container or add them together.",
    "Never dose with anyone in the tub; keep everyone out until the retest says the water is in range.",
    "Wear gloves and eye protection.",
    "Store away from children and pets, closed, cool and dry.",
  ];
  if (product && (product.form === "granules" || product.form === "powder"))
    out.splice(2, 0, "Pre-dissolve granules or powder in a bucket of warm water, then pour it in with the jets running (unless the label says otherwise).");
  if (product && product.form === "liquid") out.splice(2, 0, "Pour liquids slowly near a running jet; do not splash.");
  if (product && product.form === "tablets") out.splice(2, 0, "Put tablets in a floater or feeder, never loose in the tub.");
  out.push("Follow the product label; it and local codes decide over this plan.");
  return out;
}

export function cautionsFor(product: Product | null): string[] {
  return [...generalCautions(product ?? undefined), ...(product?.cautions ?? [])];
}

export type ProductRole =
  | "chlorine"
  | "bromine"
  | "alkalinity_up"
  | "ph_up"
  | "acid"
  | "hardness_up"
  | "antifoam";

const ROLE_BY_CHEMICAL: Record<string, ProductRole> = {
  sodium_dichloroisocyanurate_dihydrate: "chlorine",
  sodium_dichloroisocyanurate_anhydrous: "chlorine",
  calcium_hypochlorite: "chlorine",
  sodium_hypochlorite: "chlorine",
  bromochlorodimethylhydantoin: "bromine",
  sodium_bicarbonate: "alkalinity_up",
  sodium_carbonate: "ph_up",
  sodium_bisulfate: "acid",
  hydrochloric_acid: "acid",
  calcium_chloride: "hardness_up",
  silicone_antifoam: "antifoam",
};

export function roleOf(product: Product): ProductRole | null {
  return ROLE_BY_CHEMICAL[product.chemical] ?? null;
}

export const KNOWN_CHEMICALS = Object.keys(ROLE_BY_CHEMICAL);

/** Default wait before retesting: about 24 h after a sanitiser or shock dose, 2 h after balance products. */
export function retestHoursFor(product: Product): number {
  if (product.retestAfterHours !== undefined) return product.retestAfterHours;
  const role = roleOf(product);
  if (role === "chlorine" || role === "bromine") return 24;
  if (role === "antifoam") return 0;
  return 2;
}

/**
 * Pick the product for a role. Order of preference: the listed order in the catalogue, except
 * that tablets are passed over when granules of the same role exist (a dose should act now).
 */
export function pickProduct(products: Product[], role: ProductRole): Product | null {
  const candidates = products.filter((p) => roleOf(p) === role);
  if (candidates.length === 0) return null;
  return candidates.find((p) => p.form !== "tablets") ?? candidates[0]!;
}
