// GET /api/tubs/:tubId/trends?days=90 → every parameter over the chosen period, target bands, treatments.
import { apiTub } from "~/lib/api.server";
import { MAX_TREND_DAYS, trends } from "~/features/readings/readings.server";
import type { Route } from "./+types/tubs.trends";

export async function loader({ context, params, request }: Route.LoaderArgs) {
  const { tub } = await apiTub(context, params.tubId, "view");
  const raw = new URL(request.url).searchParams.get("days");
  let days: number | undefined;
  if (raw !== null) {
    days = /^\d{1,5}$/.test(raw.trim()) ? Number(raw.trim()) : Number.NaN;
    if (!(days >= 1 && days <= MAX_TREND_DAYS)) {
      return Response.json({ message: `The period must be a whole number of days from 1 to ${MAX_TREND_DAYS}, for example ?days=90.` }, { status: 400 });
    }
  }
  return Response.json(await trends(tub, { days }), { headers: { "cache-control": "private, no-store" } });
}
