import { Card, EmptyState, PageTitle, cx } from "~/components/ui";
import { dashboard } from "~/features/clients/clients.server";
import { requireRole } from "~/lib/session.server";
import type { Route } from "./+types/clients";

export const meta: Route.MetaFunction = () => [{ title: "Clients · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireRole(context, request, "technician", "admin");
  return { tubs: await dashboard(user) };
}

const when = (iso: string) => new Date(iso).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short" });

export default function Clients({ loaderData }: Route.ComponentProps) {
  const { tubs } = loaderData;
  const waiting = tubs.reduce((s, t) => s + t.waiting, 0);
  return (
    <div className="space-y-5">
      <PageTitle sub="Every client tub at a glance.">Clients</PageTitle>
      {waiting > 0 && (
        <a href="/clients/review" className="block rounded-xl border border-caution/30 bg-caution-soft px-4 py-3 font-bold text-caution no-underline">
          {waiting} reading{waiting === 1 ? "" : "s"} waiting for your review →
        </a>
      )}
      {tubs.length === 0 ? (
        <EmptyState title="No client tubs yet">When an owner invites you to look after a tub, it appears here.</EmptyState>
      ) : (
        <ul className="grid gap-3 sm:grid-cols-2" data-testid="client-tubs">
          {tubs.map((t) => (
            <li key={t.id}>
              <Card className={cx(t.outOfRange.length || t.overdue ? "border-caution/50" : "")}>
                <a href={`/tubs/${t.id}`} className="text-lg font-bold text-well-900">{t.name}</a>
                <p className="text-sm text-ink-soft">{t.ownerName}</p>
                <ul className="mt-2 space-y-1 text-sm">
                  <li className={t.outOfRange.length ? "font-bold text-alert" : "text-ok"}>
                    {t.outOfRange.length ? `Out of range: ${t.outOfRange.join("; ")}` : t.latestAt ? "Water in range at the last reading" : "No readings yet"}
                  </li>
                  <li className={t.overdue ? "font-bold text-caution" : ""}>
                    {t.latestAt ? `Last test ${when(t.latestAt)}` : "Never tested"}
                    {t.overdue ? " · test overdue" : t.dueAt ? ` · next due ${when(t.dueAt)}` : ""}
                  </li>
                  <li className={t.waiting ? "font-bold text-caution" : ""}>
                    {t.waiting ? <a href="/clients/review">{t.waiting} reading{t.waiting === 1 ? "" : "s"} to review</a> : "Nothing to review"}
                  </li>
                  <li>{t.lastTreatment ? `Last treatment: ${t.lastTreatment.name}, ${t.lastTreatment.amount} ${t.lastTreatment.unit} on ${when(t.lastTreatment.at)}` : "No treatments logged"}</li>
                </ul>
                <a href={`/tubs/${t.id}/notes`} className="mt-2 inline-block text-sm font-bold">Visit notes</a>
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
