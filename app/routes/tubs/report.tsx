// A printable visit report for one tub: readings of a bounded period, treatments, the current plan
// with its cautions, and the visit notes; a print stylesheet (app.css) keeps it to the content.
import { StatusBadge, UnconfirmedMark } from "~/components/status";
import { amountText } from "~/components/plan/plan-ui";
import { AUTHORITY_NOTE } from "~/chemistry";
import { BackLink, Card, Notice, PageTitle } from "~/components/ui";
import { userUnits } from "~/features/plan/units.server";
import { REPORT_LIMITS, REPORT_PERIODS, reportDays } from "~/features/tubs/report-periods";
import { visitReport } from "~/features/tubs/report.server";
import { timeWords } from "~/lib/dates";
import { tubGuard } from "~/lib/tub-access.server";
import type { Route } from "./+types/report";

export const meta: Route.MetaFunction = ({ loaderData }) => [{ title: `Visit report · ${loaderData?.tub.name ?? "Tub"} · Dipwell` }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  // Those who may care for the tub (its owner, a technician it is shared with, an admin); anyone else: 404.
  const { user, tub } = await tubGuard({ context, request, params }, "care");
  const days = reportDays(new URL(request.url).searchParams.get("days"));
  return visitReport(tub, { days, locale: timeWords(request).locale, units: await userUnits(user.id) });
}

const fmt = (analyte: string, v: number | null) => (v === null ? "–" : analyte === "ph" ? v.toFixed(1) : String(Math.round(v * 10) / 10));
const more = (shown: number, total: number, what: string) => (total > shown ? <p className="mt-2 text-sm text-ink-soft">The {shown} most recent of {total} {what} in this period.</p> : null);

export default function VisitReport({ loaderData }: Route.ComponentProps) {
  const { tub, period, columns, readings, treatments, notes, plan } = loaderData;
  const base = `/tubs/${tub.id}`;
  return (
    <article className="dw-report space-y-5" data-testid="visit-report">
      <div className="dw-no-print space-y-3">
        <BackLink href={base}>{tub.name}</BackLink>
        <div className="flex flex-wrap items-center gap-3">
          <nav aria-label="Period" className="flex flex-wrap gap-2">
            {REPORT_PERIODS.map((d) => (
              <a key={d} href={`?days=${d}`} aria-current={d === period.days ? "page" : undefined} className={d === period.days ? "rounded-lg bg-well-50 px-3 py-2 font-bold text-well-900 no-underline" : "rounded-lg px-3 py-2 font-bold text-ink-soft no-underline"}>
                Last {d} days
              </a>
            ))}
          </nav>
          <button type="button" onClick={() => window.print()} className="ml-auto inline-flex min-h-11 items-center rounded-full bg-well-700 px-5 font-bold text-white hover:bg-well-900">
            Print this report
          </button>
        </div>
      </div>

      <PageTitle sub={`${period.from} – ${period.to} · times in ${tub.timeZone}`}>Visit report · {tub.name}</PageTitle>
      <dl className="grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
        <div><dt className="text-ink-soft">Owner</dt><dd className="font-bold">{tub.owner}</dd></div>
        <div><dt className="text-ink-soft">Water</dt><dd className="font-bold">{tub.volume}</dd></div>
        <div><dt className="text-ink-soft">Sanitiser</dt><dd className="font-bold">{tub.sanitiser === "chlorine" ? "Chlorine" : "Bromine"}</dd></div>
        <div><dt className="text-ink-soft">Filled</dt><dd className="font-bold">{tub.fillDate ?? "not recorded"}</dd></div>
      </dl>

      <Card className="dw-print-card" aria-labelledby="r-plan">
        <h2 id="r-plan" className="mb-2 text-lg font-bold">Current plan</h2>
        {plan.error && <Notice tone="alert">{plan.error}</Notice>}
        {plan.headline ? (
          <div className="space-y-3" data-testid="report-plan">
            <p className="font-bold">{plan.headline.title}</p>
            <p>
              {plan.headline.detail}{" "}
              <strong>{plan.headline.usableNow === true ? "The tub may be used." : plan.headline.usableNow === false ? "Do not use the tub now." : "Test before anyone uses the tub."}</strong>
            </p>
            {plan.readingWhen && <p className="text-sm text-ink-soft">From the reading of {plan.readingWhen}{plan.readingConfirmed ? ", confirmed" : ", not confirmed yet"}.</p>}
            {plan.timer && <p className="font-bold">Nothing else goes in until {plan.timer.until} ({plan.timer.product} was added).</p>}
            {plan.steps.length > 0 ? (
              <ol className="space-y-3">
                {plan.steps.map((s) => (
                  <li key={s.order} className="rounded-lg border border-line p-3">
                    <p className="font-bold">
                      {s.order}. {s.productName ?? (s.kind === "wait" ? "Wait" : s.kind === "aerate" ? "Aerate" : s.kind === "replace_water" ? "Replace water" : "Step")}
                      {amountText(s) && <> · {amountText(s)}</>}
                    </p>
                    <p>{s.words}</p>
                    {s.cautions.length > 0 && (
                      <ul className="mt-1 list-disc pl-5 text-sm">
                        {s.cautions.map((c) => (
                          <li key={c}>{c}</li>
                        ))}
                      </ul>
                    )}
                  </li>
                ))}
              </ol>
            ) : (
              <p>Nothing to add now.</p>
            )}
            {plan.usable && <p className="text-sm">May be used: {plan.usable}</p>}
          </div>
        ) : (
          !plan.error && <p>No reading yet, so no plan.</p>
        )}
        <p className="mt-3 text-xs text-ink-soft">{AUTHORITY_NOTE}</p>
      </Card>

      <Card className="dw-print-card" aria-labelledby="r-readings">
        <h2 id="r-readings" className="mb-2 text-lg font-bold">Readings ({readings.total})</h2>
        {readings.rows.length === 0 ? (
          <p>No readings in this period.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm" data-testid="report-readings">
              <thead className="text-ink-soft">
                <tr>
                  <th scope="col" className="py-1 pr-3">When</th>
                  {columns.map((c) => (
                    <th key={c.analyte} scope="col" className="pr-3">
                      {c.label}
                      {c.unit && c.unit !== "pH" ? <span className="font-normal"> ({c.unit})</span> : null}
                      {c.target && <span className="block font-normal">{c.target.min}–{c.target.max}</span>}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody className="divide-y divide-line">
                {readings.rows.map((r) => (
                  <tr key={r.id}>
                    <th scope="row" className="py-1.5 pr-3 font-normal">
                      {r.when}
                      {r.unsure ? (
                        <UnconfirmedMark className="ml-1">Unsure, not reviewed</UnconfirmedMark>
                      ) : (
                        !r.confirmed && <span className="ml-1 text-xs text-ink-soft">(not confirmed)</span>
                      )}
                    </th>
                    {r.values.map((v) => (
                      <td key={v.analyte} className="pr-3 align-top">
                        <span className="font-bold tabular-nums">{fmt(v.analyte, v.value)}</span>
                        {v.value !== null && v.status !== "in" && v.status !== "unknown" && <span className="ml-1"><StatusBadge status={v.status} /></span>}
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
        {more(readings.rows.length, readings.total, "readings")}
        {readings.rows.length >= REPORT_LIMITS.readings && <p className="text-sm text-ink-soft">Choose a shorter period for fewer readings.</p>}
      </Card>

      <Card className="dw-print-card" aria-labelledby="r-treatments">
        <h2 id="r-treatments" className="mb-2 text-lg font-bold">Treatments ({treatments.total})</h2>
        {treatments.rows.length === 0 ? (
          <p>No treatments in this period.</p>
        ) : (
          <table className="w-full text-left text-sm" data-testid="report-treatments">
            <thead className="text-ink-soft">
              <tr><th scope="col" className="py-1 pr-3">When</th><th scope="col" className="pr-3">Product</th><th scope="col" className="pr-3">Amount</th><th scope="col">By</th></tr>
            </thead>
            <tbody className="divide-y divide-line">
              {treatments.rows.map((x) => (
                <tr key={x.id}>
                  <td className="py-1.5 pr-3">{x.when}</td>
                  <td className="pr-3">
                    {x.product}
                    {x.for && <span className="text-ink-soft"> · for {x.for}</span>}
                    {x.shock && <strong> · shock</strong>}
                    {x.note && <span className="block text-ink-soft">{x.note}</span>}
                  </td>
                  <td className="pr-3 tabular-nums">{x.amount}</td>
                  <td>{x.by ?? ""}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        {more(treatments.rows.length, treatments.total, "treatments")}
      </Card>

      <Card className="dw-print-card" aria-labelledby="r-notes">
        <h2 id="r-notes" className="mb-2 text-lg font-bold">Visit notes ({notes.total})</h2>
        {notes.rows.length === 0 ? (
          <p>No visit notes in this period.</p>
        ) : (
          <ul className="space-y-2" data-testid="report-notes">
            {notes.rows.map((n) => (
              <li key={n.id}>
                <p className="text-sm text-ink-soft">{n.day} · {n.author}</p>
                <p className="whitespace-pre-wrap">{n.body}</p>
              </li>
            ))}
          </ul>
        )}
        {more(notes.rows.length, notes.total, "notes")}
      </Card>
      <p className="text-xs text-ink-soft">Printed from Dipwell {period.printed} ({tub.timeZone}).</p>
    </article>
  );
}
