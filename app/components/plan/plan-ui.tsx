// Pieces of the plan, treatment and setup pages.
import { useEffect, useState } from "react";
import { Form } from "react-router";
import { analyteWord, type Headline, type PlanStep, type WaterBalance } from "~/chemistry";
import { Button, ButtonLink, Card, Notice, cx } from "~/components/ui";
import { remainingWords } from "~/lib/tub-time";


export const CHEMICAL_NAMES: Record<string, string> = {
  sodium_dichloroisocyanurate_dihydrate: "sodium dichloroisocyanurate dihydrate",
  sodium_dichloroisocyanurate_anhydrous: "sodium dichloroisocyanurate (anhydrous)",
  calcium_hypochlorite: "calcium hypochlorite",
  sodium_hypochlorite: "sodium hypochlorite",
  bromochlorodimethylhydantoin: "bromochlorodimethylhydantoin (BCDMH)",
  sodium_bicarbonate: "sodium bicarbonate",
  sodium_carbonate: "sodium carbonate",
  sodium_bisulfate: "sodium bisulfate",
  hydrochloric_acid: "hydrochloric acid",
  calcium_chloride: "calcium chloride",
  silicone_antifoam: "silicone antifoam",
  fresh_water: "fresh water",
};

export const chemicalName = (c: string | null) => (c ? (CHEMICAL_NAMES[c] ?? c.replace(/_/g, " ")) : "");

/** A retest countdown: "Retest after 14:35" and the time left, ticking in the browser. */
export function RetestTimer({ retestAt, clock, day, now, label }: { retestAt: string; clock: string; day?: string; now: string; label?: string }) {
  const [t, setT] = useState(() => Date.parse(now));
  useEffect(() => {
    setT(Date.now());
    const id = setInterval(() => setT(Date.now()), 1000);
    return () => clearInterval(id);
  }, []);
  const left = Date.parse(retestAt) - t;
  const done = left <= 0;
  return (
    <div role="timer" aria-live="off" data-testid="retest-timer" className={cx("rounded-xl border-2 px-4 py-3", done ? "border-ok bg-ok-soft" : "border-caution bg-caution-soft")}>
      {label && <p className="text-sm text-ink-soft">{label}</p>}
      <p className="text-xl font-bold text-ink">{done ? `Time to retest (since ${clock})` : `Retest after ${clock}`}
        {!done && day && <span className="ml-2 text-base font-normal text-ink-soft">{day}</span>}
      </p>
      {!done && <p className="text-ink-soft" data-testid="time-left">{remainingWords(left)} to go · nothing else goes in until then</p>}
    </div>
  );
}

/** The cautions of a dose: collapsible, open by default, shown before the amount. */
export function Cautions({ items, title = "Safety", open = true }: { items: string[]; title?: string; open?: boolean }) {
  if (items.length === 0) return null;
  return (
    <details open={open} className="rounded-xl border border-alert/30 bg-alert-soft px-4 py-3 text-sm text-ink" data-testid="cautions">
      <summary className="cursor-pointer font-bold text-alert">⚠ {title} ({items.length})</summary>
      <ul className="mt-1 list-disc space-y-1 pl-5">
        {items.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
    </details>
  );
}

export function amountText(s: { grams: number | null; millilitres: number | null; tablets?: number | null; litres?: number | null; amountText?: string }) {
  if (s.amountText) return s.amountText;
  if (s.millilitres !== null) return `${s.millilitres} mL`;
  if (s.grams !== null) return `${s.grams} g${s.tablets ? ` (about ${s.tablets} tablets)` : ""}`;
  if (s.litres) return `${s.litres} L of water`;
  return "";
}

/** The plan's headline: the worst finding first, and whether the tub may be used. */
export function PlanHeadline({ headline }: { headline: Headline }) {
  const usable = headline.usableNow === true ? "The tub may be used." : headline.usableNow === false ? "Do not use the tub now." : "Test before anyone uses the tub.";
  return (
    <div data-testid="plan-headline">
      <Notice tone={headline.tone === "ok" ? "ok" : headline.tone === "alert" ? "alert" : "caution"} className="text-base">
        <p className="text-lg font-bold">{headline.title}</p>
        <p>{headline.detail}</p>
        <p className="mt-1 font-bold">{usable}</p>
      </Notice>
    </div>
  );
}

const fmt = (parameter: string | null, x: number | null) => (x === null ? "–" : parameter === "ph" ? x.toFixed(1) : String(x));
const unitOf = (parameter: string | null) => (parameter === "ph" ? "" : " mg/L");

/** One step of the plan, with its amount, aim, side effects, retest and cautions, and "I added this". */
export function StepCard({ step, tubId, readingId, canLog, current, redirectTo, cautionsAt }: { step: PlanStep; tubId: string; readingId?: string | null; canLog: boolean; current: boolean; redirectTo: string; cautionsAt?: number }) {
  const amount = amountText(step);
  return (
    <li className={cx("rounded-card border bg-shell p-4 shadow-sm", current ? "border-well-500 ring-2 ring-well-100" : "border-line")} data-testid="plan-step">
      <div className="flex items-start gap-3">
        <span className="flex h-9 w-9 shrink-0 items-center justify-center rounded-full bg-well-700 text-lg font-bold text-white">{step.order}</span>
        <div className="min-w-0 flex-1 space-y-2">
          <p className="text-lg font-bold text-well-900">
            {step.kind === "wait"
              ? "Wait, then retest"
              : step.kind === "replace_water"
                ? "Replace water"
                : `${step.direction === "raise" ? "Raise" : "Lower"} ${step.parameter ? analyteWord(step.parameter) : ""}`}
            {step.shock && <span className="ml-2 rounded bg-alert-soft px-2 py-0.5 text-xs font-bold text-alert">shock</span>}
            {step.provisional && <span className="ml-2 rounded bg-sand px-2 py-0.5 text-xs font-bold text-ink-soft">estimate: retest first</span>}
          </p>
          {cautionsAt !== undefined ? (
            <p className="text-sm font-bold text-alert" data-testid="cautions-ref">⚠ Same safety as step {cautionsAt}: read it before you add this.</p>
          ) : (
            <Cautions items={step.cautions} title={step.productName ? `Safety: ${step.productName}` : "Safety"} />
          )}
          {step.kind === "dose" && (
            <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
              <dt className="text-ink-soft">Product</dt>
              <dd className="font-bold">{step.productName}</dd>
              <dt className="text-ink-soft">Active ingredient</dt>
              <dd>{chemicalName(step.chemical)}</dd>
              <dt className="text-ink-soft">Amount</dt>
              <dd className="text-lg font-bold text-well-900" data-testid="step-amount">{amount}</dd>
              <dt className="text-ink-soft">Brings it to</dt>
              <dd>
                {fmt(step.parameter, step.from)} → about {fmt(step.parameter, step.to)}
                {unitOf(step.parameter)}
              </dd>
              <dt className="text-ink-soft">Retest</dt>
              <dd>after {step.retestAfterHours} h, jets running</dd>
            </dl>
          )}
          <p>{step.words}</p>
          {step.sideEffects.length > 0 && (
            <div className="text-sm">
              <p className="font-bold">Side effects</p>
              <ul className="list-disc pl-5">
                {step.sideEffects.map((e) => (
                  <li key={e.parameter + e.words}>{e.words}</li>
                ))}
              </ul>
            </div>
          )}
          {canLog && step.kind === "dose" && step.productId && (step.grams !== null || step.millilitres !== null) && (
            <Form method="post" action={`/tubs/${tubId}/treatments`} className="flex flex-wrap items-end gap-2 pt-1">
              <input type="hidden" name="intent" value="log" />
              <input type="hidden" name="productId" value={step.productId} />
              <input type="hidden" name="parameter" value={step.parameter ?? ""} />
              <input type="hidden" name="unit" value={step.millilitres !== null ? "mL" : "g"} />
              {step.shock && <input type="hidden" name="shock" value="1" />}
              {readingId && <input type="hidden" name="readingId" value={readingId} />}
              <input type="hidden" name="redirectTo" value={redirectTo} />
              <label className="text-sm">
                <span className="block font-bold">Amount added ({step.millilitres !== null ? "mL" : "g"})</span>
                <input
                  name="amount"
                  inputMode="decimal"
                  defaultValue={String(step.millilitres ?? step.grams)}
                  className="min-h-12 w-28 rounded-xl border border-line bg-white px-3"
                  aria-label={`Amount added for step ${step.order}`}
                />
              </label>
              <Button type="submit" disabled={!current} title={current ? undefined : "Do the steps in order: retest first"}>
                I added this
              </Button>
            </Form>
          )}
        </div>
      </div>
    </li>
  );
}

export function BalanceCard({ balance }: { balance: WaterBalance }) {
  const tone = balance.verdict === "balanced" ? "ok" : balance.verdict === null ? "info" : "caution";
  return (
    <Card>
      <h2 className="mb-2 text-lg font-bold">Water balance</h2>
      <Notice tone={tone}>
        <p className="font-bold">
          {balance.lsi === null ? "Not enough readings for the balance" : `Langelier index ${balance.lsi > 0 ? "+" : ""}${balance.lsi.toFixed(2)}: ${balance.verdict === "corrosive" ? "tends to corrode" : balance.verdict === "scaling" ? "tends to scale" : "balanced"}`}
        </p>
        <p>{balance.words}</p>
      </Notice>
      {balance.advice.length > 0 && (
        <ul className="mt-2 list-disc pl-5">
          {balance.advice.map((a) => (
            <li key={a}>{a}</li>
          ))}
        </ul>
      )}
      <p className="mt-2 text-xs text-ink-soft">{balance.method}</p>
    </Card>
  );
}

export function FirstFillPrompt({ tubId }: { tubId: string }) {
  return (
    <Notice tone="caution" className="mb-4">
      <p className="font-bold">New water? Start with the first-fill setup.</p>
      <p>This tub has no finished first-fill setup yet. The guided setup walks you through sanitiser, alkalinity and pH with timers.</p>
      <ButtonLink href={`/tubs/${tubId}/setup`} variant="secondary" className="mt-2">
        Open the first-fill setup
      </ButtonLink>
    </Notice>
  );
}

export function TubTabs({ tubId, active }: { tubId: string; active: "plan" | "treatments" | "setup" }) {
  const items = [
    { key: "plan", to: `/tubs/${tubId}/plan`, label: "Plan" },
    { key: "treatments", to: `/tubs/${tubId}/treatments`, label: "Treatments" },
    { key: "setup", to: `/tubs/${tubId}/setup`, label: "Routines" },
  ] as const;
  return (
    <nav aria-label="Tub care" className="mb-4 flex gap-1 overflow-x-auto">
      <a href={`/tubs/${tubId}`} className="whitespace-nowrap rounded-lg px-3 py-2 font-bold text-ink-soft no-underline hover:text-well-700">
        ← Tub
      </a>
      {items.map((i) => (
        <a
          key={i.key}
          href={i.to}
          aria-current={active === i.key ? "page" : undefined}
          className={cx("whitespace-nowrap rounded-lg px-3 py-2 font-bold no-underline", active === i.key ? "bg-well-50 text-well-900" : "text-ink-soft hover:text-well-700")}
        >
          {i.label}
        </a>
      ))}
    </nav>
  );
}
