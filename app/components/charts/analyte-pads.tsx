// The chart editor's view of an analyte read from several pads (a wide-range pH strip reads pH
// from four): shown once, its key, label and unit and its swatch values shared by every pad, and
// each pad's position and colours side by side, with the CIEDE2000 step to the previous swatch.
import { Button, Input, Notice, cx } from "~/components/ui";
import type { EditChart, EditPad } from "./chart-editor";

const HEX = /^#[0-9a-f]{6}$/i;

type Props = {
  chart: EditChart;
  /** The indices, in chart order, of the pads that read this analyte. */
  indices: number[];
  setChart: (update: (c: EditChart) => EditChart) => void;
  distance: (a: string, b: string) => number | null;
  tooClose: number;
};

export function AnalytePadsFieldset({ chart, indices, setChart, distance, tooClose }: Props) {
  const pads = indices.map((i) => chart.pads[i]);
  const first = pads[0];
  const name = first.label || first.analyte;
  const update = (fn: (p: EditPad, n: number) => EditPad) =>
    setChart((c) => ({ ...c, pads: c.pads.map((p, j) => (indices.includes(j) ? fn(p, indices.indexOf(j)) : p)) }));
  const setShared = (patch: Partial<EditPad>) => update((p) => ({ ...p, ...patch }));
  const setPad = (n: number, patch: Partial<EditPad>) => update((p, m) => (m === n ? { ...p, ...patch } : p));
  const setValue = (k: number, value: string) => update((p) => ({ ...p, swatches: p.swatches.map((s, j) => (j === k ? { ...s, value } : s)) }));
  const setColor = (n: number, k: number, color: string) =>
    update((p, m) => (m === n ? { ...p, swatches: p.swatches.map((s, j) => (j === k ? { ...s, color } : s)) } : p));
  const count = Math.max(...pads.map((p) => p.swatches.length));
  const sameValues = pads.every((p) => p.swatches.length === first.swatches.length && p.swatches.every((s, k) => Number(s.value) === Number(first.swatches[k].value)));

  return (
    <fieldset className="rounded-xl border border-line p-3" data-testid={`analyte-${first.analyte}`}>
      <legend className="px-1 font-bold">
        {name}: read from {pads.length} pads together (pads {indices.map((i) => i + 1).join(", ")})
      </legend>
      <div className="grid gap-2 sm:grid-cols-3">
        <label><span className="text-sm">Analyte key</span><Input value={first.analyte} onChange={(e) => setShared({ analyte: e.target.value })} /></label>
        <label><span className="text-sm">Label</span><Input value={first.label} onChange={(e) => setShared({ label: e.target.value })} /></label>
        <label><span className="text-sm">Unit</span><Input value={first.unit} onChange={(e) => setShared({ unit: e.target.value })} /></label>
      </div>
      <div className="mt-3 grid grid-cols-2 gap-2 sm:grid-cols-4" data-testid="pads-side-by-side">
        {pads.map((p, n) => (
          <div key={indices[n]} className="rounded-lg bg-sand p-2">
            <p className="text-sm font-bold">Pad {indices[n] + 1}</p>
            <label className="block"><span className="text-xs">Centre from tip (mm)</span><Input inputMode="decimal" aria-label={`${name} pad ${indices[n] + 1} centre`} value={p.centerMm} onChange={(e) => setPad(n, { centerMm: e.target.value })} /></label>
            <label className="block"><span className="text-xs">Size (mm)</span><Input inputMode="decimal" aria-label={`${name} pad ${indices[n] + 1} size`} value={p.sizeMm} onChange={(e) => setPad(n, { sizeMm: e.target.value })} /></label>
          </div>
        ))}
      </div>
      <div className="mt-3 overflow-x-auto">
        <table className="w-full border-separate border-spacing-1 text-sm">
          <thead>
            <tr className="text-left">
              <th className="w-20">Value</th>
              {indices.map((i) => (
                <th key={i}>Pad {i + 1}</th>
              ))}
            </tr>
          </thead>
          <tbody>
            {Array.from({ length: count }, (_, k) => (
              <tr key={k} data-testid={`swatch-row-${k + 1}`}>
                <td>
                  <input aria-label={`${name} swatch ${k + 1} value`} inputMode="decimal" className="w-full rounded border border-line px-1 py-2" value={first.swatches[k]?.value ?? ""} onChange={(e) => setValue(k, e.target.value)} />
                </td>
                {pads.map((p, n) => {
                  const s = p.swatches[k];
                  if (!s) return <td key={n} />;
                  const d = k > 0 && p.swatches[k - 1] ? distance(p.swatches[k - 1].color, s.color) : null;
                  return (
                    <td key={n} className="min-w-16 align-top">
                      <input type="color" aria-label={`${name} pad ${indices[n] + 1} swatch ${k + 1} colour`} className="h-10 w-full rounded border border-line" value={HEX.test(s.color) ? s.color : "#ffffff"} onChange={(e) => setColor(n, k, e.target.value)} />
                      <input aria-label={`${name} pad ${indices[n] + 1} swatch ${k + 1} hex`} className="w-full rounded border border-line px-1 text-xs" value={s.color} onChange={(e) => setColor(n, k, e.target.value)} />
                      {k > 0 && (
                        <span className={cx("block text-center text-xs font-bold", d !== null && d < tooClose ? "text-alert" : "text-ink-soft")} title="CIEDE2000 distance to the previous swatch of this pad">
                          {d === null ? "–" : `ΔE ${d.toFixed(1)}`}
                        </span>
                      )}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {!sameValues && <Notice tone="alert" className="mt-2">Every pad of {name} must list the same swatch values; edit the values in the first column.</Notice>}
      <p className="mt-2 text-sm text-ink-soft">The reader matches these pads together and reports one {name} reading. Adjacent steps under {tooClose} ΔE00 on every pad are hard to tell apart.</p>
      <div className="mt-2 flex flex-wrap gap-2">
        <Button
          type="button"
          variant="quiet"
          onClick={() => update((p) => ({ ...p, swatches: [...p.swatches, { value: Number(first.swatches.at(-1)?.value ?? 0) + 1, color: p.swatches.at(-1)?.color ?? "#cccccc" }] }))}
        >
          Add swatch
        </Button>
        {count > 2 && <Button type="button" variant="quiet" onClick={() => update((p) => ({ ...p, swatches: p.swatches.slice(0, -1) }))}>Remove last swatch</Button>}
        <Button type="button" variant="quiet" onClick={() => setChart((c) => ({ ...c, pads: c.pads.filter((_, j) => j !== indices.at(-1)) }))}>
          Remove pad {indices.at(-1)! + 1}
        </Button>
      </div>
    </fieldset>
  );
}
