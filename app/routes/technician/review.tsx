import { data, redirect } from "react-router";
import { Button, Card, EmptyState, Notice, PageTitle } from "~/components/ui";
import { ClientInputError, markReviewed, reviewQueue } from "~/features/clients/clients.server";
import { analyteLabel } from "~/features/clients/labels";
import { requireRole } from "~/lib/session.server";
import type { Route } from "./+types/review";

export const meta: Route.MetaFunction = () => [{ title: "Review readings · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireRole(context, request, "technician", "admin");
  return { readings: await reviewQueue(user) };
}

export async function action({ context, request }: Route.ActionArgs) {
  const user = requireRole(context, request, "technician", "admin");
  const fd = await request.formData();
  const readingId = String(fd.get("readingId") ?? "");
  const corrections: Record<string, number> = {};
  for (const [k, v] of fd.entries()) {
    if (!k.startsWith("pad_") || typeof v !== "string" || v.trim() === "") continue;
    const n = Number(v.replace(",", "."));
    if (!Number.isFinite(n) || n < 0) return data({ readingId, form: "Corrected values must be numbers of zero or more." }, { status: 400 });
    corrections[k.slice(4)] = n;
  }
  try {
    await markReviewed(user, readingId, corrections);
  } catch (e) {
    if (e instanceof ClientInputError) return data({ readingId, form: e.message }, { status: e.status });
    throw e;
  }
  return redirect("/clients/review?done=1");
}

export default function Review({ loaderData, actionData }: Route.ComponentProps) {
  const { readings } = loaderData;
  const a = actionData as { readingId?: string; form?: string } | undefined;
  return (
    <div className="space-y-5">
      <PageTitle sub="Readings the reader was unsure about. Check them, correct a value if needed, and mark them reviewed.">Readings to review</PageTitle>
      {readings.length === 0 ? (
        <EmptyState title="Nothing to review">Every unsure reading has been reviewed.</EmptyState>
      ) : (
        readings.map((r) => (
          <Card key={r.id} data-testid="review-item">
            <p className="font-bold">
              <a href={`/tubs/${r.tubId}`}>{r.tubName}</a> · {new Date(r.takenAt).toLocaleString("en-GB")}
            </p>
            <form method="post" className="mt-2 space-y-2">
              <input type="hidden" name="readingId" value={r.id} />
              {a?.readingId === r.id && a.form && <Notice tone="alert">{a.form}</Notice>}
              <ul className="space-y-2">
                {r.pads.map((p) => (
                  <li key={p.id} className="flex flex-wrap items-center gap-3">
                    <span className="w-40 font-bold">{analyteLabel(p.analyte)}</span>
                    <span className="text-sm">read {p.readValue ?? "–"} {p.unit}{p.confirmedValue !== null ? ` · owner: ${p.confirmedValue}` : ""}</span>
                    {p.needsReview && <span className="text-sm text-caution">{p.reason ?? "unsure"}</span>}
                    <input name={`pad_${p.id}`} inputMode="decimal" aria-label={`Correct ${analyteLabel(p.analyte)}`} placeholder="correct to" className="w-28 rounded border border-line px-2 py-1" />
                  </li>
                ))}
              </ul>
              <Button type="submit">Mark reviewed</Button>
            </form>
          </Card>
        ))
      )}
    </div>
  );
}
