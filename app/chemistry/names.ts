// Plain display names of the water parameters, shared by the engine's messages
// and every screen that lists readings.
export const PARAMETER_NAMES: Record<string, string> = {
  free_chlorine: "Free chlorine",
  total_chlorine: "Total chlorine",
  bromine: "Bromine",
  ph: "pH",
  total_alkalinity: "Total alkalinity",
  total_hardness: "Total hardness",
  calcium_hardness: "Calcium hardness",
  cyanuric_acid: "Cyanuric acid",
  borate: "Borate (as boron)",
};

/** "free_chlorine" → "Free chlorine"; an analyte the app does not know yet reads as its words. */
export function parameterName(analyte: string) {
  return PARAMETER_NAMES[analyte] ?? analyte.replace(/_/g, " ").replace(/^./, (c) => c.toUpperCase());
}
