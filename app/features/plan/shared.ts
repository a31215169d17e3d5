// Constants of the plan pages used on both server and browser.
import type { Parameter, ProductForm } from "~/chemistry";

export const READING_KEYS = [
  "free_chlorine",
  "total_chlorine",
  "bromine",
  "ph",
  "total_alkalinity",
  "total_hardness",
  "calcium_hardness",
  "cyanuric_acid",
] as const;
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
