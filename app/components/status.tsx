// Water status at a glance: in range, low or high, in words and an icon (never colour alone),
// and a visible mark on values nobody has confirmed yet.
import type { ReactNode } from "react";
import { rangeStatus, type RangeStatus } from "~/lib/range-status";
import { cx } from "./ui";

export { rangeStatus, type RangeStatus };

export const STATUS_WORDS: Record<RangeStatus, string> = { in: "In range", low: "Low", high: "High", unknown: "No target" };

/**
 * "In range" / "Low" / "High" with its icon; its shape, colours and icon (a decorative drawing
 * before the words) are the `dw-badge` style (app.css).
 */
export function StatusBadge({ status, className, children }: { status: RangeStatus; className?: string; children?: ReactNode }) {
  return (
    <span data-status={status} className={cx("dw-badge", className)}>
      {children ?? STATUS_WORDS[status]}
    </span>
  );
}

/**
 * The mark on values the reader was unsure of and nobody has confirmed: a dashed pill with its
 * icon (a decorative drawing before the words) from the `dw-mark` style (app.css).
 */
export function UnconfirmedMark({ className, children = "Not confirmed" }: { className?: string; children?: ReactNode }) {
  return (
    <span data-testid="unconfirmed" className={cx("dw-mark", className)}>
      {children}
    </span>
  );
}

/**
 * A tile for one measured value: the number, its unit and its status in words. An unconfirmed
 * value has a dashed frame (the reading as a whole says so in words above the tiles); a value the
 * reader was unsure of says so on its own tile.
 */
export function ValueTile({ label, value, unit, status, target, unconfirmed, unsure }: { label: string; value: number | null; unit: string; status: RangeStatus; target?: { min: number; max: number } | null; unconfirmed?: boolean; unsure?: boolean }) {
  const frame = { in: "border-ok/40 bg-ok-soft/60", low: "border-caution/50 bg-caution-soft/70", high: "border-alert/40 bg-alert-soft/70", unknown: "border-line bg-sand" }[status];
  return (
    <div data-testid="value-tile" data-status={status} className={cx("rounded-xl border-2 p-3", frame, unconfirmed && "border-dashed")}>
      <dt className="text-sm text-ink-soft">{label}</dt>
      <dd>
        <span className="text-lg font-bold">{value ?? "–"}</span> <span className="text-sm">{unit}</span>
        <span className="mt-1 flex flex-wrap gap-1">
          {value !== null && <StatusBadge status={status} />}
          {unsure && <UnconfirmedMark>Reader unsure</UnconfirmedMark>}
        </span>
        {target && <span className="mt-1 block text-xs text-ink-soft">aim {target.min}–{target.max}</span>}
      </dd>
    </div>
  );
}
