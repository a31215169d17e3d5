import { UnconfirmedMark, ValueTile } from "~/components/status";
import { ButtonLink, Card, EmptyState, Notice, PageTitle, BackLink } from "~/components/ui";
import { latestReadingCard } from "~/features/readings/readings.server";
import { batchExpired, currentChartFor, displayVolume, tubTargets } from "~/features/tubs/tubs.server";
import { db } from "~/lib/db.server";
import { tubGuard } from "~/lib/tub-access.server";
import { stripChart } from "~/db/schema";
import { eq } from "drizzle-orm";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/detail";

export const meta: Route.MetaFunction = ({ loaderData }) => [{ title: `${loaderData?.tub.name ?? "Tub"} · Dipwell` }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub, relation } = await tubGuard({ context, request, params }, "view");
  const current = await currentChartFor(tub);
  const chart = current ? await db.query.stripChart.findFirst({ where: eq(stripChart.id, current.batch.chartId) }) : null;
  const url = new URL(request.url);
  const out = {
    relation,
    notice: url.searchParams.has("added") ? "Your tub is added. Take your first reading when you are ready." : url.searchParams.has("saved") ? "Changes saved." : null,
    tub: {
      id: tub.id, name: tub.name, volume: displayVolume(tub), sanitiser: tub.sanitiser, timeZone: tub.timeZone, archived: Boolean(tub.archivedAt),
      strips: current ? `${chart?.name ?? "Strip chart"} · lot ${current.batch.lot}` : null,
      stripsExpiredOn: current && batchExpired(current.batch.expiresOn) ? current.batch.expiresOn : null,
    },
    targets: tubTargets(tub),
    latest: await latestReadingCard(tub),
    latestWhen: null as string | null,
  };
  const latest = out.latest;
  if (latest) out.latestWhen = timeWords(request).tub(latest.takenAt, tub.timeZone);
  return out;
}

export default function TubDetail({ loaderData }: Route.ComponentProps) {
  const { tub, latest, latestWhen, targets, relation, notice } = loaderData;
  const base = `/tubs/${tub.id}`;
  return (
    <div className="space-y-5">
      <BackLink href="/tubs">All tubs</BackLink>
      {notice && <Notice tone="ok">{notice}</Notice>}
      {tub.archived && <Notice tone="caution">This tub is archived. Its history is kept; restore it from the settings to use it again.</Notice>}
      <PageTitle sub={`${tub.volume} · ${tub.sanitiser === "chlorine" ? "Chlorine" : "Bromine"}${tub.strips ? ` · ${tub.strips}` : ""}`}>{tub.name}</PageTitle>
      {tub.stripsExpiredOn && (
        <Notice tone="caution">
          <span data-testid="strips-expired">The test strips in use (lot {tub.strips?.split(" · lot ")[1]}) passed their use-by date on {tub.stripsExpiredOn}. Old strips can read wrong, so Dipwell no longer offers that batch.</span>{" "}
          {relation === "owner" || relation === "admin" ? <a href={`${base}/edit`}>Choose an in-date batch in the tub settings.</a> : "Ask the owner to choose an in-date batch."}
        </Notice>
      )}
      {!tub.strips && (
        <Notice tone="caution">
          Choose the test strips you use in the <a href={`${base}/edit`}>tub settings</a> so Dipwell can read your photos.
        </Notice>
      )}
      <div className="flex flex-wrap gap-3">
        {relation !== null && <ButtonLink href={`${base}/read`} className="w-full sm:w-auto">New reading</ButtonLink>}
        <ButtonLink href={`${base}/plan`} variant="secondary" className="flex-1 sm:flex-none">Next safe step</ButtonLink>
      </div>

      <Card>
        <h2 className="mb-2 text-lg font-bold">Latest reading</h2>
        {!latest ? (
          <EmptyState title="No readings yet">Dip a test strip and photograph it with “New reading” to see your water here.</EmptyState>
        ) : (
          <div>
            <p className="text-ink-soft">
              {latestWhen} · {latest.status === "confirmed" ? "confirmed" : latest.status === "failed" ? "could not be read" : "waiting for you to check it"}
            </p>
            {!latest.confirmed && latest.pads.length > 0 && (
              <p className="mt-2"><UnconfirmedMark>Not confirmed yet: these are the reader's values</UnconfirmedMark></p>
            )}
            {latest.pads.length > 0 ? (
              <dl className="mt-2 grid grid-cols-2 gap-2 sm:grid-cols-3" data-testid="latest-values">
                {latest.pads.map((p) => (
                  <ValueTile key={p.analyte} label={p.label} value={p.value} unit={p.unit} status={p.status} target={p.target} unconfirmed={!latest.confirmed} unsure={!latest.confirmed && p.needsReview} />
                ))}
              </dl>
            ) : (
              <p className="mt-2">{latest.error ?? "No values yet."}</p>
            )}
            {latest.status !== "confirmed" && (
              <a href={`${base}/readings/${latest.id}`} className="mt-3 inline-block font-bold">Check and confirm this reading →</a>
            )}
          </div>
        )}
      </Card>

      <nav aria-label="This tub" className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        {[
          ["History", `${base}/history`],
          ["Trends", `${base}/trends`],
          ["Treatments", `${base}/treatments`],
          ["First-fill setup", `${base}/setup`],
          ["Visit notes", `${base}/notes`],
          ["Visit report", `${base}/report`],
          ...(relation === "owner" || relation === "admin" ? [["Sharing", `${base}/sharing`], ["Settings", `${base}/edit`]] : []),
        ].map(([label, href]) => (
          <a key={href} href={href} className="rounded-xl border border-line bg-shell px-4 py-3 text-center font-bold no-underline hover:border-well-300">
            {label}
          </a>
        ))}
      </nav>

      <Card>
        <h2 className="mb-2 text-lg font-bold">Target ranges</h2>
        <table className="w-full text-left" data-testid="targets">
          <thead className="text-sm text-ink-soft">
            <tr><th className="py-1">Parameter</th><th>Keep between</th><th>Aim</th></tr>
          </thead>
          <tbody className="divide-y divide-line">
            {targets.map((t) => (
              <tr key={t.parameter} title={t.source}>
                <td className="py-2">{t.label}</td>
                <td>{t.min}–{t.max}{t.parameter === "ph" ? "" : " mg/L"}</td>
                <td>{t.aim}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-2 text-sm text-ink-soft">Ranges follow published public-health guidance; product labels and local codes come first.</p>
      </Card>
    </div>
  );
}
