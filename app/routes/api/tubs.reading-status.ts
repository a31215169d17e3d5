// GET /api/tubs/:tubId/readings/:readingId → { status, stage, ahead }: where a photo's reading
// stands while the worker reads it (the review screen polls it, then shows the reading).
import { apiTub } from "~/lib/api.server";
import { readingStatus } from "~/features/readings/readings.server";
import type { Route } from "./+types/tubs.reading-status";

export async function loader({ context, params }: Route.LoaderArgs) {
  const { tub } = await apiTub(context, params.tubId, "view");
  const s = await readingStatus(tub, params.readingId);
  if (!s) return Response.json({ message: "We could not find that reading." }, { status: 404 });
  return Response.json(s, { headers: { "cache-control": "private, no-store" } });
}
