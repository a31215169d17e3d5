import { Form, data, redirect } from "react-router";
import { FirstFillPrompt, RetestTimer, TubTabs, chemicalName } from "~/components/plan/plan-ui";
import { Button, Card, EmptyState, Field, Input, Notice, PageTitle, Select } from "~/components/ui";
import { ownerProducts } from "~/features/plan/catalogue.server";
import { activeTimer, deleteTreatment, recentTreatments, recordTreatment } from "~/features/plan/plan.server";
import { dayAndClock, safeZone, toLocalInput } from "~/lib/tub-time";
import { safeRedirect } from "~/lib/session.server";
import { tubGuard } from "~/lib/tub-access.server";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/treatments";

export const meta: Route.MetaFunction = ({ loaderData }) => [{ title: `Treatments · ${loaderData?.tub.name ?? "Tub"} · Dipwell` }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub, relation } = await tubGuard({ context, request, params }, "view");
  const now = new Date();
  const zone = safeZone(tub.timeZone);
  const { locale } = timeWords(request);
  const [rows, products] = await Promise.all([recentTreatments(tub.id, 100), ownerProducts(tub.ownerId)]);
  const timer = activeTimer(tub, rows, products, now, locale);
  return {
    relation,
    tub: { id: tub.id, name: tub.name, timeZone: zone, firstFillCompletedAt: tub.firstFillCompletedAt?.toISOString() ?? null },
    timer,
    // Times as words from the server only (the browser's zone rules may differ).
    timerAddedWords: timer ? dayAndClock(timer.addedAt, zone, locale) : null,
    treatments: rows.map((r) => ({
      id: r.id,
      productName: r.productName,
      chemical: r.chemical,
      amount: r.amount,
      unit: r.unit,
      addedAt: r.addedAt.toISOString(),
      addedWords: dayAndClock(r.addedAt, zone, locale),
      retestWords: r.retestAt ? dayAndClock(r.retestAt, zone, locale) : null,
      note: r.note,
    })),
    products: products.map((p) => ({ id: p.id, name: p.name, form: p.form })),
    nowLocal: toLocalInput(now, zone),
    now: now.toISOString(),
  };
}

export async function action({ context, request, params }: Route.ActionArgs) {
  const { user, tub } = await tubGuard({ context, request, params }, "care");
  const form = await request.formData();
  const intent = form.get("intent");
  if (intent === "delete") {
    await deleteTreatment(tub.id, String(form.get("id") ?? ""));
    return redirect(`/tubs/${tub.id}/treatments`);
  }
  if (intent !== "log") return data({ fields: {} as Record<string, string>, form: "Unknown action.", values: {} as Record<string, string>, locked: false }, { status: 400 });
  const result = await recordTreatment(tub, user.id, form, new Date(), timeWords(request).locale);
  if (!result.ok) {
    const values = Object.fromEntries([...form].map(([k, v]) => [k, String(v)]));
    return data({ fields: result.fields, form: result.fields.form ?? "The treatment was not saved; please fix what is marked.", values, locked: result.locked ?? false }, { status: 400 });
  }
  return redirect(safeRedirect(form.get("redirectTo"), `/tubs/${tub.id}/treatments`));
}

export default function TreatmentsPage({ loaderData, actionData }: Route.ComponentProps) {
  const { tub, timer, treatments, products, nowLocal, now } = loaderData;
  const v = actionData?.values ?? {};
  const f = actionData?.fields ?? {};
  return (
    <div className="space-y-5">
      <TubTabs tubId={tub.id} active="treatments" />
      <PageTitle sub={`Times in ${tub.timeZone}`}>Treatments · {tub.name}</PageTitle>
      {!tub.firstFillCompletedAt && <FirstFillPrompt tubId={tub.id} />}
      {timer ? (
        <RetestTimer retestAt={timer.retestAt} clock={timer.retestClock} day={timer.retestDay} now={now} label={`${timer.productName} was added ${loaderData.timerAddedWords}`} />
      ) : (
        <Notice tone="ok">No retest timer is running. <a href={`/tubs/${tub.id}/plan`}>See the plan</a>.</Notice>
      )}

      <Card>
        <h2 className="mb-3 text-lg font-bold">Record what you added</h2>
        {actionData?.form && <Notice tone="alert" className="mb-3">{actionData.form}</Notice>}
        <Form method="post" className="space-y-3">
          <input type="hidden" name="intent" value="log" />
          <Field label="Product" error={f.productId}>
            <Select name="productId" defaultValue={v.productId ?? ""}>
              <option value="">Choose…</option>
              {products.map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name}
                </option>
              ))}
            </Select>
          </Field>
          <div className="grid grid-cols-2 gap-3">
            <Field label="Amount" error={f.amount}>
              <Input name="amount" inputMode="decimal" defaultValue={v.amount ?? ""} />
            </Field>
            <Field label="Unit" error={f.unit}>
              <Select name="unit" defaultValue={v.unit ?? "g"}>
                <option value="g">grams (g)</option>
                <option value="mL">millilitres (mL)</option>
                <option value="tablets">tablets</option>
              </Select>
            </Field>
          </div>
          <Field label="When" hint="Your tub's local time" error={f.addedAt}>
            <Input type="datetime-local" name="addedAt" defaultValue={v.addedAt ?? nowLocal} />
          </Field>
          <Field label="Note (optional)" error={f.note}>
            <Input name="note" defaultValue={v.note ?? ""} />
          </Field>
          {(timer || actionData?.locked) && (
            <label className="flex min-h-12 items-center gap-3 rounded-xl border border-caution bg-caution-soft px-3 py-2">
              <input type="checkbox" name="alreadyAdded" value="1" className="h-6 w-6" />
              <span>I already added it (record it anyway: nothing should go in until {timer ? timer.retestClock : "the retest"})</span>
            </label>
          )}
          <Button type="submit">Save the treatment</Button>
        </Form>
      </Card>

      <section>
        <h2 className="mb-2 text-lg font-bold">Treatment log</h2>
        {treatments.length === 0 ? (
          <EmptyState title="Nothing recorded yet">When you add a product, press “I added this” on the plan or record it above.</EmptyState>
        ) : (
          <ul className="divide-y divide-line rounded-card border border-line bg-shell" data-testid="treatment-list">
            {treatments.map((t) => (
              <li key={t.id} className="flex items-start gap-3 p-3">
                <div className="min-w-0 flex-1">
                  <p className="font-bold">
                    {t.amount} {t.unit} · {t.productName}
                  </p>
                  <p className="text-sm text-ink-soft">
                    {chemicalName(t.chemical)} · added {t.addedWords}
                    {t.retestWords ? ` · retest after ${t.retestWords}` : ""}
                  </p>
                  {t.note && <p className="text-sm">{t.note}</p>}
                </div>
                <Form method="post" onSubmit={(e) => { if (!confirm("Remove this entry from the log?")) e.preventDefault(); }}>
                  <input type="hidden" name="intent" value="delete" />
                  <input type="hidden" name="id" value={t.id} />
                  <button className="rounded-lg px-2 py-1 text-sm font-bold text-alert hover:bg-alert-soft" aria-label={`Remove ${t.productName} of ${t.addedWords}`}>
                    Remove
                  </button>
                </Form>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
