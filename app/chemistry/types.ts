// Public types of the water-chemistry engine.

export type Sanitiser = "chlorine" | "bromine";
/** Amounts in metric only, or with ounces / fluid ounces and US kitchen measures. */
export type Units = "metric" | "us";
/** Routine care, or the start-up of new water. */
export type Mode = "routine" | "first_fill";
/** Which published guidance sets the default ranges. */
export type Guidance = "us_home" | "us_public" | "uk";

export type Parameter =
  | "free_chlorine"
  | "bromine"
  | "ph"
  | "total_alkalinity"
  | "calcium_hardness"
  | "cyanuric_acid";

/** Readings in mg/L (alkalinity and hardness as CaCO3); null or missing = not measured. */
export interface Readings {
  free_chlorine?: number | null;
  total_chlorine?: number | null;
  bromine?: number | null;
  ph?: number | null;
  total_alkalinity?: number | null;
  total_hardness?: number | null;
  calcium_hardness?: number | null;
  cyanuric_acid?: number | null;
  /** mg/L boron (as B), where a borate buffer is used. */
  borate?: number | null;
}

/** Every reading the engine takes, in the order screens list them (checked against `Readings` below). */
export const READING_NAMES = [
  "free_chlorine",
  "total_chlorine",
  "bromine",
  "ph",
  "total_alkalinity",
  "total_hardness",
  "calcium_hardness",
  "cyanuric_acid",
  "borate",
] as const satisfies readonly (keyof Readings)[];
// A reading added to `Readings` but not to the list above fails the type check here.
const everyReadingNamed: Record<Exclude<keyof Readings, (typeof READING_NAMES)[number]>, never> = {};
void everyReadingNamed;

export type ProductForm = "granules" | "powder" | "liquid" | "tablets";

export interface Product {
  id: string;
  /** Generic name, no brand. */
  name: string;
  /** Active ingredient, e.g. "sodium_dichloroisocyanurate_dihydrate". */
  chemical: string;
  form: ProductForm;
  /** Mass fraction of the active ingredient in the product (0–1]. */
  strength: number;
  /** Chlorine products: the label's available chlorine (0–1); must agree with strength when both are given. */
  availableChlorine?: number;
  /** Solids: bulk density in g/mL, for kitchen measures (a default by chemical applies otherwise). */
  bulkDensityGPerMl?: number;
  /** Liquids: density in g/mL. */
  densityGPerMl?: number;
  /** Sodium hypochlorite solutions: available chlorine in g/L ("trade percent" × 10); wins over strength. */
  availableChlorineGPerL?: number;
  /** Tablets: mass of one tablet in grams. */
  tabletMassG?: number;
  /** Label-style rate for products dosed by label (foam remover): mL or g per 1000 L. */
  labelRatePer1000L?: number;
  packageSize: { amount: number; unit: "g" | "kg" | "mL" | "L" };
  /** Product-specific cautions (the general ones are added to every dose). */
  cautions: string[];
  /** Hours to wait before retesting after this product; a default by chemical applies otherwise. */
  retestAfterHours?: number;
}

export interface Range {
  min: number;
  max: number;
  /** The value a dose aims at. */
  aim: number;
  /** Where the default comes from (citation and chemistry.md tag). */
  source: string;
}

export interface TargetRanges {
  free_chlorine: Range;
  bromine: Range;
  ph: Range;
  total_alkalinity: Range;
  calcium_hardness: Range;
  cyanuric_acid: Range;
}

export interface LoggedTreatment {
  productId: string;
  chemical?: string;
  amount: number;
  unit: "g" | "mL" | "tablets";
  /** ISO 8601 time. */
  addedAt: string;
  /** Logged as a shock dose (the wait is longer); worked out from the amount when not given. */
  shock?: boolean;
}

export interface WaterInput {
  volumeLitres: number;
  /** Water temperature when tested (°C). */
  temperatureC?: number;
  /** The tub's running (set) temperature, if different from the water now (°C). */
  setTemperatureC?: number;
  mode?: Mode;
  units?: Units;
  guidance?: Guidance;
  /** Total dissolved solids of the fill water (mg/L), for the drain advice. */
  fillTds?: number;
  sanitiser: Sanitiser;
  readings: Readings;
  tds?: number;
  bathersPerDay?: number;
  products?: Product[];
  targets?: Partial<Record<Parameter, Partial<Range>>>;
  treatmentLog?: LoggedTreatment[];
  /** ISO 8601 "now", for checking the treatment log (the CLI's way to pass options.now). */
  now?: string;
}

export type Direction = "raise" | "lower";

export interface SideEffect {
  parameter: Parameter;
  /** Predicted change, in the parameter's unit. */
  change: number;
  /** Predicted value after the step. */
  to: number;
  words: string;
}

export type StepKind = "dose" | "wait" | "aerate" | "replace_water";

export interface PlanStep {
  order: number;
  kind: StepKind;
  parameter: Parameter | null;
  direction: Direction | "wait";
  from: number | null;
  to: number | null;
  chemical: string | null;
  productId: string | null;
  productName: string | null;
  grams: number | null;
  millilitres: number | null;
  /** Tablets, for tablet products. */
  tablets?: number | null;
  /** Litres of water to replace, for replace_water steps. */
  litres?: number | null;
  retestAfterHours: number;
  /** US units: weight in ounces (solids) or US fluid ounces (liquids). */
  ounces?: number | null;
  fluidOunces?: number | null;
  /** A kitchen measure beside the weight for small doses, e.g. "about 2 tbsp". */
  kitchenMeasure?: string | null;
  /** The amount in the plan's units, as shown to people, e.g. "8.1 g (0.29 oz, about 2 ½ tsp)". */
  amountText?: string;
  /** A shock (well above the routine range): the tub stays closed longer. */
  shock?: boolean;
  /** Only on wait steps: when to retest (ISO 8601). */
  retestAt?: string;
  /** True when the amount is an estimate from the water predicted after earlier stages. */
  provisional: boolean;
  words: string;
  sideEffects: SideEffect[];
  cautions: string[];
}

export type Verdict = "corrosive" | "balanced" | "scaling";

export interface WaterBalance {
  lsi: number | null;
  verdict: Verdict | null;
  words: string;
  advice: string[];
  method: string;
  /** Thermodynamic calcite saturation index, for comparison. */
  calciteSaturationIndex: number | null;
  /** Temperature the index above is for (°C). */
  temperatureC: number;
  /** The index once the water is at the tub's set temperature. */
  lsiAtSetTemperature: number | null;
  setTemperatureC: number;
}

export interface Judgement {
  parameter: Parameter | "combined_chlorine";
  value: number | null;
  min: number;
  max: number;
  status: "low" | "in_range" | "high" | "not_measured";
  /** True when the value is estimated, not measured (e.g. calcium from total hardness). */
  estimated?: boolean;
  /** Total alkalinity: the carbonate alkalinity judged against the range (TA minus cyanurate). */
  judgedValue?: number | null;
}

/** The water after every step of the plan, as the engine's model sees it (null: cannot predict). */
export interface PredictedWater {
  free_chlorine: number | null;
  combined_chlorine: number | null;
  bromine: number | null;
  ph: number | null;
  total_alkalinity: number | null;
  calcium_hardness: number | null;
  cyanuric_acid: number | null;
  lsi: number | null;
  lsiAtSetTemperature: number | null;
  /** When the tub may be used: sanitiser and pH back in range (ISO 8601); null when the plan cannot say. */
  usableAfter: string | null;
  usableWords: string;
}

export interface SlowTrends {
  /** Cyanuric acid added per day by dichlor at this tub's use (mg/L/day); null without dichlor. */
  cyanuricAcidPerDay: number | null;
  /** Days until cyanuric acid reaches its maximum at that rate. */
  daysUntilCyanuricAcidLimit: number | null;
  drains: { parameter: "cyanuric_acid" | "calcium_hardness" | "tds"; litres: number; percent: number; words: string }[];
  words: string[];
}

export interface Headline {
  tone: "ok" | "caution" | "alert";
  title: string;
  detail: string;
  /** May people use the tub now? null = unknown (readings missing). */
  usableNow: boolean | null;
}

export interface WaterPlan {
  /** The worst finding first, in words. */
  headline: Headline;
  steps: PlanStep[];
  waterBalance: WaterBalance;
  predicted: PredictedWater;
  judgements: Judgement[];
  drainIntervalDays: number | null;
  trends: SlowTrends;
  guidance: { id: Guidance; name: string };
  mode: Mode;
  units: Units;
  notes: string[];
}
