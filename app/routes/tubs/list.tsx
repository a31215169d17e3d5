import { Pager, withParams } from "~/components/Pager";
import { ButtonLink, Card, EmptyState, Notice, PageTitle } from "~/components/ui";
import { archivedTubs, tubListPage } from "~/features/tubs/tubs.server";
import { askedPage, searchText } from "~/lib/paging";
import { hasRole } from "~/lib/permissions";
import { requireUser } from "~/lib/session.server";
import type { Route } from "./+types/list";

export const meta: Route.MetaFunction = () => [{ title: "Tubs · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  const url = new URL(request.url);
  const q = searchText(url);
  const { tubs, page, own } = await tubListPage(user, { page: askedPage(url), q });
  return {
    verified: url.searchParams.has("verified"),
    justArchived: url.searchParams.has("archived"),
    archived: await archivedTubs(user),
    isTechnician: hasRole(user, "technician", "admin"),
    q, page, own,
    tubs,
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
            </Card>
          </a>
        </li>
      ))}
    </ul>
  );
}
