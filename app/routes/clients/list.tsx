import { Pager, withParams } from "~/components/Pager";
import { StatusBadge, UnconfirmedMark } from "~/components/status";
import { Card, EmptyState, PageTitle } from "~/components/ui";
import { DASHBOARD_VIEWS, dashboardCards, type DashboardCard, type DashboardView } from "~/features/clients/clients.server";
import { askedPage, searchText } from "~/lib/paging";
import { requirePermission } from "~/lib/session.server";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/list";

export const meta: Route.MetaFunction = () => [{ title: "Clients · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requirePermission(context, request, { client: ["look-after"] });
  const url = new URL(request.url);
  const q = searchText(url);
  const asked = url.searchParams.get("show");
  const view: DashboardView = (DASHBOARD_VIEWS as readonly string[]).includes(asked ?? "") ? (asked as DashboardView) : "all";
  const board = await dashboardCards(user, { page: askedPage(url), q, view, signal: request.signal }, timeWords(request));
  return { ...board, q, view };
}

export default function Clients({ loaderData }: Route.ComponentProps) {
  const { rows: tubs, page, totals, q, view } = loaderData;
  const params = { q, show: view === "all" ? null : view };
  return (
    <div className="space-y-5">
      <PageTitle sub={`${totals.tubs} client tub${totals.tubs === 1 ? "" : "s"}: ${totals.attention} need${totals.attention === 1 ? "s" : ""} attention, ${totals.outOfRange} out of range, ${totals.overdue} due for a test.`}>Clients</PageTitle>
      {totals.waiting > 0 && (
        <a href="/clients/review" className="block rounded-xl border border-caution/30 bg-caution-soft px-4 py-3 font-bold text-caution no-underline">
          {totals.waiting} reading{totals.waiting === 1 ? "" : "s"} waiting for your review →
        </a>
      )}
      <form method="get" className="flex flex-wrap items-end gap-2" role="search">
        <label className="flex min-w-56 flex-1 flex-col text-sm font-bold">
          Find a tub or owner
          <input name="q" defaultValue={q} type="search" className="mt-1 rounded-lg border border-line px-3 py-2 font-normal" />
        </label>
        <label className="flex flex-col text-sm font-bold">
          Show
          <select name="show" defaultValue={view} className="mt-1 rounded-lg border border-line px-3 py-2 font-normal">
            <option value="all">All tubs</option>
            <option value="attention">Only those needing attention</option>
          </select>
        </label>
        <button type="submit" className="rounded-lg bg-well-700 px-4 py-2 font-bold text-white">Show</button>
      </form>
      {tubs.length === 0 ? (
        <EmptyState title={q || view !== "all" ? "No tub matches" : "No client tubs yet"}>
          {q || view !== "all" ? "Try another name, or show all tubs." : "When an owner invites you to look after a tub, it appears here."}
        </EmptyState>
      ) : (
        <ul className="grid gap-3 sm:grid-cols-2" data-testid="client-tubs">
          {tubs.map((t) => (
            <li key={t.id}>
              <ClientCard t={t} />
            </li>
          ))}
        </ul>
      )}
      <Pager page={page.page} pages={page.pages} href={(p) => withParams(params, { page: p })} label="Pages of client tubs" />
    </div>
  );
}

const SUFFIX = { low: " · low", high: " · high", in: "", unknown: "" } as const;

/** One client tub: its water, a newer unsure reading, tests, readings to review, the last treatment. */
function ClientCard({ t }: { t: DashboardCard }) {
  const caution = t.overdue || (t.water?.outOfRange.length ?? 0) > 0;
  return (
    <Card className={caution ? "border-caution/50" : ""}>
      <a href={`/tubs/${t.id}`} className="text-lg font-bold text-well-900">{t.name}</a>
      <p className="text-sm text-ink-soft">{t.ownerName}</p>
      <ul className="mt-2 space-y-1 text-sm">
        <li data-testid="client-water" className="space-y-1">
          {!t.water ? (
            <span className="text-ink-soft">No sure reading yet</span>
          ) : (
            <>
              {t.water.outOfRange.length ? (
                <StatusBadge status={t.water.worst}>{`Out of range: ${t.water.outOfRange.join("; ")}`}</StatusBadge>
              ) : (
                <StatusBadge status="in">Water in range at the last sure reading</StatusBadge>
              )}
              <span className="flex flex-wrap gap-1">
                {t.water.values.map((v) => (
                  <StatusBadge key={v.label} status={v.status} className="font-normal">{`${v.label} ${v.value}${SUFFIX[v.status]}`}</StatusBadge>
                ))}
              </span>
            </>
          )}
        </li>
        {t.unsureNewer && (
          <li className="font-bold text-caution" data-testid="unsure-newer">
            <UnconfirmedMark className="rounded-xl">{`Unconfirmed: a newer reading (${t.unsureNewer}) is unsure and waits for review; it is not counted as the water yet.`}</UnconfirmedMark>
          </li>
        )}
        <li className={t.overdue ? "font-bold text-caution" : undefined}>
          {(t.water ? `Last test ${t.water.at}` : t.unsureNewer ? "No sure test yet" : "Never tested") + (t.overdue ? " · test overdue" : t.due ? ` · next due ${t.due}` : "")}
        </li>
        <li className={t.waiting ? "font-bold text-caution" : undefined}>
          {t.waiting ? <a href="/clients/review">{`${t.waiting} reading${t.waiting === 1 ? "" : "s"} to review`}</a> : "Nothing to review"}
        </li>
        <li>{t.lastTreatment ? `Last treatment: ${t.lastTreatment}` : "No treatments logged"}</li>
      </ul>
      <a href={`/tubs/${t.id}/notes`} className="mt-2 inline-block text-sm font-bold">Visit notes</a>
    </Card>
  );
}
