import { Pager, withParams } from "~/components/Pager";
import { StatusBadge, UnconfirmedMark } from "~/components/status";
import { ButtonLink, Card, EmptyState, Notice, PageTitle } from "~/components/ui";
import { glanceByTub } from "~/features/readings/readings.server";
import { archivedTubs, tubListPage } from "~/features/tubs/tubs.server";
import { askedPage, searchText } from "~/lib/paging";
import { can } from "~/lib/permissions";
import { requireUser } from "~/lib/session.server";
import type { Route } from "./+types/list";

export const meta: Route.MetaFunction = () => [{ title: "Tubs · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  const url = new URL(request.url);
  const q = searchText(url);
  const { tubs, page, own } = await tubListPage(user, { page: askedPage(url), q });
  const glance = await glanceByTub(tubs.map((t) => t.id));
  return {
    verified: url.searchParams.has("verified"),
    justArchived: url.searchParams.has("archived"),
    archived: await archivedTubs(user),
    isTechnician: can(user, { client: ["look-after"] }),
    q, page, own,
    tubs: tubs.map((t) => ({ ...t, glance: glance.get(t.id) ?? null })),
  };
}

const TUBS_WITHOUT_SEARCH = 6;

export default function TubList({ loaderData }: Route.ComponentProps) {
  const { tubs, isTechnician, verified, archived, justArchived, q, page, own } = loaderData;
  const mine = tubs.filter((t) => t.mine);
  const clients = tubs.filter((t) => !t.mine);
  return (
    <div className="space-y-6">
      {verified && <Notice tone="ok">Your e-mail address is confirmed. Welcome to Dipwell.</Notice>}
      {justArchived && <Notice>The tub is archived. Its readings are kept; you can restore it below.</Notice>}
      <PageTitle sub="Every tub you look after, with its water at a glance.">Tubs</PageTitle>
      <ButtonLink href="/tubs/new" className="w-full sm:w-auto">Add a tub</ButtonLink>
      {(isTechnician || page.total > TUBS_WITHOUT_SEARCH) && (
        <form method="get" role="search" className="flex flex-wrap items-end gap-2">
          <label className="flex min-w-56 flex-1 flex-col text-sm font-bold">
            Find a tub or owner
            <input name="q" type="search" defaultValue={q} className="mt-1 rounded-lg border border-line px-3 py-2 font-normal" />
          </label>
          <button type="submit" className="rounded-lg bg-well-700 px-4 py-2 font-bold text-white">Search</button>
          {q && <a href="/tubs" className="px-2 py-2">Show all</a>}
        </form>
      )}
      {q && page.total === 0 && <EmptyState title="No tub matches">Try another name.</EmptyState>}
      {(mine.length > 0 || (own === 0 && !isTechnician && !q)) && (
        <section aria-labelledby="own-tubs" className="space-y-3">
          <h2 id="own-tubs" className="text-lg font-bold">Your tubs</h2>
          {mine.length === 0 && own === 0 ? (
            <EmptyState title="No tubs yet" action={<ButtonLink href="/tubs/new">Add your first tub</ButtonLink>}>Add your hot tub to start reading test strips and get treatment steps.</EmptyState>
          ) : (
            <TubCards tubs={mine} />
          )}
        </section>
      )}
      {archived.length > 0 && (
        <details className="text-ink-soft">
          <summary className="cursor-pointer font-bold">Archived tubs ({archived.length})</summary>
          <ul className="mt-2 space-y-1">
            {archived.map((t) => (
              <li key={t.id}><a href={`/tubs/${t.id}/edit`}>{t.name}</a></li>
            ))}
          </ul>
        </details>
      )}
      {isTechnician && (clients.length > 0 || (page.total === own && !q)) && (
        <section aria-labelledby="client-tubs" className="space-y-3">
          <h2 id="client-tubs" className="text-lg font-bold">Client tubs</h2>
          {clients.length === 0 && page.total === own ? (
            <EmptyState title="No client tubs yet">When an owner invites you to look after a tub, it appears here.</EmptyState>
          ) : (
            <TubCards tubs={clients} showOwner />
          )}
        </section>
      )}
      <Pager page={page.page} pages={page.pages} href={(p) => withParams({ q }, { page: p })} label="Pages of tubs" />
    </div>
  );
}

function TubCards({ tubs, showOwner }: { tubs: Route.ComponentProps["loaderData"]["tubs"]; showOwner?: boolean }) {
  return (
    <ul className="grid gap-3 sm:grid-cols-2" data-testid="tub-list">
      {tubs.map((t) => (
        <li key={t.id}>
          <a href={`/tubs/${t.id}`} className="block no-underline">
            <Card className="transition hover:border-well-300">
              <p className="text-lg font-bold text-well-900">{t.name}</p>
              <p className="text-ink-soft">
                {Math.round(t.volumeLitres)} L · {t.sanitiser === "chlorine" ? "Chlorine" : "Bromine"}
                {showOwner && t.ownerName ? ` · ${t.ownerName}` : ""}
              </p>
              <TubGlance glance={t.glance} />
            </Card>
          </a>
        </li>
      ))}
    </ul>
  );
}

/** The latest water on a card: the overall state first, then each value that is off. */
function TubGlance({ glance }: { glance: Route.ComponentProps["loaderData"]["tubs"][number]["glance"] }) {
  if (!glance) return <p className="mt-2 text-sm text-ink-soft" data-testid="tub-glance">No reading yet</p>;
  const { off } = glance;
  return (
    <div className="mt-2 space-y-1.5 text-sm" data-testid="tub-glance">
      <p className="flex flex-wrap items-center gap-1.5">
        {off.length === 0 ? <StatusBadge status="in">All in range</StatusBadge> : <StatusBadge status={off[0].status}>{off.length === 1 ? "1 value out of range" : `${off.length} values out of range`}</StatusBadge>}
        {!glance.confirmed && <UnconfirmedMark />}
        <span className="text-ink-soft">· tested {glance.ago}</span>
      </p>
      {off.length > 0 && (
        <ul className="flex flex-wrap gap-1.5">
          {off.map((v) => (
            <li key={v.analyte}>
              <StatusBadge status={v.status}>{v.label} {v.status === "low" ? "low" : "high"} · {v.value} {v.unit}</StatusBadge>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
