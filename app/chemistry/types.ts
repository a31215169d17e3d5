// Public types of the water-chemistry engine.

export type Sanitiser = "chlorine" | "bromine";

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
}

export interface WaterInput {
  volumeLitres: number;
  temperatureC?: number;
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
}

export interface Judgement {
  parameter: Parameter;
  value: number | null;
  min: number;
  max: number;
  status: "low" | "in_range" | "high" | "not_measured";
}

export interface WaterPlan {
  steps: PlanStep[];
  waterBalance: WaterBalance;
  judgements: Judgement[];
  drainIntervalDays: number | null;
  notes: string[];
}
