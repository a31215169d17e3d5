// An analyte read from several pads (a wide-range pH strip reads pH from four) is shown once: its
// swatch values, which every one of its pads lists alike (the chart format requires it), with the
// colour of each pad at that value side by side. A single-pad analyte gives one colour per value.
// Shared by the owner's review, the technicians' review queue and the chart screens.

type Pad = { analyte: string; label: string; unit: string; swatches: readonly { value: number; color: string }[] };

export type AnalyteSwatches = {
  analyte: string;
  label: string;
  unit: string;
  /** How many pads the analyte is read from. */
  pads: number;
  /** One entry per value; `colors` holds each pad's colour, in chart order. */
  swatches: { value: number; color: string; colors: string[] }[];
};

/** The chart's analytes in the order their first pad appears, each once. */
export function analyteSwatches(pads: readonly Pad[]): AnalyteSwatches[] {
  const groups = new Map<string, Pad[]>();
  for (const p of pads) groups.set(p.analyte, [...(groups.get(p.analyte) ?? []), p]);
  return [...groups.entries()].map(([analyte, group]) => {
    const first = group[0];
    return {
      analyte,
      label: first.label,
      unit: first.unit,
      pads: group.length,
      swatches: first.swatches.map((s, k) => ({ value: s.value, color: s.color, colors: group.map((g) => g.swatches[k]?.color ?? s.color) })),
    };
  });
}
