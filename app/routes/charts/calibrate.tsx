import { useState } from "react";
import { data, Form, redirect, useRevalidator } from "react-router";
import { z } from "zod";
import { BatchPhotoInput } from "~/components/charts/batch-photo";
import { postJson } from "~/components/photos/send-photo";
import { GridOverlay } from "~/components/charts/grid-overlay";
import { Button, ButtonLink, Card, Field, Input, Notice, PageTitle } from "~/components/ui";
import {
  chartIntake,
  ChartInputError,
  correctionsReport,
  latestChartPhoto,
  loadBatch,
  proposeFromChartPhoto,
  proposeFromSolutions,
  saveVersion,
  solutionPhoto,
  type Proposal,
} from "~/features/charts/charts.server";
import { maxPhotoBytes } from "~/features/photos/intake.server";
import { requireChartRole } from "~/features/charts/guard.server";
import type { Route } from "./+types/calibrate";

export const meta: Route.MetaFunction = () => [{ title: "Calibrate a chart · Dipwell" }];

/** At most this many reference-solution strip photos in one refit (three are shown at first). */
const SOLUTION_SLOTS = 8;

export async function loader({ context, request, params }: Route.LoaderArgs) {
  requireChartRole(context, request);
  const { chart, batch, current, currentChart } = await loadBatch(params.chartId, params.batchId);
  const p = await latestChartPhoto(batch.id);
  const corrections = await correctionsReport(currentChart, batch.id);
  return {
    chart: { id: chart.id, name: chart.name },
    batch: { id: batch.id, lot: batch.lot },
    version: current.version,
    pads: currentChart.pads.map((pd) => ({ analyte: pd.analyte, label: pd.label, unit: pd.unit, swatches: pd.swatches.map((s) => ({ value: s.value, color: s.color })) })),
    photo: p ? { id: p.id, width: p.width ?? 1000, height: p.height ?? 750 } : null,
    corrections,
    maxPhotoBytes: maxPhotoBytes(),
    solutionSlots: SOLUTION_SLOTS,
  };
}

const pt = z.tuple([z.number().finite(), z.number().finite()]);
const quad = z.tuple([pt, pt, pt, pt]);
const gridSchema = z.object({ corners: quad, rows: z.number().int(), cols: z.number().int() });

type ActionResult = { intent: string; form?: string; proposal?: Proposal; source?: string; placed?: { grid: unknown; white: unknown } };

export async function action({ context, request, params }: Route.ActionArgs) {
  const user = requireChartRole(context, request);
  const { chart, batch, currentChart } = await loadBatch(params.chartId, params.batchId);
  const fd = await request.formData();
  const intent = String(fd.get("intent") ?? "");
  let placed: ActionResult["placed"];
  const fail = (form: string) => data<ActionResult>({ intent, form, placed }, { status: 400 });
  try {
    if (intent === "sample") {
      const p = await latestChartPhoto(batch.id);
      let g: unknown, w: unknown;
      try {
        g = JSON.parse(String(fd.get("grid") ?? ""));
        w = JSON.parse(String(fd.get("white") ?? ""));
      } catch {
        return fail("The grid could not be read. Reload the page and place it again.");
      }
      const grid = gridSchema.safeParse(g), white = quad.safeParse(w);
      if (grid.success && white.success) placed = { grid: grid.data, white: white.data };
      if (!grid.success || !white.success) return fail("The grid needs four corners and the white area four corners. Reload the page and place them again.");
      if (!p) return fail("Upload a photo of this batch's colour chart first.");
      const proposal = await proposeFromChartPhoto(currentChart, p.id, batch.id, grid.data, white.data);
      return { intent, proposal, source: "photo", placed } satisfies ActionResult;
    }
    if (intent === "solutions") {
      const samples: { photo: Buffer; known: Record<string, number> }[] = [];
      for (let i = 0; i < SOLUTION_SLOTS; i++) {
        const key = String(fd.get(`key_${i}`) ?? "");
        const known: Record<string, number> = {};
        // One value per analyte, even for an analyte read from several pads.
        for (const pad of currentChart.pads.filter((q, k, all) => all.findIndex((o) => o.analyte === q.analyte) === k)) {
          const raw = String(fd.get(`value_${i}_${pad.analyte}`) ?? "").trim();
          if (!raw) continue;
          const v = Number(raw.replace(",", "."));
          if (!Number.isFinite(v) || v < 0) return fail(`Photo ${i + 1}: the known value for ${pad.label} must be a number.`);
          known[pad.analyte] = v;
        }
        if (!key && Object.keys(known).length) return fail(`Photo ${i + 1}: choose the strip photo for these values.`);
        if (!key) continue;
        try {
          samples.push({ photo: await chartIntake(() => solutionPhoto(batch.id, key)), known });
        } catch (e) {
          if (e instanceof ChartInputError) return fail(`Photo ${i + 1}: ${e.message}`);
          throw e;
        }
      }
      const proposal = await proposeFromSolutions(currentChart, samples);
      return { intent, proposal, source: "solutions" } satisfies ActionResult;
    }
    if (intent === "save") {
      const source = String(fd.get("source") ?? "");
      if (!["photo", "solutions", "corrections"].includes(source)) return fail("Unknown calibration.");
      const v = await saveVersion(user, chart.id, batch.id, String(fd.get("definition") ?? ""), source as "photo", String(fd.get("note") ?? "") || undefined);
      return redirect(`/charts/${chart.id}?batch=${batch.id}&saved=${v.version}`);
    }
    return fail("Unknown action.");
  } catch (e) {
    if (e instanceof ChartInputError) return fail(e.message);
    throw e;
  }
}

function ProposalView({ proposal, source, pads }: { proposal: Proposal; source: string; pads: { analyte: string; label: string }[] }) {
  return (
    <div className="space-y-3" data-testid="proposal">
      {proposal.warnings.map((w) => (
        <Notice key={w} tone="caution">{w}</Notice>
      ))}
      <table className="w-full text-sm">
        <thead>
          <tr className="text-left">
            <th>Pad</th><th>Value</th><th>Now</th><th>Proposed</th><th>ΔE00</th>
          </tr>
        </thead>
        <tbody>
          {proposal.changes.map((c) => (
            <tr key={`${c.analyte}-${c.pad ?? ""}-${c.value}`} className="border-t border-line">
              <td>
                {pads.find((p) => p.analyte === c.analyte)?.label ?? c.analyte}
                {c.pad !== undefined && <span className="text-ink-soft"> · pad {c.pad + 1}</span>}
              </td>
              <td>{c.value}</td>
              <td><Swatch color={c.from} /></td>
              <td><Swatch color={c.to} /></td>
              <td>{Number.isFinite(c.deltaE) ? c.deltaE.toFixed(1) : "new"}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <form method="post" className="space-y-2">
        <input type="hidden" name="intent" value="save" />
        <input type="hidden" name="source" value={source} />
        <input type="hidden" name="definition" value={JSON.stringify(proposal.definition)} />
        <Field label="Note for this version"><Input name="note" placeholder="e.g. calibrated from the card photo of the new lot" /></Field>
        <Button type="submit">Save as a new version</Button>
        <p className="text-sm text-ink-soft">Nothing changes for this batch until you save.</p>
      </form>
    </div>
  );
}

function Swatch({ color }: { color: string }) {
  const ok = /^#[0-9a-f]{6}$/i.test(color);
  return (
    <span className="inline-flex items-center gap-1">
      <span className="inline-block h-6 w-8 rounded border border-line" style={{ background: ok ? color : "transparent" }} />
      <span className="text-xs text-ink-soft">{color}</span>
    </span>
  );
}

export default function Calibrate({ loaderData, actionData }: Route.ComponentProps) {
  const { chart, batch, version, pads, photo, corrections, maxPhotoBytes: maxBytes, solutionSlots: maxSlots } = loaderData;
  const a = actionData as ActionResult | undefined;
  const revalidator = useRevalidator();
  // The reference-solution photos' upload keys, by slot (the photos are sent as soon as chosen).
  const [keys, setKeys] = useState<Record<number, string>>({});
  const [slots, setSlots] = useState(3);
  // One entry per analyte, even for an analyte read from several pads.
  const analytes = pads.filter((p, k) => pads.findIndex((q) => q.analyte === p.analyte) === k);
  const cols = Math.max(...pads.map((p) => p.swatches.length));
  return (
    <div className="space-y-6">
      <PageTitle sub={`${chart.name} · lot ${batch.lot} · reads with version ${version}`}>Calibrate the chart</PageTitle>
      <ButtonLink variant="quiet" href={`/charts/${chart.id}?batch=${batch.id}`}>Back to the chart</ButtonLink>

      <Card>
        <h2 className="mb-2 text-lg font-bold">1. From a photo of the printed chart</h2>
        <div className="mb-4">
          <p className="mb-1 font-bold">{photo ? "Use another photo" : "Photo of the batch's colour chart"}</p>
          <BatchPhotoInput
            batchId={batch.id}
            maxBytes={maxBytes}
            label={photo ? "Use another photo of the chart" : "Photo of the batch's colour chart"}
            testId="chart-photo-input"
            onSent={async (key, signal) => {
              const r = await postJson(`/api/chart-batches/${batch.id}/photos`, { key }, signal);
              if (r.status >= 200 && r.status < 300) {
                await revalidator.revalidate();
                return null;
              }
              return { message: String(r.json.message ?? "The photo could not be checked. Try again."), retry: r.status === 409 || r.status >= 500 };
            }}
          />
        </div>
        {photo && (
          <form method="post" className="space-y-3">
            <input type="hidden" name="intent" value="sample" />
            <GridOverlay
              key={`${photo.id}-${JSON.stringify(a?.placed ?? null)}`}
              src={`/api/chart-photos/${photo.id}`}
              width={photo.width}
              height={photo.height}
              rows={(a?.placed?.grid as { rows?: number })?.rows ?? pads.length}
              cols={(a?.placed?.grid as { cols?: number })?.cols ?? cols}
              initialGrid={(a?.placed?.grid as { corners?: [number, number][] })?.corners as never}
              initialWhite={a?.placed?.white as never}
            />
            {a?.intent === "sample" && a.form && <Notice tone="alert">{a.form}</Notice>}
            <Button type="submit">Sample the colours</Button>
          </form>
        )}
        {a?.intent === "sample" && a.proposal && <ProposalView proposal={a.proposal} source="photo" pads={pads} />}
      </Card>

      <Card>
        <h2 className="mb-2 text-lg font-bold">2. From reference solutions</h2>
        <p className="mb-3 text-sm text-ink-soft">Dip strips of this batch in solutions of known value, photograph each strip, and enter the known values (leave a pad empty if its solution is not known).</p>
        <Form method="post" className="space-y-4">
          <input type="hidden" name="intent" value="solutions" />
          {Array.from({ length: slots }, (_, i) => (
            <fieldset key={i} className="rounded-xl border border-line p-3" data-testid={`solution-${i}`}>
              <legend className="px-1 font-bold">Strip photo {i + 1}</legend>
              <input type="hidden" name={`key_${i}`} value={keys[i] ?? ""} />
              <BatchPhotoInput
                batchId={batch.id}
                maxBytes={maxBytes}
                label={`Strip photo ${i + 1}`}
                testId={`solution-photo-${i}`}
                onCleared={() => setKeys((k) => ({ ...k, [i]: "" }))}
                onSent={async (key) => {
                  setKeys((k) => ({ ...k, [i]: key }));
                  return null;
                }}
              />
              <div className="mt-2 grid gap-2 sm:grid-cols-3">
                {analytes.map((p) => (
                  <label key={p.analyte} className="text-sm">
                    {p.label} ({p.unit})
                    <Input name={`value_${i}_${p.analyte}`} inputMode="decimal" aria-label={`Photo ${i + 1} ${p.label}`} />
                  </label>
                ))}
              </div>
            </fieldset>
          ))}
          {slots < maxSlots && (
            <Button type="button" variant="quiet" onClick={() => setSlots((n) => Math.min(maxSlots, n + 1))}>
              Add another strip photo
            </Button>
          )}
          {a?.intent === "solutions" && a.form && <Notice tone="alert">{a.form}</Notice>}
          <Button type="submit" variant="secondary">Refit the swatches</Button>
        </Form>
        {a?.intent === "solutions" && a.proposal && <ProposalView proposal={a.proposal} source="solutions" pads={pads} />}
      </Card>

      <Card>
        <h2 className="mb-2 text-lg font-bold">3. From owners' corrections</h2>
        <table className="w-full text-sm" data-testid="corrections">
          <thead>
            <tr className="text-left"><th>Pad</th><th>Confirmed pads</th><th>Corrected</th><th>Mean offset (confirmed − read)</th></tr>
          </thead>
          <tbody>
            {corrections.pads.map((p) => (
              <tr key={p.analyte} className="border-t border-line">
                <td>{p.label}</td>
                <td>{p.n}</td>
                <td>{p.corrected}</td>
                <td>{p.meanOffset === null ? "–" : `${p.meanOffset > 0 ? "+" : ""}${p.meanOffset.toFixed(2)} ${p.unit}`}</td>
              </tr>
            ))}
          </tbody>
        </table>
        {corrections.pads.some((p) => p.bySwatch.some((b) => b.seen)) && (
          <ul className="mt-3 space-y-1 text-sm" data-testid="seen-colours">
            {corrections.pads.flatMap((p) =>
              p.bySwatch
                .filter((b) => b.seen)
                .map((b) => (
                  <li key={`${p.analyte}-${b.value}`} className="flex flex-wrap items-center gap-2">
                    {p.label} {b.value}: chart <Swatch color={pads.find((x) => x.analyte === p.analyte)?.swatches.find((x) => x.value === b.value)?.color ?? ""} /> owners&apos; strips
                    <Swatch color={b.seen!} /> ({b.n} confirmed, ΔE00 {b.deltaE?.toFixed(1)})
                  </li>
                )),
            )}
          </ul>
        )}
        {corrections.proposal ? (
          <div className="mt-3">
            <p className="mb-2 text-sm">Where owners confirmed a value at least twice, the colour their strips showed differs from the chart:</p>
            <ProposalView proposal={corrections.proposal} source="corrections" pads={pads} />
          </div>
        ) : (
          <p className="mt-3 text-sm text-ink-soft">No adjustment to propose yet: it needs at least two confirmed readings at a value whose colour differs from the chart by 1 ΔE00 or more.</p>
        )}
      </Card>
    </div>
  );
}
