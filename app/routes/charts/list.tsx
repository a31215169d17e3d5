import { data, redirect } from "react-router";
import { z } from "zod";
import { Button, Card, EmptyState, Field, Input, Notice, PageTitle } from "~/components/ui";
import { ChartInputError, createChart, listCharts } from "~/features/charts/charts.server";
import { requireChartRole } from "~/features/charts/guard.server";
import { expiresOnField } from "~/features/charts/batch-form";
import type { Route } from "./+types/list";

export const meta: Route.MetaFunction = () => [{ title: "Charts · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  requireChartRole(context, request);
  return { charts: await listCharts() };
}

const form = z.object({
  name: z.string().trim().min(1, "Give the chart a name.").max(120, "Keep the name under 120 characters."),
  lot: z.string().trim().min(1, "Enter the batch's lot number.").max(60, "Keep the lot number under 60 characters."),
  expiresOn: expiresOnField,
});

export async function action({ context, request }: Route.ActionArgs) {
  const user = requireChartRole(context, request);
  const fd = await request.formData();
  const parsed = form.safeParse({ name: fd.get("name") ?? "", lot: fd.get("lot") ?? "", expiresOn: fd.get("expiresOn") ?? "" });
  const values = { name: String(fd.get("name") ?? ""), lot: String(fd.get("lot") ?? ""), expiresOn: String(fd.get("expiresOn") ?? "") };
  if (!parsed.success) {
    const fields = Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message]));
    return data({ fields, form: null as string | null, values }, { status: 400 });
  }
  const file = fd.get("file");
  let definition: unknown = undefined;
  if (file && typeof file !== "string" && file.size > 0) {
    if (file.size > 1_000_000) return data({ fields: {}, form: "That file is too large to be a strip chart (over 1 MB).", values }, { status: 400 });
    definition = await file.text();
  }
  try {
    const created = await createChart(user, { ...parsed.data, definition });
    return redirect(`/charts/${created.chartId}`);
  } catch (e) {
    if (e instanceof ChartInputError) return data({ fields: {}, form: e.message, values }, { status: 400 });
    if ((e as { cause?: { code?: string } }).cause?.code === "23505") return data({ fields: { lot: "This lot number is already used." }, form: null, values }, { status: 400 });
    throw e;
  }
}

export default function Charts({ loaderData, actionData }: Route.ComponentProps) {
  const { charts } = loaderData;
  const a = actionData as { fields?: Record<string, string>; form?: string | null; values?: Record<string, string> } | undefined;
  return (
    <div className="space-y-6">
      <PageTitle sub="Colour charts and the strip batches that read with them.">Charts</PageTitle>
      {charts.length === 0 ? (
        <EmptyState title="No charts yet">Create a chart below or import a strip-chart/1 file.</EmptyState>
      ) : (
        <ul className="grid gap-3 sm:grid-cols-2" data-testid="chart-list">
          {charts.map((c) => (
            <li key={c.id}>
              <a href={`/charts/${c.id}`} className="block no-underline">
                <Card className="hover:border-well-300">
                  <p className="text-lg font-bold text-well-900">{c.name}</p>
                  <p className="text-sm text-ink-soft">{c.versions} version{c.versions === 1 ? "" : "s"}</p>
                  <ul className="mt-1 text-sm">
                    {c.batches.map((b) => (
                      <li key={b.id}>
                        Lot {b.lot} · version {b.currentVersion ?? "–"}
                        {b.expiresOn ? ` · expires ${b.expiresOn}` : ""}
                      </li>
                    ))}
                  </ul>
                </Card>
              </a>
            </li>
          ))}
        </ul>
      )}
      <Card>
        <h2 className="mb-3 text-lg font-bold">New chart</h2>
        <form method="post" encType="multipart/form-data" className="space-y-3">
          {a?.form && <Notice tone="alert">{a.form}</Notice>}
          <Field label="Chart name" error={a?.fields?.name}>
            <Input name="name" defaultValue={a?.values?.name} />
          </Field>
          <div className="grid gap-3 sm:grid-cols-2">
            <Field label="Lot number of the first batch" error={a?.fields?.lot}>
              <Input name="lot" defaultValue={a?.values?.lot} />
            </Field>
            <Field label="Expiry date" error={a?.fields?.expiresOn}>
              <Input name="expiresOn" type="date" defaultValue={a?.values?.expiresOn} />
            </Field>
          </div>
          <Field label="Import a strip-chart/1 file (optional)" hint="Leave empty to start from a one-pad template.">
            <input name="file" type="file" accept=".json,application/json" className="block" />
          </Field>
          <Button type="submit">Create chart</Button>
        </form>
      </Card>
    </div>
  );
}
