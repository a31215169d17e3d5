import { desc, eq, inArray } from "drizzle-orm";
import { Card, EmptyState, PageTitle } from "~/components/ui";
import { reading, readingPad } from "~/db/schema";
import { db } from "~/lib/db.server";
import { requireUser } from "~/lib/session.server";
import { requireTub } from "~/lib/tubs.server";
import type { Route } from "./+types/detail";

export const meta: Route.MetaFunction = ({ loaderData }) => [{ title: `${loaderData?.tub.name ?? "Tub"} · Dipwell` }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  const { tub, relation } = await requireTub(user, params.tubId, "view");
  const recent = await db.select().from(reading).where(eq(reading.tubId, tub.id)).orderBy(desc(reading.takenAt)).limit(5);
  const pads = recent.length
    ? await db.select().from(readingPad).where(inArray(readingPad.readingId, recent.map((r) => r.id)))
    : [];
  return {
    relation,
    tub: { id: tub.id, name: tub.name, volumeLitres: tub.volumeLitres, sanitiser: tub.sanitiser, timeZone: tub.timeZone },
    readings: recent.map((r) => ({
      id: r.id, takenAt: r.takenAt.toISOString(), status: r.status,
      pads: pads.filter((p) => p.readingId === r.id).map((p) => ({ analyte: p.analyte, unit: p.unit, value: p.confirmedValue ?? p.readValue })),
    })),
  };
}

export default function TubDetail({ loaderData }: Route.ComponentProps) {
  const { tub, readings } = loaderData;
  return (
    <div className="space-y-5">
      <PageTitle sub={`${Math.round(tub.volumeLitres)} L · ${tub.sanitiser === "chlorine" ? "Chlorine" : "Bromine"}`}>{tub.name}</PageTitle>
      <Card>
        <h2 className="mb-2 text-lg font-bold">Recent readings</h2>
        {readings.length === 0 ? (
          <EmptyState title="No readings yet">Dip a test strip and photograph it to see your water here.</EmptyState>
        ) : (
          <ul className="divide-y divide-line">
            {readings.map((r) => (
              <li key={r.id} className="py-2">
                <p className="font-bold">{new Date(r.takenAt).toLocaleString("en-GB", { timeZone: tub.timeZone })}</p>
                <p className="text-sm text-ink-soft">
                  {r.pads.map((p) => `${p.analyte.replace(/_/g, " ")} ${p.value ?? "–"}`).join(" · ")}
                </p>
              </li>
            ))}
          </ul>
        )}
      </Card>
    </div>
  );
}
