// The default product catalogue (generic, no brands), the cautions that go with every dose and the
// waits after each kind of dose. Cautions and waits belong to the chemical and its form, not to a
// catalogue entry: an owner's own product gets the same ones.

import type { Product, ProductForm } from "./types";

export const OXIDISER_CAUTION =
  "Oxidiser: keep it dry and away from acids, other chlorine or bromine products, fuels and organic matter; mixing can give off toxic gas, heat or fire.";
export const ACID_CAUTION =
  "Acid: corrosive to skin and eyes; never let it meet chlorine or bromine products (it releases chlorine gas); pour slowly with the jets running.";
// J. Toxicol. Clin. Toxicol. 1995;33(4):349–54 (chemistry.md §5 [P]).
export const NO_HYPO_WITH_DICHLOR =
  "Never let calcium hypochlorite and dichlor or trichlor meet, even as dust in a scoop: they react violently.";
const STABILISER_BUILDS_UP = "Adds cyanuric acid (stabiliser) each time; it builds up until water is replaced.";

/** Cautions by active ingredient (chemistry.md §5: Maryland pool-operator guidance [P]; J. Toxicol. Clin. Toxicol. 1995 [P]). */
export const CHEMICAL_CAUTIONS: Record<string, string[]> = {
  sodium_dichloroisocyanurate_dihydrate: [OXIDISER_CAUTION, NO_HYPO_WITH_DICHLOR, STABILISER_BUILDS_UP],
  sodium_dichloroisocyanurate_anhydrous: [OXIDISER_CAUTION, NO_HYPO_WITH_DICHLOR, STABILISER_BUILDS_UP],
  trichloroisocyanuric_acid: [OXIDISER_CAUTION, NO_HYPO_WITH_DICHLOR, STABILISER_BUILDS_UP, "Strongly acidic: lowers pH and alkalinity."],
  calcium_hypochlorite: [OXIDISER_CAUTION, NO_HYPO_WITH_DICHLOR, "Adds calcium each time; raises pH a little."],
  sodium_hypochlorite: [OXIDISER_CAUTION, "Never mix with acid: it releases chlorine gas. Raises pH a little; loses strength in storage (keep cool and dark)."],
  bromochlorodimethylhydantoin: [OXIDISER_CAUTION, "Use tablets only in a floater or feeder made for bromine; never put chlorine tablets in a bromine feeder."],
  sodium_bromide: ["Sodium bromide is not a sanitiser on its own: it becomes bromine only after an oxidiser (shock) is added.", "Keep it dry and away from oxidisers and acids."],
  potassium_monopersulfate: [OXIDISER_CAUTION, "Non-chlorine shock: it does not raise free chlorine; it lowers pH and alkalinity slightly."],
  sodium_bicarbonate: ["Raises total alkalinity and pH a little; add no more than the planned amount, then retest."],
  sodium_carbonate: ["Alkaline and irritating to eyes and skin; too much clouds the water and can cause scale."],
  sodium_bisulfate: [ACID_CAUTION],
  hydrochloric_acid: [ACID_CAUTION, "Gives off choking fumes: open and pour outdoors, standing upwind."],
  calcium_chloride: ["Gets hot as it dissolves: add it slowly to a bucket of water, never water onto it."],
  silicone_antifoam: ["It only knocks foam down; foam comes back until its cause (body oils, soaps, low sanitiser, old water) is dealt with."],
};

const UNKNOWN_CHEMICAL_CAUTION = "The engine does not know this chemical: read its label and safety data sheet before using it.";

/**
 * Approximate bulk densities (g/mL) of the usual granules and powders, for kitchen measures only
 * (from memory; baking soda ≈ 4.6 g per US teaspoon is the USDA food table's figure, from memory).
 * A measure is a guide: weigh the dose when it matters.
 */
export const BULK_DENSITY: Record<string, number> = {
  sodium_dichloroisocyanurate_dihydrate: 0.9,
  sodium_dichloroisocyanurate_anhydrous: 0.9,
  calcium_hypochlorite: 0.85,
  bromochlorodimethylhydantoin: 0.9,
  sodium_bromide: 1.4,
  potassium_monopersulfate: 1.1,
  sodium_bicarbonate: 0.93,
  sodium_carbonate: 1.0,
  sodium_bisulfate: 1.1,
  calcium_chloride: 0.9,
};

export const DEFAULT_PRODUCTS: Product[] = [
  {
    id: "dichlor-granules",
    name: "Chlorine granules (dichlor)",
    chemical: "sodium_dichloroisocyanurate_dihydrate",
    form: "granules",
    strength: 1.0, // pure dihydrate = 55.4 % available chlorine; commercial "55–56 %" (chemistry.md §2.1 [S])
    packageSize: { amount: 1, unit: "kg" },
    cautions: [],
  },
  {
    id: "bromine-tablets",
    name: "Bromine tablets (BCDMH)",
    chemical: "bromochlorodimethylhydantoin",
    form: "tablets",
    strength: 0.96, // ~96 % BCDMH (chemistry.md §2.1 [M])
    tabletMassG: 20, // common practice: 20 g tablets
    packageSize: { amount: 1, unit: "kg" },
    cautions: ["Tablets dissolve over hours to days; for a quick rise use bromine granules or a shock to reactivate the bromide."],
  },
  {
    id: "bromine-granules",
    name: "Bromine granules (BCDMH)",
    chemical: "bromochlorodimethylhydantoin",
    form: "granules",
    strength: 0.96,
    packageSize: { amount: 1, unit: "kg" },
    cautions: [],
  },
  {
    id: "bromide-reserve",
    name: "Bromide reserve (sodium bromide)",
    chemical: "sodium_bromide",
    form: "granules",
    strength: 0.99, // technical grade [M]
    packageSize: { amount: 1, unit: "kg" },
    cautions: [],
  },
  {
    id: "alkalinity-up",
    name: "Alkalinity increaser (sodium bicarbonate)",
    chemical: "sodium_bicarbonate",
    form: "powder",
    strength: 1.0,
    packageSize: { amount: 1, unit: "kg" },
    cautions: [],
  },
  {
    id: "ph-up",
    name: "pH increaser (sodium carbonate, soda ash)",
    chemical: "sodium_carbonate",
    form: "powder",
    strength: 1.0,
    packageSize: { amount: 1, unit: "kg" },
    cautions: [],
  },
  {
    id: "ph-down",
    name: "pH decreaser (sodium bisulfate)",
    chemical: "sodium_bisulfate",
    form: "granules",
    strength: 0.93, // 93 % purity (chemistry.md §2.5 [D] uses 93 %)
    packageSize: { amount: 1.5, unit: "kg" },
    cautions: [],
  },
  {
    id: "hardness-up",
    name: "Calcium hardness increaser (calcium chloride)",
    chemical: "calcium_chloride",
    form: "granules",
    strength: 0.94, // anhydrous grade, ~94 % CaCl2 [M]
    packageSize: { amount: 1, unit: "kg" },
    cautions: [],
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
    cautions: [],
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
    cautions: [],
  },
  {
    id: "hydrochloric-acid",
    name: "Hydrochloric acid, 31.45 %",
    chemical: "hydrochloric_acid",
    form: "liquid",
    strength: 0.3145, // 31.45 % HCl, density 1.16 (chemistry.md §2.5; Wojtowicz uses the same [S])
    densityGPerMl: 1.16,
    packageSize: { amount: 5, unit: "L" },
    cautions: [],
  },
];

/**
 * A non-chlorine shock an owner may add to the catalogue. Label-style rate: about 1 US tablespoon
 * (≈ 17 g) per 250 US gal ≈ 18 g per 1000 L (common practice, from memory); the label decides.
 */
export const NON_CHLORINE_SHOCK: Product = {
  id: "non-chlorine-shock",
  name: "Non-chlorine shock (potassium monopersulfate)",
  chemical: "potassium_monopersulfate",
  form: "granules",
  strength: 1.0,
  labelRatePer1000L: 18,
  packageSize: { amount: 1, unit: "kg" },
  cautions: [],
};

/** Products an owner can add to the catalogue beside the defaults. */
export const OPTIONAL_PRODUCTS: Product[] = [NON_CHLORINE_SHOCK];

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

/** The cautions of a chemical in a given form, whatever product it comes in. */
export function chemicalCautions(chemical: string, form?: ProductForm): string[] {
  const own = CHEMICAL_CAUTIONS[chemical];
  if (!own) return [UNKNOWN_CHEMICAL_CAUTION];
  if (chemical === "bromochlorodimethylhydantoin" && form !== "tablets") return own.filter((c) => !c.startsWith("Use tablets"));
  return own;
}

/** Every caution for a dose of this product: general, by form, by chemical, and the product's own. */
export function cautionsFor(product: Product | null): string[] {
  if (!product) return generalCautions();
  const all = [...generalCautions(product), ...chemicalCautions(product.chemical, product.form), ...(product.cautions ?? [])];
  return [...new Set(all)];
}

export type ProductRole =
  | "chlorine"
  | "bromine"
  | "bromide"
  | "oxidiser"
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
  sodium_bromide: "bromide",
  potassium_monopersulfate: "oxidiser",
  sodium_bicarbonate: "alkalinity_up",
  sodium_carbonate: "ph_up",
  sodium_bisulfate: "acid",
  hydrochloric_acid: "acid",
  calcium_chloride: "hardness_up",
  silicone_antifoam: "antifoam",
};

export function roleOf(product: Pick<Product, "chemical">): ProductRole | null {
  return ROLE_BY_CHEMICAL[product.chemical] ?? null;
}

export const KNOWN_CHEMICALS = Object.keys(ROLE_BY_CHEMICAL);

/** Acids and bases that move pH: each needs a pH reading before it is dosed. */
export const ACID_BASE_ROLES: ProductRole[] = ["alkalinity_up", "ph_up", "acid"];

// ------------------------------------------------------------------ waits: one rule, one place
//
// How long nothing else goes in after a dose, and so when to retest (common practice: at least one
// turnover with the jets running, 15–30 min for public spas (Iowa 641 IAC 15.51 turnover ≤ 30 min [P]);
// balance products are given 2 h to mix and settle; a shock keeps the tub closed until the
// sanitiser is back in range, retested after 12 h (common practice, "overnight"; New York §6-1.25
// superchlorinates spas while closed [P]); tablets in a floater act over a day).

export const WAIT_HOURS = {
  /** A maintenance dose of chlorine or bromine granules or liquid: mixes within an hour. */
  sanitiser: 1,
  /** A shock: well above the routine range. */
  shock: 12,
  /** Tablets dissolve over hours to days. */
  tablets: 24,
  /** Acid, bicarbonate, soda ash, calcium chloride. */
  balance: 2,
  /** Sodium bromide: dissolve and circulate before the oxidiser goes in. */
  bromide: 0.5,
  /** Non-chlorine shock: label-style wait before bathing (common practice, from memory). */
  nonChlorineShock: 0.5,
  antifoam: 0,
} as const;

/**
 * A sanitiser dose counts as a shock when it raises the sanitiser by more than the top of its
 * routine range (chlorine 4, bromine 6 mg/L in the CDC home-tub ranges).
 */
export const SHOCK_RISE = { chlorine: 4, bromine: 6 } as const;

/** Hours to wait after a dose of this product: the one rule the plan, the log and the routines share. */
export function waitHoursFor(product: Pick<Product, "chemical" | "form" | "retestAfterHours">, opts: { shock?: boolean } = {}): number {
  if (product.retestAfterHours !== undefined) return product.retestAfterHours;
  const role = roleOf(product);
  if (role === "chlorine" || role === "bromine") {
    if (opts.shock) return WAIT_HOURS.shock;
    return product.form === "tablets" ? WAIT_HOURS.tablets : WAIT_HOURS.sanitiser;
  }
  if (role === "bromide") return WAIT_HOURS.bromide;
  if (role === "oxidiser") return WAIT_HOURS.nonChlorineShock;
  if (role === "antifoam") return WAIT_HOURS.antifoam;
  return WAIT_HOURS.balance;
}

/** @deprecated name kept for callers: the wait of a maintenance dose. */
export const retestHoursFor = (product: Product) => waitHoursFor(product);

/**
 * Pick the product for a role. Order of preference: the listed order in the catalogue, except
 * that tablets are passed over when granules of the same role exist (a dose should act now).
 */
export function pickProduct(products: Product[], role: ProductRole): Product | null {
  const candidates = products.filter((p) => roleOf(p) === role);
  if (candidates.length === 0) return null;
  return candidates.find((p) => p.form !== "tablets") ?? candidates[0]!;
}
