// The chart editor: pad order, geometry in millimetres, swatch values and colours, with a live
// preview of the strip and the CIEDE2000 distance between neighbouring swatches.
import { useMemo, useState } from "react";
import { deltaE2000, hexToLab } from "~/reading/colour";
import { Button, Input, Notice, cx } from "~/components/ui";
import { AnalytePadsFieldset } from "./analyte-pads";

export type EditSwatch = { value: number | string; color: string };
export type EditPad = { analyte: string; label: string; unit: string; centerMm: number | string; sizeMm: number | string; swatches: EditSwatch[] };
export type EditChart = { format: string; name: string; strip: { widthMm: number | string; lengthMm: number | string; color: string }; pads: EditPad[] };

/** Neighbours closer than this are hard to tell apart on a photo (common practice). */
export const TOO_CLOSE = 3;
const HEX = /^#[0-9a-f]{6}$/i;

export function distance(a: string, b: string): number | null {
  if (!HEX.test(a) || !HEX.test(b)) return null;
  return deltaE2000(hexToLab(a), hexToLab(b));
}

const unique = (xs: string[]) => [...new Set(xs)];

function toNumbers(c: EditChart) {
  const n = (v: number | string) => (typeof v === "number" ? v : Number(String(v).replace(",", ".")));
  return {
    format: c.format,
    name: c.name,
    strip: { widthMm: n(c.strip.widthMm), lengthMm: n(c.strip.lengthMm), color: c.strip.color },
    pads: c.pads.map((p) => ({ ...p, centerMm: n(p.centerMm), sizeMm: n(p.sizeMm), swatches: p.swatches.map((s) => ({ value: n(s.value), color: s.color })) })),
  };
}

export function StripPreview({ chart }: { chart: EditChart }) {
  const c = toNumbers(chart);
  const L = c.strip.lengthMm > 0 ? c.strip.lengthMm : 76;
  const W = c.strip.widthMm > 0 ? c.strip.widthMm : 6;
  return (
    <svg viewBox={`-2 -2 ${L + 4} ${W + 4}`} className="h-12 w-full" role="img" aria-label="Strip preview">
      <rect x={0} y={0} width={L} height={W} rx={0.6} fill={HEX.test(c.strip.color) ? c.strip.color : "#eeeeee"} stroke="#9aa" strokeWidth={0.2} />
      {c.pads.map((p, i) => {
        const mid = p.swatches[Math.floor(p.swatches.length / 2)];
        return Number.isFinite(p.centerMm) && Number.isFinite(p.sizeMm) ? (
          <rect key={i} x={p.centerMm - p.sizeMm / 2} y={(W - p.sizeMm) / 2} width={p.sizeMm} height={p.sizeMm} fill={mid && HEX.test(mid.color) ? mid.color : "#ccc"} stroke="#566" strokeWidth={0.15} />
        ) : null;
      })}
    </svg>
  );
}

export function ChartEditor({ initial, intent = "save", submitLabel = "Save as a new version", error }: { initial: EditChart; intent?: string; submitLabel?: string; error?: string }) {
  const [chart, setChart] = useState<EditChart>(initial);
  const [note, setNote] = useState("");
  const json = useMemo(() => JSON.stringify(toNumbers(chart)), [chart]);
  // Neighbours are hard to tell apart when every pad of the analyte barely changes between them.
  const closePairs = unique(
    chart.pads.flatMap((p) => {
      const group = chart.pads.filter((q) => q.analyte === p.analyte);
      return p.swatches.slice(1).flatMap((s, i) => {
        const steps = group.map((q) => (q.swatches[i] && q.swatches[i + 1] ? distance(q.swatches[i].color, q.swatches[i + 1].color) : null));
        const d = steps.some((x) => x === null) ? null : Math.max(...(steps as number[]));
        return d !== null && d < TOO_CLOSE ? [`${p.label || p.analyte}: ${p.swatches[i].value} and ${s.value} (ΔE00 ${d.toFixed(1)})`] : [];
      });
    }),
  );
  const disorder = unique(chart.pads.flatMap((p) =>
    p.swatches.slice(1).flatMap((s, i) => (!(Number(s.value) > Number(p.swatches[i].value)) ? [`${p.label || p.analyte}: ${p.swatches[i].value} is followed by ${s.value}`] : [])),
  ));
  const setPad = (i: number, patch: Partial<EditPad>) => setChart((c) => ({ ...c, pads: c.pads.map((p, j) => (j === i ? { ...p, ...patch } : p)) }));
  const setSwatch = (i: number, k: number, patch: Partial<EditSwatch>) =>
    setPad(i, { swatches: chart.pads[i].swatches.map((s, j) => (j === k ? { ...s, ...patch } : s)) });
  const move = (i: number, d: number) =>
    setChart((c) => {
      const pads = [...c.pads];
      const j = i + d;
      if (j < 0 || j >= pads.length) return c;
      [pads[i], pads[j]] = [pads[j], pads[i]];
      return { ...c, pads };
    });
  return (
    <form method="post" className="space-y-4" data-testid="chart-editor">
      <input type="hidden" name="intent" value={intent} />
      <input type="hidden" name="definition" value={json} />
      {error && <Notice tone="alert">{error}</Notice>}
      <div className="grid gap-3 sm:grid-cols-4">
        <label className="block sm:col-span-2">
          <span className="font-bold">Chart name</span>
          <Input value={chart.name} onChange={(e) => setChart({ ...chart, name: e.target.value })} />
        </label>
        <label className="block">
          <span className="font-bold">Strip length (mm)</span>
          <Input inputMode="decimal" value={chart.strip.lengthMm} onChange={(e) => setChart({ ...chart, strip: { ...chart.strip, lengthMm: e.target.value } })} />
        </label>
        <label className="block">
          <span className="font-bold">Strip width (mm)</span>
          <Input inputMode="decimal" value={chart.strip.widthMm} onChange={(e) => setChart({ ...chart, strip: { ...chart.strip, widthMm: e.target.value } })} />
        </label>
        <label className="block">
          <span className="font-bold">Strip colour</span>
          <span className="flex gap-2">
            <input type="color" aria-label="Strip colour picker" className="h-12 w-12 rounded" value={HEX.test(chart.strip.color) ? chart.strip.color : "#ffffff"} onChange={(e) => setChart({ ...chart, strip: { ...chart.strip, color: e.target.value } })} />
            <Input value={chart.strip.color} onChange={(e) => setChart({ ...chart, strip: { ...chart.strip, color: e.target.value } })} />
          </span>
        </label>
      </div>
      <div className="rounded-xl border border-line bg-white p-2">
        <p className="text-sm text-ink-soft">Preview (tip on the left)</p>
        <StripPreview chart={chart} />
      </div>
      {chart.pads.map((p, i) => {
        // An analyte read from several pads shows once, its pads side by side.
        const group = chart.pads.flatMap((q, j) => (q.analyte === p.analyte ? [j] : []));
        if (group.length > 1) return group[0] === i ? <AnalytePadsFieldset key={i} chart={chart} indices={group} setChart={setChart} distance={distance} tooClose={TOO_CLOSE} /> : null;
        return (
        <fieldset key={i} className="rounded-xl border border-line p-3" data-testid={`pad-${p.analyte}`}>
          <legend className="px-1 font-bold">
            Pad {i + 1}: {p.label || p.analyte}
          </legend>
          <div className="grid gap-2 sm:grid-cols-5">
            <label><span className="text-sm">Analyte key</span><Input value={p.analyte} onChange={(e) => setPad(i, { analyte: e.target.value })} /></label>
            <label><span className="text-sm">Label</span><Input value={p.label} onChange={(e) => setPad(i, { label: e.target.value })} /></label>
            <label><span className="text-sm">Unit</span><Input value={p.unit} onChange={(e) => setPad(i, { unit: e.target.value })} /></label>
            <label><span className="text-sm">Centre from tip (mm)</span><Input inputMode="decimal" value={p.centerMm} onChange={(e) => setPad(i, { centerMm: e.target.value })} /></label>
            <label><span className="text-sm">Size (mm)</span><Input inputMode="decimal" value={p.sizeMm} onChange={(e) => setPad(i, { sizeMm: e.target.value })} /></label>
          </div>
          <div className="mt-3 flex flex-wrap items-end gap-1">
            {p.swatches.map((s, k) => {
              const d = k > 0 ? distance(p.swatches[k - 1].color, s.color) : null;
              return (
                <div key={k} className="flex items-end gap-1">
                  {k > 0 && (
                    <span className={cx("mb-3 min-w-10 text-center text-xs font-bold", d !== null && d < TOO_CLOSE ? "text-alert" : "text-ink-soft")} title="CIEDE2000 distance to the previous swatch">
                      {d === null ? "–" : `ΔE ${d.toFixed(1)}`}
                    </span>
                  )}
                  <div className="w-24 space-y-1">
                    <input type="color" aria-label={`${p.label || p.analyte} swatch ${k + 1} colour`} className="h-12 w-full rounded border border-line" value={HEX.test(s.color) ? s.color : "#ffffff"} onChange={(e) => setSwatch(i, k, { color: e.target.value })} />
                    <input aria-label={`${p.label || p.analyte} swatch ${k + 1} hex`} className="w-full rounded border border-line px-1 text-xs" value={s.color} onChange={(e) => setSwatch(i, k, { color: e.target.value })} />
                    <input aria-label={`${p.label || p.analyte} swatch ${k + 1} value`} inputMode="decimal" className="w-full rounded border border-line px-1 text-sm" value={s.value} onChange={(e) => setSwatch(i, k, { value: e.target.value })} />
                  </div>
                </div>
              );
            })}
          </div>
          <div className="mt-2 flex flex-wrap gap-2">
            <Button type="button" variant="quiet" onClick={() => setPad(i, { swatches: [...p.swatches, { value: Number(p.swatches.at(-1)?.value ?? 0) + 1, color: p.swatches.at(-1)?.color ?? "#cccccc" }] })}>Add swatch</Button>
            {p.swatches.length > 2 && <Button type="button" variant="quiet" onClick={() => setPad(i, { swatches: p.swatches.slice(0, -1) })}>Remove last swatch</Button>}
            <Button type="button" variant="quiet" onClick={() => move(i, -1)} disabled={i === 0}>Move up</Button>
            <Button type="button" variant="quiet" onClick={() => move(i, 1)} disabled={i === chart.pads.length - 1}>Move down</Button>
            {chart.pads.length > 1 && <Button type="button" variant="quiet" onClick={() => setChart({ ...chart, pads: chart.pads.filter((_, j) => j !== i) })}>Remove pad</Button>}
          </div>
        </fieldset>
        );
      })}
      <Button
        type="button"
        variant="secondary"
        onClick={() => {
          const last = chart.pads.at(-1);
          const centre = last ? Number(last.centerMm) + Number(last.sizeMm) + 3 : 5;
          setChart({ ...chart, pads: [...chart.pads, { analyte: `pad_${chart.pads.length + 1}`, label: "New pad", unit: "", centerMm: centre, sizeMm: 5.5, swatches: [{ value: 0, color: "#f0f0e0" }, { value: 1, color: "#c0c0a0" }] }] });
        }}
      >
        Add pad
      </Button>
      {disorder.length > 0 && <Notice tone="alert">Swatch values must rise along each pad: {disorder.join("; ")}.</Notice>}
      {closePairs.length > 0 && <Notice tone="caution">These neighbouring swatches are too close to tell apart (under {TOO_CLOSE} ΔE00): {closePairs.join("; ")}.</Notice>}
      <label className="block">
        <span className="font-bold">Note for this version</span>
        <Input name="note" value={note} onChange={(e) => setNote(e.target.value)} placeholder="What changed and why" />
      </label>
      <Button type="submit">{submitLabel}</Button>
    </form>
  );
}
