import { ButtonLink, Card, EmptyState, Notice, PageTitle } from "~/components/ui";
import { hasRole } from "~/lib/permissions";
import { requireUser } from "~/lib/session.server";
import { listTubs, ownerNames } from "~/lib/tubs.server";
import type { Route } from "./+types/list";

export const meta: Route.MetaFunction = () => [{ title: "Tubs · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  const all = await listTubs(user, { includeArchived: true });
  const tubs = all.filter((t) => !t.archivedAt);
  const archived = all.filter((t) => t.archivedAt && t.ownerId === user.id).map((t) => ({ id: t.id, name: t.name }));
  const names = await ownerNames([...new Set(tubs.map((t) => t.ownerId))]);
  return {
    verified: new URL(request.url).searchParams.has("verified"),
    justArchived: new URL(request.url).searchParams.has("archived"),
    archived,
    isTechnician: hasRole(user, "technician", "admin"),
    tubs: tubs.map((t) => ({
      id: t.id, name: t.name, volumeLitres: t.volumeLitres, sanitiser: t.sanitiser,
      mine: t.ownerId === user.id, ownerName: names.get(t.ownerId) ?? "",
    })),
  };
}

export default function TubList({ loaderData }: Route.ComponentProps) {
  const { tubs, isTechnician, verified, archived, justArchived } = loaderData;
  const mine = tubs.filter((t) => t.mine);
  const clients = tubs.filter((t) => !t.mine);
  return (
    <div className="space-y-6">
      {verified && <Notice tone="ok">Your e-mail address is confirmed. Welcome to Dipwell.</Notice>}
      {justArchived && <Notice>The tub is archived. Its readings are kept; you can restore it below.</Notice>}
      <PageTitle sub="Every tub you look after, with its water at a glance.">Tubs</PageTitle>
      <ButtonLink href="/tubs/new" className="w-full sm:w-auto">Add a tub</ButtonLink>
      {(!isTechnician || mine.length > 0) && (
        <section aria-labelledby="own-tubs" className="space-y-3">
          <h2 id="own-tubs" className="text-lg font-bold">Your tubs</h2>
          {mine.length === 0 ? (
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
      {isTechnician && (
        <section aria-labelledby="client-tubs" className="space-y-3">
          <h2 id="client-tubs" className="text-lg font-bold">Client tubs</h2>
          {clients.length === 0 ? (
            <EmptyState title="No client tubs yet">When an owner invites you to look after a tub, it appears here.</EmptyState>
          ) : (
            <TubCards tubs={clients} showOwner />
          )}
        </section>
      )}
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
