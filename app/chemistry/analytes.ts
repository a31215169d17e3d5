// One name and one label per analyte: what a strip pad or a water test measures. The reader's
// callers, the water-chemistry engine, the screens, the e-mails and the CSV all take their words
// from here. The key (`free_chlorine`) is the analyte's one name in code, in charts, in the
// database and in CSV columns; the engine's `Parameter` type is the subset it acts on.
// Pure data: no database, no HTTP, safe in the browser.

type AnalyteWords = {
  /** at the start of a line or as a heading: "Free chlorine" */
  name: string;
  /** inside a sentence: "free chlorine", "pH" */
  word: string;
  /** on a form field that takes a value: "Free chlorine (mg/L)" */
  label: string;
};

const words = (name: string, unit: string): AnalyteWords => ({
  name,
  word: name.startsWith("pH") ? name : name.charAt(0).toLowerCase() + name.slice(1),
  label: unit ? `${name} (${unit})` : name,
});

export const ANALYTES = {
  free_chlorine: words("Free chlorine", "mg/L"),
  total_chlorine: words("Total chlorine", "mg/L"),
  /** total minus free chlorine: worked out, not read from a pad */
  combined_chlorine: words("Combined chlorine", "mg/L"),
  bromine: words("Bromine", "mg/L"),
  ph: words("pH", ""),
  total_alkalinity: words("Total alkalinity", "mg/L as CaCO3"),
  total_hardness: words("Total hardness", "mg/L as CaCO3"),
  calcium_hardness: words("Calcium hardness", "mg/L as CaCO3"),
  cyanuric_acid: words("Cyanuric acid", "mg/L"),
  borate: words("Borate (as boron)", "mg/L"),
} satisfies Record<string, AnalyteWords>;

export type KnownAnalyte = keyof typeof ANALYTES;

const known = (analyte: string): AnalyteWords | undefined => (Object.hasOwn(ANALYTES, analyte) ? ANALYTES[analyte as KnownAnalyte] : undefined);

/** "free_chlorine" → "Free chlorine"; an analyte the app does not know yet reads as its words ("nitrate_n" → "Nitrate n"). */
export function analyteName(analyte: string): string {
  return known(analyte)?.name ?? analyte.replace(/_/g, " ").replace(/^./, (c) => c.toUpperCase());
}

/** The name inside a sentence: "free chlorine", "pH". */
export function analyteWord(analyte: string): string {
  return known(analyte)?.word ?? analyte.replace(/_/g, " ");
}

/** The name with the unit a form asks for: "Total alkalinity (mg/L as CaCO3)", "pH". */
export function analyteLabel(analyte: string): string {
  return known(analyte)?.label ?? analyteName(analyte);
}
