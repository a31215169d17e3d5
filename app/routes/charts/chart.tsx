import { data, redirect } from "react-router";
import { z } from "zod";
import { ChartEditor, type EditChart } from "~/components/charts/chart-editor";
import { Button, ButtonLink, Card, Field, Input, Notice, PageTitle, Select } from "~/components/ui";
import { addBatch, ChartInputError, loadChart, saveVersion, SOURCES, updateBatch } from "~/features/charts/charts.server";
import { requireChartRole } from "~/features/charts/guard.server";
import { expiresOnField } from "~/features/charts/batch-form";
import { LocalTime } from "~/components/When";
import { timeWords } from "~/lib/dates";
import { batchExpired } from "~/features/tubs/tubs.server";
import type { Route } from "./+types/chart";

export const meta: Route.MetaFunction = ({ loaderData }) => [{ title: `${loaderData?.chart.name ?? "Chart"} · Dipwell` }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  requireChartRole(context, request);
  const { chart, batches, versions } = await loadChart(params.chartId);
  const url = new URL(request.url);
  const batch = batches.find((b) => b.id === url.searchParams.get("batch")) ?? batches[0] ?? null;
  const current = versions.find((v) => v.id === batch?.currentVersionId) ?? versions[0] ?? null;
  return {
    chart: { id: chart.id, name: chart.name },
    batches: batches.map((b) => ({ id: b.id, lot: b.lot, expiresOn: b.expiresOn, expired: batchExpired(b.expiresOn), currentVersion: versions.find((v) => v.id === b.currentVersionId)?.version ?? null })),
    batchId: batch?.id ?? null,
    versions: versions.map((v) => ({ id: v.id, version: v.version, source: SOURCES[v.source as keyof typeof SOURCES] ?? v.source, note: v.note, createdAt: v.createdAt.toISOString(), when: timeWords(request).own(v.createdAt), batchLot: batches.find((b) => b.id === v.batchId)?.lot ?? null })),
    current: current ? { id: current.id, version: current.version, definition: current.definition as EditChart } : null,
    saved: url.searchParams.get("saved"),
  };
}

const batchForm = z.object({
  lot: z.string().trim().min(1, "Enter the lot number.").max(60, "Keep the lot number under 60 characters."),
  expiresOn: expiresOnField,
});

export async function action({ context, request, params }: Route.ActionArgs) {
  const user = requireChartRole(context, request);
  const { batches } = await loadChart(params.chartId);
  const chartId = params.chartId!;
  const fd = await request.formData();
  const intent = String(fd.get("intent") ?? "");
  const batchId = String(fd.get("batchId") ?? new URL(request.url).searchParams.get("batch") ?? batches[0]?.id ?? "");
  const back = (id: string) => redirect(`/charts/${chartId}?batch=${id}`);
  try {
    if (intent === "save" || intent === "import") {
      let definition: unknown = fd.get("definition");
      if (intent === "import") {
        const file = fd.get("file");
        if (!file || typeof file === "string" || file.size === 0) return data({ intent, form: "Choose a strip-chart/1 file to import." }, { status: 400 });
        if (file.size > 1_000_000) return data({ intent, form: "That file is too large to be a strip chart (over 1 MB)." }, { status: 400 });
        definition = await file.text();
      }
      await saveVersion(user, chartId, batchId, definition, intent === "import" ? "import" : "editor", String(fd.get("note") ?? "") || undefined);
      return back(batchId);
    }
    if (intent === "add-batch" || intent === "edit-batch") {
      const parsed = batchForm.safeParse({ lot: fd.get("lot") ?? "", expiresOn: fd.get("expiresOn") ?? "" });
      if (!parsed.success) return data({ intent, form: parsed.error.issues.map((i) => i.message).join(" ") }, { status: 400 });
      if (intent === "add-batch") {
        const b = await addBatch(user, chartId, { ...parsed.data, versionId: String(fd.get("versionId") ?? "") });
        return back(b.id);
      }
      await updateBatch(chartId, batchId, parsed.data);
      return back(batchId);
    }
    return data({ intent, form: "Unknown action." }, { status: 400 });
  } catch (e) {
    if (e instanceof ChartInputError) return data({ intent, form: e.message, definition: fd.get("definition") }, { status: 400 });
    throw e;
  }
}

export default function ChartPage({ loaderData, actionData }: Route.ComponentProps) {
  const { chart, batches, batchId, versions, current, saved } = loaderData;
  const a = actionData as { intent?: string; form?: string; definition?: string } | undefined;
  const batch = batches.find((b) => b.id === batchId);
  let initial = current?.definition ?? null;
  if (a?.intent === "save" && typeof a.definition === "string") {
    try {
      initial = JSON.parse(a.definition);
    } catch {
      /* keep the stored one */
    }
  }
  return (
    <div className="space-y-6">
      <PageTitle sub={batch ? `Lot ${batch.lot} reads with version ${batch.currentVersion ?? "–"}` : "No batch yet"}>{chart.name}</PageTitle>
      {saved && batch && !a?.form && <Notice tone="ok">Version {saved} saved. Lot {batch.lot} now reads with it; earlier readings keep their own version.</Notice>}
      <Card>
        <h2 className="mb-2 text-lg font-bold">Strip batches</h2>
        <ul className="divide-y divide-line">
          {batches.map((b) => (
            <li key={b.id} className="flex flex-wrap items-center gap-3 py-2">
              <a href={`/charts/${chart.id}?batch=${b.id}`} className={b.id === batchId ? "font-bold" : ""}>
                Lot {b.lot}
              </a>
              <span className="text-sm text-ink-soft">
                version {b.currentVersion ?? "–"}
                {b.expiresOn ? ` · expires ${b.expiresOn}` : " · no expiry date"}
              </span>
              {b.expired && (
                <span data-testid="batch-expired" className="rounded-full bg-alert-soft px-2 py-0.5 text-sm font-bold text-alert">Expired: no longer offered to owners</span>
              )}
              <ButtonLink variant="quiet" href={`/charts/${chart.id}/batches/${b.id}/calibrate`}>Calibrate</ButtonLink>
            </li>
          ))}
        </ul>
        {(a?.intent === "add-batch" || a?.intent === "edit-batch") && a.form && <Notice tone="alert" className="mt-2">{a.form}</Notice>}
        <div className="mt-3 grid gap-4 sm:grid-cols-2">
          {batch && (
            <form method="post" className="space-y-2">
              <input type="hidden" name="intent" value="edit-batch" />
              <input type="hidden" name="batchId" value={batch.id} />
              <p className="font-bold">Edit lot {batch.lot}</p>
              <Field label="Lot number"><Input name="lot" defaultValue={batch.lot} /></Field>
              <Field label="Expiry date"><Input name="expiresOn" type="date" defaultValue={batch.expiresOn ?? ""} /></Field>
              <Button type="submit" variant="secondary">Save batch</Button>
            </form>
          )}
          <form method="post" className="space-y-2">
            <input type="hidden" name="intent" value="add-batch" />
            <p className="font-bold">New batch</p>
            <Field label="Lot number"><Input name="lot" /></Field>
            <Field label="Expiry date"><Input name="expiresOn" type="date" /></Field>
            <Field label="Starts with version">
              <Select name="versionId" defaultValue={current?.id}>
                {versions.map((v) => (
                  <option key={v.id} value={v.id}>Version {v.version}</option>
                ))}
              </Select>
            </Field>
            <Button type="submit" variant="secondary">Add batch</Button>
          </form>
        </div>
      </Card>

      {batch && initial && (
        <Card>
          <h2 className="mb-2 text-lg font-bold">Edit the chart for lot {batch.lot}</h2>
          <p className="mb-3 text-sm text-ink-soft">Saving makes a new version; readings already taken keep the version they were read with.</p>
          <ChartEditor key={`${current?.id}-${a?.form ?? ""}`} initial={initial} error={a?.intent === "save" ? a.form : undefined} />
        </Card>
      )}

      {batch && (
        <Card>
          <h2 className="mb-2 text-lg font-bold">Import a new version</h2>
          <form method="post" encType="multipart/form-data" className="space-y-2">
            <input type="hidden" name="intent" value="import" />
            <input type="hidden" name="batchId" value={batch.id} />
            {a?.intent === "import" && a.form && <Notice tone="alert">{a.form}</Notice>}
            <Field label="strip-chart/1 file"><input type="file" name="file" accept=".json,application/json" /></Field>
            <Button type="submit" variant="secondary">Import as a new version</Button>
          </form>
        </Card>
      )}

      <Card>
        <h2 className="mb-2 text-lg font-bold">Versions</h2>
        <ul className="divide-y divide-line" data-testid="versions">
          {versions.map((v) => (
            <li key={v.id} className="flex flex-wrap items-center gap-3 py-2">
              <span className="font-bold">Version {v.version}</span>
              <span className="text-sm text-ink-soft">
                {v.source}
                {v.batchLot ? ` · lot ${v.batchLot}` : ""} · <LocalTime at={v.createdAt} text={v.when} />
                {v.note ? ` · ${v.note}` : ""}
              </span>
              <a href={`/api/chart-versions/${v.id}`} download>Export</a>
            </li>
          ))}
        </ul>
      </Card>
    </div>
  );
}
