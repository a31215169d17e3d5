// Constants of the plan pages used on both server and browser.
import { READING_NAMES, type Parameter, type ProductForm } from "~/chemistry/types";

/** The readings the what-if form takes: every reading the engine knows but borate, which no strip or kit here reads. */
export const READING_KEYS = READING_NAMES.filter((k): k is Exclude<(typeof READING_NAMES)[number], "borate"> => k !== "borate");
export type ReadingKey = (typeof READING_KEYS)[number];

export const TARGET_PARAMETERS = (sanitiser: "chlorine" | "bromine"): Parameter[] => [
  sanitiser === "chlorine" ? "free_chlorine" : "bromine",
  "ph",
  "total_alkalinity",
  "calcium_hardness",
  ...(sanitiser === "chlorine" ? (["cyanuric_acid"] as Parameter[]) : []),
];

export const FORMS: ProductForm[] = ["granules", "powder", "liquid", "tablets"];
export const PACKAGE_UNITS = ["g", "kg", "mL", "L"] as const;
