// Guided routines for a tub: first-fill setup (state in routine_run), routine top-ups, foam, drain interval.
import { and, desc, eq, isNull } from "drizzle-orm";
import { drainIntervalDays, firstFillRoutine, foamTreatment, routineTopUp, type Readings, type RoutineStep, type Units } from "~/chemistry";
import { routineRun, treatment, tub as tubTable } from "~/db/schema";
import { db } from "~/lib/db.server";
import type { Tub } from "~/lib/tub-access.server";
import { ownerProducts } from "./catalogue.server";
import { activeTimer, latestReading, recentTreatments, runEngine, tubGuidance, type LatestReading } from "./plan.server";
import { clock, safeZone } from "~/lib/tub-time";

export const FIRST_FILL = "first_fill";

export interface RunState {
  /** when the timer of the last finished step runs out (ISO) */
  timerEndsAt?: string;
  done?: { step: number; at: string }[];
}

export type RunRow = typeof routineRun.$inferSelect;

export async function currentRun(tubId: string): Promise<RunRow | null> {
  const run = await db.query.routineRun.findFirst({
    where: and(eq(routineRun.tubId, tubId), eq(routineRun.kind, FIRST_FILL), isNull(routineRun.completedAt)),
    orderBy: desc(routineRun.startedAt),
  });
  return run ?? null;
}

/** Readings taken since the run started: they set the alkalinity and pH amounts. */
function fillReadings(latest: LatestReading | null, run: RunRow | null): Readings | undefined {
  if (!latest || !run) return undefined;
  return new Date(latest.takenAt) >= run.startedAt ? latest.readings : undefined;
}

export interface Readiness {
  ready: boolean;
  reasons: string[];
}

/** Ready when sanitiser, pH and total alkalinity of the latest reading are all in range. */
export function readiness(t: Tub, latest: LatestReading | null, run: RunRow | null, products: Awaited<ReturnType<typeof ownerProducts>>): Readiness {
  if (!latest || (run && new Date(latest.takenAt) < run.startedAt))
    return { ready: false, reasons: ["Test the water (take a reading) after the last step; the tub is ready when every pad is in range."] };
  const { plan, error } = runEngine(t, latest.readings, products, [], new Date());
  if (!plan) return { ready: false, reasons: [error ?? "The latest reading could not be judged."] };
  const needed = [t.sanitiser === "chlorine" ? "free_chlorine" : "bromine", "ph", "total_alkalinity"];
  const reasons: string[] = [];
  for (const j of plan.judgements) {
    if (!needed.includes(j.parameter)) continue;
    const name = j.parameter === "ph" ? "pH" : j.parameter.replace(/_/g, " ");
    if (j.status === "not_measured") reasons.push(`${name} was not measured.`);
    else if (j.status !== "in_range") reasons.push(`${name} is ${j.value}, ${j.status === "low" ? "below" : "above"} ${j.min}–${j.max}.`);
  }
  return { ready: reasons.length === 0, reasons };
}

export async function setupView(t: Tub, now = new Date(), units: Units = "metric", locale?: string) {
  const zone = safeZone(t.timeZone);
  const [products, latest, run, rows] = await Promise.all([ownerProducts(t.ownerId), latestReading(t.id), currentRun(t.id), recentTreatments(t.id, 20)]);
  const o = { volumeLitres: t.volumeLitres, sanitiser: t.sanitiser, products, temperatureC: t.temperatureC, units, guidance: tubGuidance(t) };
  let steps: RoutineStep[] = [];
  let stepsError: string | null = null;
  try {
    steps = firstFillRoutine({ ...o, fillReadings: fillReadings(latest, run) });
  } catch (e) {
    stepsError = (e as Error).message;
    try {
      steps = firstFillRoutine(o);
    } catch {
      steps = [];
    }
  }
  const state = (run?.state ?? {}) as RunState;
  // One lock for the plan, the log and this routine: the routine's own timer or a logged dose's wait, whichever ends later.
  const lock = activeTimer(t, rows, products, now, locale);
  const own = state.timerEndsAt && Date.parse(state.timerEndsAt) > now.getTime() ? state.timerEndsAt : null;
  const timerEndsAt = own && (!lock || Date.parse(own) >= Date.parse(lock.retestAt)) ? own : (lock?.retestAt ?? null);
  const drain = t.bathersPerDay > 0 ? drainIntervalDays(t.volumeLitres, t.bathersPerDay) : null;
  const dueOn = drain !== null && t.fillDate ? new Date(Date.parse(`${t.fillDate}T00:00:00Z`) + drain * 86400_000).toISOString().slice(0, 10) : null;
  return {
    tub: { id: t.id, name: t.name, volumeLitres: t.volumeLitres, sanitiser: t.sanitiser, timeZone: zone, bathersPerDay: t.bathersPerDay, fillDate: t.fillDate, firstFillCompletedAt: t.firstFillCompletedAt?.toISOString() ?? null },
    run: run ? { id: run.id, stepIndex: run.stepIndex, startedAt: run.startedAt.toISOString(), done: state.done ?? [] } : null,
    steps,
    stepsError,
    timer: timerEndsAt ? { endsAt: timerEndsAt, clock: clock(timerEndsAt, zone, locale), why: lock && timerEndsAt === lock.retestAt ? `${lock.productName} was added${lock.shock ? " as a shock" : ""}: nothing else goes in until then` : "Timer for the last step" } : null,
    ownTimerRunning: Boolean(own),
    doseLocked: Boolean(lock),
    readiness: readiness(t, latest, run, products),
    latest,
    units,
    topUp: routineTopUp({ ...o, bathersPerDay: t.bathersPerDay }),
    foam: foamTreatment(o),
    drain: { days: drain, dueOn, overdue: dueOn !== null && dueOn < now.toISOString().slice(0, 10) },
    now: now.toISOString(),
  };
}

export type SetupResult = { ok: true } | { ok: false; form: string };

export async function startRun(t: Tub): Promise<SetupResult> {
  const existing = await currentRun(t.id);
  if (existing) return { ok: true };
  await db.insert(routineRun).values({ tubId: t.id, kind: FIRST_FILL, stepIndex: 0, state: {} });
  return { ok: true };
}

/** Marks the current step done: logs a dose step as a treatment and starts its timer. */
export async function finishStep(t: Tub, userId: string, stepIndex: number, now = new Date()): Promise<SetupResult> {
  const run = await currentRun(t.id);
  if (!run) return { ok: false, form: "Start the first-fill setup first." };
  if (stepIndex !== run.stepIndex) return { ok: false, form: "That step is not the current one; the page was out of date, so it has been reloaded." };
  const state = (run.state ?? {}) as RunState;
  const view = await setupView(t, now);
  const wanted = view.steps[stepIndex];
  if (view.timer && (view.ownTimerRunning || (view.doseLocked && wanted?.productId)))
    return { ok: false, form: `The timer is still running: wait until ${view.timer.clock} before the next step. ${view.timer.why.startsWith("Timer") ? "" : view.timer.why + "."}`.trim() };
  const step = view.steps[stepIndex];
  if (!step) return { ok: false, form: "The setup has no more steps." };
  if (stepIndex === view.steps.length - 1) return { ok: false, form: "Use “The tub is ready” on the last step." };
  const products = await ownerProducts(t.ownerId);
  const product = step.productId ? products.find((p) => p.id === step.productId) : undefined;
  const amount = step.grams ?? step.millilitres;
  if (product && amount !== null && amount > 0) {
    await db.insert(treatment).values({
      tubId: t.id,
      productId: product.id,
      productName: product.name,
      chemical: product.chemical,
      amount,
      unit: step.millilitres !== null ? "mL" : "g",
      addedAt: now,
      retestAt: step.timerMinutes ? new Date(now.getTime() + step.timerMinutes * 60_000) : null,
      shock: step.shock ?? false,
      addedBy: userId,
      note: step.shock ? "First-fill setup (shock)" : "First-fill setup",
    });
  }
  const next: RunState = {
    done: [...(state.done ?? []), { step: stepIndex, at: now.toISOString() }],
    timerEndsAt: step.timerMinutes ? new Date(now.getTime() + step.timerMinutes * 60_000).toISOString() : undefined,
  };
  await db.update(routineRun).set({ stepIndex: stepIndex + 1, state: next }).where(eq(routineRun.id, run.id));
  return { ok: true };
}

export async function completeSetup(t: Tub, now = new Date()): Promise<SetupResult> {
  const run = await currentRun(t.id);
  const [products, latest] = await Promise.all([ownerProducts(t.ownerId), latestReading(t.id)]);
  const r = readiness(t, latest, run, products);
  if (!r.ready) return { ok: false, form: `Not ready yet: ${r.reasons.join(" ")}` };
  if (run) await db.update(routineRun).set({ completedAt: now }).where(eq(routineRun.id, run.id));
  await db.update(tubTable).set({ firstFillCompletedAt: now }).where(eq(tubTable.id, t.id));
  return { ok: true };
}

/** Drained and refilled: a new fill date (in the tub's time zone) and a fresh first-fill setup. */
export async function refilled(t: Tub, now = new Date()): Promise<SetupResult> {
  const today = new Intl.DateTimeFormat("en-CA", { timeZone: safeZone(t.timeZone), year: "numeric", month: "2-digit", day: "2-digit" }).format(now);
  await db.update(routineRun).set({ completedAt: now }).where(and(eq(routineRun.tubId, t.id), eq(routineRun.kind, FIRST_FILL), isNull(routineRun.completedAt)));
  await db.update(tubTable).set({ fillDate: today, firstFillCompletedAt: null }).where(eq(tubTable.id, t.id));
  return { ok: true };
}
