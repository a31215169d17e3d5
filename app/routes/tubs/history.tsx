// History: every reading of the tub, sortable and paginated, with the photo and who confirmed it.
import { ButtonLink, Card, EmptyState, PageTitle, cx, BackLink } from "~/components/ui";
import { historyPage, HISTORY_SORTS } from "~/features/readings/readings.server";
import { askedPage } from "~/lib/paging";
import { tubGuard } from "~/lib/tub-access.server";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/history";

export const meta: Route.MetaFunction = () => [{ title: "History · Dipwell" }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub } = await tubGuard({ context, request, params }, "view");
  const url = new URL(request.url);
  const sortParam = url.searchParams.get("sort");
  // Only the table's own columns (never an inherited key such as "__proto__").
  const sort = (sortParam && Object.hasOwn(HISTORY_SORTS, sortParam) ? sortParam : "taken") as keyof typeof HISTORY_SORTS;
  const dir = url.searchParams.get("dir") === "asc" ? "asc" : "desc";
  const page = askedPage(url);
  const found = await historyPage(tub, { sort, dir, page });
  const words = timeWords(request);
  const rows = found.rows.map((r) => ({ ...r, when: words.tub(r.takenAt, tub.timeZone) }));
  return { tub: { id: tub.id, name: tub.name, timeZone: tub.timeZone }, sort, dir: dir as "asc" | "desc", ...found, rows };
}

const STATUS_WORDS: Record<string, string> = { read: "to check", failed: "not read", confirmed: "confirmed", manual: "by hand" };

export default function History({ loaderData }: Route.ComponentProps) {
  const { tub, rows, page, pages, total, sort, dir } = loaderData;
  const base = `/tubs/${tub.id}`;
  const link = (o: { sort?: string; dir?: string; page?: number }) => {
    const q = new URLSearchParams({ sort: o.sort ?? sort, dir: o.dir ?? dir, page: String(o.page ?? page) });
    return `${base}/history?${q}`;
  };
  const sortLink = (key: string, label: string) => {
    const active = sort === key;
    const nextDir = active && dir === "desc" ? "asc" : "desc";
    return (
      <a href={link({ sort: key, dir: nextDir, page: 1 })} className="no-underline">
        {label} <span aria-hidden="true">{active ? (dir === "asc" ? "▲" : "▼") : "↕"}</span>
        <span className="sr-only">{active ? (dir === "asc" ? ", oldest first; sort newest first" : ", newest first; sort oldest first") : ", sort by this"}</span>
      </a>
    );
  };
  // The sort order belongs on the column header, not on the link inside it.
  const ariaSort = (key: string) => (sort === key ? (dir === "asc" ? "ascending" : "descending") : undefined);
  return (
    <div className="space-y-5">
      <BackLink href={base}>{tub.name}</BackLink>
      <PageTitle sub={`${total} reading${total === 1 ? "" : "s"}`}>History</PageTitle>
      <div className="flex flex-wrap gap-3">
        <ButtonLink href={`${base}/read`}>New reading</ButtonLink>
        <ButtonLink variant="secondary" href={`${base}/history.csv`} download>Download readings and treatments (CSV)</ButtonLink>
        <ButtonLink variant="secondary" href={`${base}/trends`}>Trends</ButtonLink>
      </div>
      {total === 0 ? (
        <EmptyState title="No readings yet" action={<ButtonLink href={`${base}/read`}>Take the first reading</ButtonLink>}>
          Every strip you photograph appears here, with its photo and values.
        </EmptyState>
      ) : (
        <Card className="overflow-x-auto p-0">
          <table className="w-full text-left text-sm" data-testid="history-table">
            <thead className="bg-sand text-ink-soft">
              <tr>
                <th className="p-3">Photo</th>
                <th className="p-3" aria-sort={ariaSort("taken")}>{sortLink("taken", "Taken")}</th>
                <th className="p-3">Values</th>
                <th className="hidden p-3 sm:table-cell" aria-sort={ariaSort("status")}>{sortLink("status", "Status")}</th>
                <th className="hidden p-3 sm:table-cell">Confirmed by</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-line">
              {rows.map((r) => (
                <tr key={r.id}>
                  <td className="p-3">
                    {r.photoId ? (
                      <img src={`${base}/photos/${r.photoId}?size=thumb`} alt="Strip photo" loading="lazy" className="h-12 w-12 rounded-md border border-line object-cover" />
                    ) : (
                      <span className="text-ink-soft">—</span>
                    )}
                  </td>
                  <td className="p-3">
                    <a href={`${base}/readings/${r.id}`} className="whitespace-nowrap">{r.when}</a>
                    <span className="block text-ink-soft sm:hidden">
                      {STATUS_WORDS[r.status] ?? r.status}
                      {r.confirmedBy ? ` · by ${r.confirmedBy}` : ""}
                    </span>
                  </td>
                  <td className="p-3">
                    {r.pads.length ? r.pads.map((p) => (
                      <span key={p.analyte} className="mr-2 inline-block whitespace-nowrap">
                        {p.label} <strong>{p.value ?? "–"}</strong>{p.source === "corrected" ? "*" : ""}
                      </span>
                    )) : <span className="text-ink-soft">no values</span>}
                  </td>
                  <td className={cx("hidden p-3 sm:table-cell", r.status === "failed" && "text-alert", r.status === "read" && "text-caution")}>
                    {STATUS_WORDS[r.status] ?? r.status}
                    {r.needsReview && <span className="block font-bold text-caution">unsure · waiting for review</span>}
                  </td>
                  <td className="hidden p-3 sm:table-cell">{r.confirmedBy ?? "—"}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="px-3 pb-2 text-xs text-ink-soft">* corrected by hand</p>
        </Card>
      )}
      {pages > 1 && (
        <nav aria-label="Pages" className="flex items-center justify-between">
          {page > 1 ? <a href={link({ page: page - 1 })}>← Newer page</a> : <span />}
          <span className="text-ink-soft">Page {page} of {pages}</span>
          {page < pages ? <a href={link({ page: page + 1 })}>Older page →</a> : <span />}
        </nav>
      )}
    </div>
  );
}
