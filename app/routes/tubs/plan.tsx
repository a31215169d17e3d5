import { Form, data, redirect, useNavigation } from "react-router";
import { AUTHORITY_NOTE, DEFAULT_TARGETS } from "~/chemistry";
import { BalanceCard, FirstFillPrompt, PlanHeadline, RetestTimer, StepCard, TubTabs } from "~/components/plan/plan-ui";
import { temperatureWords, volumeWords, type PlanStep } from "~/chemistry";
import { userUnits } from "~/features/plan/units.server";
import { Button, Card, EmptyState, Input, Notice, PageTitle } from "~/components/ui";
import { parseTargets, parseWhatIf, saveTargets, tubPlan } from "~/features/plan/plan.server";
import { READING_KEYS, TARGET_PARAMETERS } from "~/features/plan/shared";
import { analyteLabel, analyteName } from "~/chemistry";
import { dayAndClock } from "~/lib/tub-time";
import { tubGuard } from "~/lib/tub-access.server";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/plan";

export const meta: Route.MetaFunction = ({ loaderData }) => [{ title: `Plan · ${loaderData?.tub.name ?? "Tub"} · Dipwell` }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { user, tub, relation } = await tubGuard({ context, request, params }, "view");
  const url = new URL(request.url);
  const whatIf = parseWhatIf(url.searchParams);
  const { locale } = timeWords(request);
  const view = await tubPlan(tub, { whatIf: whatIf.readings, units: await userUnits(user.id), locale });
  // Times as words from the server only (the browser's zone rules may differ), in the user's locale.
  const words = {
    reading: view.reading ? dayAndClock(view.reading.takenAt, view.tub.timeZone, locale) : null,
    timerAdded: view.timer ? dayAndClock(view.timer.addedAt, view.tub.timeZone, locale) : null,
  };
  return { ...view, words, relation, whatIfError: whatIf.error, whatIfValues: whatIf.readings || whatIf.error ? Object.fromEntries(url.searchParams) : null, saved: url.searchParams.get("saved") === "targets" };
}

export async function action({ context, request, params }: Route.ActionArgs) {
  const { tub } = await tubGuard({ context, request, params }, "care");
  const form = await request.formData();
  const intent = form.get("intent");
  if (intent === "reset-targets") {
    await saveTargets(tub.id, {});
    return redirect(`/tubs/${tub.id}/plan?saved=targets`);
  }
  if (intent === "targets") {
    const parsed = parseTargets(tub, form);
    if (!parsed.ok) return data({ fields: parsed.fields, form: "Some target ranges need fixing; nothing was saved." }, { status: 400 });
    await saveTargets(tub.id, parsed.targets);
    return redirect(`/tubs/${tub.id}/plan?saved=targets`);
  }
  return data({ fields: {} as Record<string, string>, form: "Unknown action." }, { status: 400 });
}

const fmtValue = (analyte: string, v: number) => (analyte === "ph" ? v.toFixed(1) : String(Math.round(v * 10) / 10));

export default function TubPlanPage({ loaderData, actionData }: Route.ComponentProps) {
  const { tub, plan, reading, source, error, targets, overridden, timer, now, whatIfError, whatIfValues, saved, units } = loaderData;
  const nav = useNavigation();
  const firstDose = plan?.steps.find((s) => s.kind === "dose" || s.kind === "replace_water");
  const waiting = plan?.steps[0]?.kind === "wait";
  const here = `/tubs/${tub.id}/plan`;
  const params = TARGET_PARAMETERS(tub.sanitiser);

  return (
    <div className="space-y-5">
      <TubTabs tubId={tub.id} active="plan" />
      <PageTitle sub={`${volumeWords(tub.volumeLitres, units)} · ${tub.sanitiser === "chlorine" ? "chlorine" : "bromine"} · ${temperatureWords(tub.temperatureC, units)} · ${tub.bathersPerDay} bathers a day`}>Treatment plan · {tub.name}</PageTitle>
      {plan && <PlanHeadline headline={plan.headline} />}
      {!tub.firstFillCompletedAt && <FirstFillPrompt tubId={tub.id} />}

      {timer && <RetestTimer retestAt={timer.retestAt} clock={timer.retestClock} day={timer.retestDay} now={now} label={`${timer.productName} was added ${loaderData.words.timerAdded}`} />}

      <Card>
        <h2 className="mb-1 text-lg font-bold">From which reading</h2>
        {source === "what-if" ? (
          <Notice tone="caution">What-if plan from the values you entered below; nothing is saved. <a href={here}>Back to the latest reading</a>.</Notice>
        ) : reading ? (
          <>
            <p data-testid="reading-source">
              Reading of <strong>{loaderData.words.reading}</strong> ({tub.timeZone}){reading.confirmed ? ", confirmed" : ", not confirmed yet"}.
            </p>
            {!reading.confirmed && <p className="text-sm text-caution">Confirm the pads on the reading screen first if any look wrong; the plan uses the values as read.</p>}
            <ul className="mt-2 flex flex-wrap gap-2 text-sm">
              {reading.pads.map((p) => (
                <li key={p.analyte} className="rounded-lg bg-sand px-2 py-1">
                  {analyteName(p.analyte)} <strong>{fmtValue(p.analyte, p.value)}</strong>
                </li>
              ))}
            </ul>
          </>
        ) : (
          <p>No reading yet. Test the water with a strip, or enter values by hand below for a what-if plan.</p>
        )}
      </Card>

      {error && <Notice tone="alert">{error}</Notice>}

      {plan && (
        <>
          <section aria-labelledby="steps-title">
            <h2 id="steps-title" className="mb-2 text-xl font-bold text-well-900">
              {plan.steps.length === 0 ? "No steps" : waiting ? "Wait before the next step" : plan.steps.length === 1 ? "Today's step" : "Do these steps in order, one at a time"}
            </h2>
            {plan.steps.length === 0 ? (
              <EmptyState title={plan.headline.tone === "ok" ? "Nothing to add now" : "Nothing to add now, but see above"}>{plan.headline.detail}</EmptyState>
            ) : (
              <StepList steps={plan.steps} tubId={tub.id} readingId={source === "reading" ? reading?.id : null} canLog={source === "reading" || source === "what-if"} firstDose={firstDose} waiting={waiting} here={here} />
            )}
          </section>

          <Card data-testid="predicted">
            <h2 className="mb-2 text-lg font-bold">The water after these steps</h2>
            <p className="mb-2 font-bold">May be used: {plan.predicted.usableWords}</p>
            <ul className="grid grid-cols-2 gap-x-4 gap-y-1 text-sm">
              {(["free_chlorine", "combined_chlorine", "bromine", "ph", "total_alkalinity", "calcium_hardness", "cyanuric_acid"] as const)
                .filter((k) => plan.predicted[k] !== null)
                .map((k) => (
                  <li key={k}>
                    {analyteName(k)} <strong>{k === "ph" ? plan.predicted[k]!.toFixed(1) : plan.predicted[k]}</strong>
                  </li>
                ))}
              {plan.predicted.lsi !== null && (
                <li>
                  Langelier index <strong>{plan.predicted.lsi > 0 ? "+" : ""}{plan.predicted.lsi.toFixed(2)}</strong>
                </li>
              )}
            </ul>
            <p className="mt-2 text-xs text-ink-soft">The engine's own estimate; retest after each step. Ranges follow {plan.guidance.name}.</p>
          </Card>

          {plan.trends.words.length > 0 && (
            <Card data-testid="trends">
              <h2 className="mb-2 text-lg font-bold">Slow changes</h2>
              <ul className="list-disc space-y-1 pl-5">
                {plan.trends.words.map((w) => (
                  <li key={w}>{w}</li>
                ))}
              </ul>
            </Card>
          )}

          <BalanceCard balance={plan.waterBalance} />

          <Card>
            <h2 className="mb-2 text-lg font-bold">Good to know</h2>
            <ul className="list-disc space-y-1 pl-5">
              {plan.notes.filter((n) => n !== AUTHORITY_NOTE).map((n) => (
                <li key={n}>{n}</li>
              ))}
            </ul>
          </Card>
        </>
      )}

      <Notice tone="info">
        <strong>Who decides:</strong> {AUTHORITY_NOTE}
      </Notice>

      <Card>
        <h2 className="mb-1 text-lg font-bold">What-if: enter readings by hand</h2>
        <p className="mb-3 text-sm text-ink-soft">See the plan for other values without saving them. Leave a box empty if you did not measure it.</p>
        <Form method="get" className="grid grid-cols-2 gap-3">
          <input type="hidden" name="whatif" value="1" />
          {READING_KEYS.filter((k) => (tub.sanitiser === "chlorine" ? k !== "bromine" : k !== "free_chlorine" && k !== "total_chlorine" && k !== "cyanuric_acid")).map((k) => (
            <label key={k} className="block text-sm">
              <span className="block font-bold">{analyteLabel(k)}</span>
              <Input name={k} inputMode="decimal" defaultValue={whatIfValues?.[k] ?? (reading?.readings as Record<string, number | undefined> | undefined)?.[k]?.toString() ?? ""} />
            </label>
          ))}
          {whatIfError && <p role="alert" className="col-span-2 font-bold text-alert">{whatIfError}</p>}
          <Button type="submit" variant="secondary" className="col-span-2">Show the what-if plan</Button>
        </Form>
      </Card>

      <Card>
        <h2 className="mb-1 text-lg font-bold">Target ranges for this tub</h2>
        <p className="mb-3 text-sm text-ink-soft">The plan aims inside these ranges. Change them only if your installer or product labels say so.</p>
        {saved && <Notice tone="ok" className="mb-3">Target ranges saved.</Notice>}
        {actionData?.form && <Notice tone="alert" className="mb-3">{actionData.form}</Notice>}
        <Form method="post" className="space-y-4">
          <input type="hidden" name="intent" value="targets" />
          {params.map((p) => {
            const r = targets[p];
            const def = DEFAULT_TARGETS[tub.sanitiser][p];
            const err = actionData?.fields?.[p];
            return (
              <fieldset key={p} className="rounded-xl border border-line p-3">
                <legend className="px-1 font-bold">{analyteLabel(p)}</legend>
                <div className="grid grid-cols-2 gap-3">
                  <label className="text-sm">
                    <span className="block">Lowest</span>
                    <Input name={`${p}.min`} inputMode="decimal" defaultValue={String(r.min)} aria-label={`${analyteName(p)} lowest`} />
                  </label>
                  <label className="text-sm">
                    <span className="block">Highest</span>
                    <Input name={`${p}.max`} inputMode="decimal" defaultValue={String(r.max)} aria-label={`${analyteName(p)} highest`} />
                  </label>
                </div>
                <p className="mt-1 text-xs text-ink-soft">
                  {overridden.includes(p) ? `Set for this tub. Default ${def.min}–${def.max}: ` : `Default ${def.min}–${def.max}: `}
                  {def.source}
                </p>
                {err && <p role="alert" className="mt-1 text-sm font-bold text-alert">{err}</p>}
              </fieldset>
            );
          })}
          <div className="flex flex-wrap gap-2">
            <Button type="submit" disabled={nav.state !== "idle"}>Save target ranges</Button>
          </div>
        </Form>
        {overridden.length > 0 && (
          <Form method="post" className="mt-2">
            <input type="hidden" name="intent" value="reset-targets" />
            <Button type="submit" variant="quiet">Back to the default ranges</Button>
          </Form>
        )}
      </Card>
    </div>
  );
}

/** Today's step first; later steps folded. Cautions once per product (later steps point back to them). */
function StepList({ steps, tubId, readingId, canLog, firstDose, waiting, here }: { steps: PlanStep[]; tubId: string; readingId?: string | null; canLog: boolean; firstDose: PlanStep | undefined; waiting: boolean; here: string }) {
  const shownAt = new Map<string, number>();
  const cards = steps.map((s) => {
    const key = s.productId ?? `${s.kind}-${s.order}`;
    const at = shownAt.get(key);
    if (at === undefined) shownAt.set(key, s.order);
    return <StepCard key={s.order} step={s} tubId={tubId} readingId={readingId} canLog={canLog} current={s === firstDose && !waiting} redirectTo={here} cautionsAt={at} />;
  });
  const [first, ...later] = cards;
  return (
    <>
      <ol className="space-y-3">{first}</ol>
      {later.length > 0 && (
        <details className="mt-3 rounded-card border border-line bg-shell p-3" data-testid="later-steps">
          <summary className="cursor-pointer font-bold text-well-900">Later steps ({later.length}): after the retest, estimates</summary>
          <ol className="mt-3 space-y-3">{later}</ol>
        </details>
      )}
    </>
  );
}
