// A chart swatch as a small tile: one colour, or for an analyte read from several pads, each pad's
// colour side by side in chart order.
import { cx } from "~/components/ui";

export function SwatchColours({ colors, className }: { colors: string[]; className?: string }) {
  return (
    <span className={cx("flex overflow-hidden rounded-md border border-black/10", className)} data-pads={colors.length}>
      {colors.map((c, i) => (
        <span key={i} className={cx("block h-full flex-1", i > 0 && "border-l border-white/70")} style={{ background: c }} />
      ))}
    </span>
  );
}
