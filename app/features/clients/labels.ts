// Display names of the analytes a strip reads.
const LABELS: Record<string, string> = {
  ph: "pH",
  free_chlorine: "Free chlorine",
  total_chlorine: "Total chlorine",
  bromine: "Bromine",
  total_alkalinity: "Total alkalinity",
  calcium_hardness: "Calcium hardness",
  cyanuric_acid: "Cyanuric acid",
};

export const analyteLabel = (a: string) => LABELS[a] ?? a.replace(/_/g, " ").replace(/^./, (c) => c.toUpperCase());
