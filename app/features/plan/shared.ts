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

export const READING_LABELS: Record<ReadingKey, string> = {
  free_chlorine: "Free chlorine (mg/L)",
  total_chlorine: "Total chlorine (mg/L)",
  bromine: "Bromine (mg/L)",
  ph: "pH",
  total_alkalinity: "Total alkalinity (mg/L as CaCO3)",
  total_hardness: "Total hardness (mg/L as CaCO3)",
  calcium_hardness: "Calcium hardness (mg/L as CaCO3)",
  cyanuric_acid: "Cyanuric acid (mg/L)",
};

export const TARGET_PARAMETERS = (sanitiser: "chlorine" | "bromine"): Parameter[] => [
  sanitiser === "chlorine" ? "free_chlorine" : "bromine",
  "ph",
  "total_alkalinity",
  "calcium_hardness",
  ...(sanitiser === "chlorine" ? (["cyanuric_acid"] as Parameter[]) : []),
];

export const FORMS: ProductForm[] = ["granules", "powder", "liquid", "tablets"];
export const PACKAGE_UNITS = ["g", "kg", "mL", "L"] as const;
