// What the locator hands to the pad measurement: the strip's axis, its ends and each pad's place.

export type Interval = [number, number];

/** Receives the engine's diagnostics, one line each (the read-strip command's --trace). */
export type Trace = ((line: string) => void) | undefined;

/** Writes one diagnostic line when a trace is attached (objects as JSON); callers build costly parts only when it is. */
export function traceLine(trace: Trace, ...parts: unknown[]) {
  trace?.(parts.map((p) => (typeof p === "string" ? p : JSON.stringify(p))).join(" "));
}

export type PadPlacement = {
  /** Position along the axis (working-image px, from the strip centre). */
  t: number;
  centre: [number, number];
  halfAlong: number;
  halfAcross: number;
  /** The pad's inner 60 % as seen through the strip's plane, when perspective was fitted (corners, px). */
  inner?: [number, number][];
};

export type StripGeometry = {
  centre: [number, number];
  /** Unit vector along the axis (the t direction). */
  u: [number, number];
  /** Unit vector across the axis. */
  v: [number, number];
  /** +1 if t grows from the tip towards the handle, −1 otherwise. */
  dir: 1 | -1;
  tipT: number;
  handleT: number;
  widthPx: number;
  pxPerMm: number;
  pads: PadPlacement[];
  /** Bare-plastic intervals (t) usable as white reference, sorted by t. */
  bare: Interval[];
  fitScore: number;
  /** The strip's plane when perspective was fitted: chart mm (x from the tip, y across) to working px, row-major 3×3. */
  plane?: number[];
  /** Mean ΔE00 from the placed pads' colours to their swatch paths (white-corrected from the gaps). */
  colourCost: number;
  /** Length of the blob the axis was fitted over (working-image px). */
  axisSpan: number;
  /** fitScore, discounted when the strip's length could not be confirmed (for ranking candidates). */
  rank: number;
  /** Both ends found at the chart's length. */
  lengthOk: boolean;
  /** At least one end of the strip was found inside the photo (the pads placed from it, not searched for anywhere). */
  endSeen: boolean;
  /** The pads stand out from the bare plastic clearly more than the gaps between them do. */
  convincing: boolean;
  warnings: string[];
  /**
   * Why the placement itself may be wrong (the tip not told from the handle, the ends not found):
   * every reading from it goes to review with these reasons, in words a user understands.
   */
  doubts: string[];
};

/** A strip axis in the working image: centre, unit direction, width and length in px. */
export type Axis = { cx: number; cy: number; ux: number; uy: number; width: number; length: number };

/** A candidate strip found on the search copy (search-copy px, angle in radians). */
export type StripCandidate = { cx: number; cy: number; angle: number; length: number; width: number; score: number; n: number };
