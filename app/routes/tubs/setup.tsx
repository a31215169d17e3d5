import { Form, data, redirect } from "react-router";
import { volumeWords, type RoutineStep } from "~/chemistry";
import { Cautions, RetestTimer, TubTabs } from "~/components/plan/plan-ui";
import { Button, Card, Notice, PageTitle, cx } from "~/components/ui";
import { completeSetup, finishStep, refilled, setupView, startRun } from "~/features/plan/routines.server";
import { Day } from "~/components/When";
import { dayAndClock } from "~/lib/tub-time";
import { timeWords } from "~/lib/dates";
import { userUnits } from "~/features/plan/units.server";
import { tubGuard } from "~/lib/tub-access.server";
import type { Route } from "./+types/setup";

export const meta: Route.MetaFunction = ({ loaderData }) => [{ title: `Routines · ${loaderData?.tub.name ?? "Tub"} · Dipwell` }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { user, tub, relation } = await tubGuard({ context, request, params }, "view");
  const { locale } = timeWords(request);
  const view = await setupView(tub, new Date(), await userUnits(user.id), locale);
  // Times as words from the server only (the browser's zone rules may differ), in the user's locale.
  const finishedWords = view.tub.firstFillCompletedAt ? dayAndClock(view.tub.firstFillCompletedAt, view.tub.timeZone, locale) : null;
  return { ...view, finishedWords, relation };
}

export async function action({ context, request, params }: Route.ActionArgs) {
  const { user, tub } = await tubGuard({ context, request, params }, "care");
  const form = await request.formData();
  const intent = form.get("intent");
  let result;
  if (intent === "start") result = await startRun(tub);
  else if (intent === "step") {
    const index = Number(form.get("step"));
    if (!Number.isInteger(index) || index < 0) return data({ form: "That step does not exist." }, { status: 400 });
    result = await finishStep(tub, user.id, index);
  } else if (intent === "complete") result = await completeSetup(tub);
  else if (intent === "refilled") result = await refilled(tub);
  else return data({ form: "Unknown action." }, { status: 400 });
  if (!result.ok) return data({ form: result.form }, { status: 400 });
  return redirect(`/tubs/${tub.id}/setup`);
}

function amount(s: RoutineStep) {
  if (s.amountText) return s.amountText;
  if (s.millilitres !== null) return `${s.millilitres} mL`;
  if (s.grams !== null) return `${s.grams} g`;
  return null;
}

const waitWords = (m: number) => (m >= 60 ? `${Math.round((m / 60) * 10) / 10} h` : `${m} min`);

/** Cautions once per product: a later step of the same product points back. */
function cautionsOnce(steps: RoutineStep[]) {
  const seen = new Map<string, number>();
  return steps.map((s) => {
    if (!s.productId) return undefined;
    const at = seen.get(s.productId);
    if (at === undefined) seen.set(s.productId, s.order);
    return at;
  });
}

function RoutineList({ steps }: { steps: RoutineStep[] }) {
  const refs = cautionsOnce(steps);
  return (
    <ol className="space-y-3">
      {steps.map((s, i) => (
        <li key={s.order} className="rounded-xl border border-line p-3">
          <p>
            <strong>{s.order}.</strong> {s.words}
          </p>
          {s.cautions.length > 0 && (refs[i] === undefined ? <div className="mt-2"><Cautions items={s.cautions} open={false} /></div> : <p className="mt-1 text-sm font-bold text-alert">⚠ Same safety as step {refs[i]}.</p>)}
          {amount(s) && <p className="mt-1 font-bold text-well-900">Amount: {amount(s)}</p>}
          {s.timerMinutes ? <p className="text-sm text-ink-soft">Then wait {waitWords(s.timerMinutes)}.</p> : null}
        </li>
      ))}
    </ol>
  );
}

export default function SetupPage({ loaderData, actionData }: Route.ComponentProps) {
  const { tub, run, steps, timer, readiness, topUp, foam, drain, now, stepsError, ownTimerRunning, doseLocked } = loaderData;
  const refs = cautionsOnce(steps);
  const current = run?.stepIndex ?? -1;
  const last = steps.length - 1;
  return (
    <div className="space-y-5">
      <TubTabs tubId={tub.id} active="setup" />
      <PageTitle sub={`${volumeWords(tub.volumeLitres, loaderData.units)} · ${tub.sanitiser}`}>Routines · {tub.name}</PageTitle>
      {actionData?.form && <Notice tone="alert">{actionData.form}</Notice>}

      <Card>
        <h2 className="mb-1 text-xl font-bold text-well-900">First-fill setup</h2>
        {tub.firstFillCompletedAt && !run ? (
          <Notice tone="ok">First-fill setup finished {loaderData.finishedWords}. Use the plan for day-to-day care.</Notice>
        ) : !run ? (
          <>
            <Notice tone="caution" className="mb-3">
              <p className="font-bold">New here? Start with the first-fill setup.</p>
              <p>It guides you one product at a time: sanitiser, wait, alkalinity, wait, pH, wait; the tub is ready when every pad is in range.</p>
            </Notice>
            <Form method="post">
              <input type="hidden" name="intent" value="start" />
              <Button type="submit">Start the first-fill setup</Button>
            </Form>
          </>
        ) : null}
        {stepsError && <Notice tone="alert">{stepsError}</Notice>}
        {run && (
          <>
            {timer && <div className="my-3"><RetestTimer retestAt={timer.endsAt} clock={timer.clock} now={now} label={timer.why} /></div>}
            <ol className="mt-3 space-y-3">
              {steps.map((s, i) => {
                const state = i < current ? "done" : i === current ? "current" : "later";
                return (
                  <li key={s.order} data-testid="setup-step" className={cx("rounded-xl border p-3", state === "current" ? "border-well-500 ring-2 ring-well-100" : "border-line", state === "done" && "bg-sand")}>
                    <p>
                      <strong>{state === "done" ? <><span aria-hidden="true">✓</span><span className="sr-only">Done:</span></> : `${s.order}.`}</strong> {s.words}
                    </p>
                    {s.cautions.length > 0 && state !== "done" && (refs[i] === undefined ? <div className="mt-2"><Cautions items={s.cautions} open={state === "current"} /></div> : <p className="mt-1 text-sm font-bold text-alert">⚠ Same safety as step {refs[i]}: read it before you add this.</p>)}
                    {amount(s) && <p className="mt-1 font-bold text-well-900" data-testid="setup-amount">Amount: {amount(s)}</p>}
                    {s.timerMinutes ? <p className="text-sm text-ink-soft">Timer: {waitWords(s.timerMinutes)} after this step{s.shock ? " (a shock: keep everyone out until the retest)" : ""}.</p> : null}
                    {state === "current" && i < last && (
                      <Form method="post" className="mt-2">
                        <input type="hidden" name="intent" value="step" />
                        <input type="hidden" name="step" value={i} />
                        <Button type="submit" disabled={ownTimerRunning || (doseLocked && Boolean(s.productId))}>{amount(s) ? "I added this" : "Done"}{s.timerMinutes ? ", start the timer" : ""}</Button>
                      </Form>
                    )}
                    {state === "current" && i === last && (
                      <div className="mt-2 space-y-2">
                        {readiness.ready ? <Notice tone="ok">Every pad is in range.</Notice> : <Notice tone="caution">{readiness.reasons.join(" ")}</Notice>}
                        <Form method="post">
                          <input type="hidden" name="intent" value="complete" />
                          <Button type="submit" disabled={!readiness.ready}>The tub is ready</Button>
                        </Form>
                      </div>
                    )}
                  </li>
                );
              })}
            </ol>
          </>
        )}
      </Card>

      <Card>
        <h2 className="mb-2 text-lg font-bold">Drain and refill</h2>
        {drain.days === null ? (
          <p>Set the number of bathers per day for this tub to see the interval.</p>
        ) : (
          <>
            <p>
              About every <strong>{drain.days} days</strong> for {Math.round(tub.volumeLitres)} L at {tub.bathersPerDay} bathers a day (volume in US gallons ÷ 3 ÷ bathers per day, Maine 10-144 CMR ch. 202 App. B).
            </p>
            {drain.dueOn ? (
              <p className={cx("mt-1 font-bold", drain.overdue ? "text-alert" : "text-well-900")}>
                {drain.overdue ? "Overdue since" : "Next due"} <Day day={drain.dueOn} /> (filled <Day day={tub.fillDate!} />).
              </p>
            ) : (
              <p className="mt-1 text-ink-soft">No fill date recorded yet.</p>
            )}
          </>
        )}
        <Form method="post" className="mt-3" onSubmit={(e) => { if (!confirm("Record a drain and refill today? The first-fill setup starts again.")) e.preventDefault(); }}>
          <input type="hidden" name="intent" value="refilled" />
          <Button type="submit" variant="secondary">I drained and refilled today</Button>
        </Form>
      </Card>

      <Card>
        <h2 className="mb-2 text-lg font-bold">Routine top-ups</h2>
        <RoutineList steps={topUp} />
      </Card>

      <Card>
        <h2 className="mb-2 text-lg font-bold">Foam</h2>
        <RoutineList steps={foam} />
      </Card>

      <Notice tone="info">Product labels, local codes and, for public or commercial spas, licensed operators decide; this is guidance for a private tub.</Notice>
    </div>
  );
}
