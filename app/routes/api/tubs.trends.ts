// GET /api/tubs/:tubId/trends → every parameter over time, target bands, treatments.
import { apiTub } from "~/lib/api.server";
import { trends } from "~/features/readings/readings.server";
import type { Route } from "./+types/tubs.trends";

export async function loader({ context, params }: Route.LoaderArgs) {
  const { tub } = await apiTub(context, params.tubId, "view");
  return Response.json(await trends(tub), { headers: { "cache-control": "private, no-store" } });
}
