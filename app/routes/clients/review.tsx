import { data, redirect } from "react-router";
import { Pager } from "~/components/Pager";
import { Button, Card, EmptyState, Notice, PageTitle } from "~/components/ui";
import { ClientInputError, markReviewed, reviewQueue } from "~/features/clients/clients.server";
import { askedPage } from "~/lib/paging";
import { requirePermission } from "~/lib/session.server";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/review";

export const meta: Route.MetaFunction = () => [{ title: "Review readings · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requirePermission(context, request, { review: ["read"] });
  const url = new URL(request.url);
  const queue = await reviewQueue(user, { page: askedPage(url), signal: request.signal });
  const words = timeWords(request);
  // What the page shows: the time in words in the tub's zone (the zone and the status stay here).
  const items = queue.items.map(({ timeZone, status: _status, ...r }) => ({ ...r, when: words.tub(r.takenAt, timeZone) }));
  return { ...queue, items, done: url.searchParams.has("done") };
}

/** Corrections from the form: a typed value wins over a tapped swatch; blank means "as read". */
function corrections(fd: FormData): Record<string, number> | string {
  const out: Record<string, number> = {};
  for (const [k, v] of fd.entries()) {
    const m = /^(pad|swatch)_(.+)$/.exec(k);
    if (!m || typeof v !== "string" || v.trim() === "") continue;
    if (m[1] === "swatch" && String(fd.get(`pad_${m[2]}`) ?? "").trim() !== "") continue;
    const n = Number(v.trim().replace(",", "."));
    if (!Number.isFinite(n) || n < 0 || n > 5000) return "Corrected values must be numbers from 0 to 5000 (pH from 0 to 14).";
    out[m[2]] = n;
  }
  return out;
}

export async function action({ context, request }: Route.ActionArgs) {
  const user = requirePermission(context, request, { review: ["update"] });
  const fd = await request.formData();
  const readingId = String(fd.get("readingId") ?? "");
  const page = Math.max(1, Number.parseInt(String(fd.get("page") ?? "1"), 10) || 1);
  const fixed = fd.get("intent") === "confirm" ? {} : corrections(fd);
  if (typeof fixed === "string") return data({ readingId, form: fixed }, { status: 400 });
  try {
    await markReviewed(user, readingId, fixed);
  } catch (e) {
    if (e instanceof ClientInputError) return data({ readingId, form: e.message }, { status: e.status });
    throw e;
  }
  return redirect(`/clients/review?page=${page}&done=1`);
}

const fmt = (n: number | null | undefined) => (n === null || n === undefined ? "–" : String(n));

export default function Review({ loaderData, actionData }: Route.ComponentProps) {
  const { items, page, done } = loaderData;
  const a = actionData as { readingId?: string; form?: string } | undefined;
  return (
    <div className="space-y-5">
      <PageTitle sub="Readings the reader was unsure about, oldest first. Compare each unsure pad with the chart's colours, confirm the reading as read in one tap, or correct a value.">
        Readings to review
      </PageTitle>
      {done && <Notice tone="ok">Reviewed. The owner has been told.</Notice>}
      {page.total > 0 && (
        <p className="text-ink-soft" data-testid="review-total">
          {page.total} reading{page.total === 1 ? "" : "s"} waiting
        </p>
      )}
      {items.length === 0 ? (
        <EmptyState title="Nothing to review">Every unsure reading has been reviewed.</EmptyState>
      ) : (
        items.map((r) => {
          const base = `/tubs/${r.tubId}`;
          const formId = `review-${r.id}`;
          return (
            <Card key={r.id} data-testid="review-item" className="space-y-3">
              <div className="flex flex-wrap items-start gap-4">
                {r.photoId ? (
                  <a href={`${base}/photos/${r.photoId}`} target="_blank" rel="noreferrer" className="shrink-0">
                    <img src={`${base}/photos/${r.photoId}?size=thumb`} alt={`Strip photo of ${r.tubName}`} width={112} height={112} loading="lazy" className="h-28 w-28 rounded-md border border-line object-cover" />
                  </a>
                ) : (
                  <span className="text-ink-soft">No photo</span>
                )}
                <div>
                  <p className="font-bold">
                    <a href={`${base}/readings/${r.id}`}>{r.tubName}</a>
                  </p>
                  <p className="text-sm text-ink-soft">
                    {r.ownerName} · taken <time dateTime={r.takenAt}>{r.when}</time> · <strong className="text-caution">unconfirmed</strong>
                  </p>
                </div>
              </div>
              {a?.readingId === r.id && a.form && <Notice tone="alert">{a.form}</Notice>}
              <form method="post" id={formId}>
                <input type="hidden" name="readingId" value={r.id} />
                <input type="hidden" name="page" value={page.page} />
              </form>
              <ul className="divide-y divide-line">
                {r.pads.map((p) => (
                  <li key={p.id} className="flex flex-wrap items-center gap-3 py-2">
                    {p.hasCrop ? (
                      p.padCount > 1 ? (
                        <img src={`${base}/readings/${r.id}/crops/${p.analyte}`} alt={`${p.label} pads as photographed, side by side`} width={48 * p.padCount} height={48} loading="lazy" className="h-12 w-auto max-w-full rounded border border-line" />
                      ) : (
                        <img src={`${base}/readings/${r.id}/crops/${p.analyte}`} alt={`${p.label} pad as photographed`} width={48} height={48} loading="lazy" className="h-12 w-12 rounded border border-line object-cover" />
                      )
                    ) : (
                      <span className="h-12 w-12 rounded border border-dashed border-line" aria-hidden="true" />
                    )}
                    <div className="w-44">
                      <p className="font-bold">{p.label}</p>
                      <p className="text-sm">
                        read <strong>{fmt(p.readValue)}</strong> {p.unit}
                        {p.confirmedValue !== null ? ` · owner: ${p.confirmedValue}` : ""}
                      </p>
                      {p.needsReview && <p className="text-sm text-caution">{p.reason ?? "unsure"}</p>}
                    </div>
                    {p.needsReview && p.swatches.length > 0 && (
                      <fieldset className="flex flex-wrap gap-1">
                        <legend className="sr-only">Chart colours for {p.label}: tap the one the pad matches</legend>
                        {p.swatches.map((s) => (
                          <label key={s.value} className="dw-swatch">
                            <input type="radio" form={formId} name={`swatch_${p.id}`} value={s.value} />
                            <span data-pads={p.padCount > 1 ? "" : undefined}>
                              {s.colors.map((c, k) => (
                                <span key={k} style={{ background: c }} />
                              ))}
                            </span>
                            <span className={s.value === p.readValue ? "font-bold" : undefined}>{s.value}</span>
                          </label>
                        ))}
                      </fieldset>
                    )}
                    <input form={formId} name={`pad_${p.id}`} inputMode="decimal" aria-label={`Correct ${p.label}`} placeholder="or type" className="w-24 rounded border border-line px-2 py-1" />
                  </li>
                ))}
              </ul>
              <div className="flex flex-wrap gap-2">
                <Button type="submit" form={formId} name="intent" value="confirm">Confirm as read</Button>
                <Button type="submit" form={formId} name="intent" value="correct" variant="secondary">Save corrections</Button>
              </div>
            </Card>
          );
        })
      )}
      <Pager page={page.page} pages={page.pages} href={(p) => `?page=${p}`} label="Pages of readings to review" />
    </div>
  );
}
