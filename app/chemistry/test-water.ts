// Shared test water for the engine's tests: a balanced 1500 L chlorine tub (invented demo figures).
import type { WaterInput, WaterPlan } from "./types";

export const base: WaterInput = {
  volumeLitres: 1500,
  temperatureC: 38,
  sanitiser: "chlorine",
  readings: { free_chlorine: 3, ph: 7.5, total_alkalinity: 100, calcium_hardness: 200, cyanuric_acid: 0 },
};

/** The dosing steps of a plan. */
export const doses = (p: WaterPlan) => p.steps.filter((s) => s.kind === "dose");
