// GET /api/tubs/:tubId/readings/:readingId → { status, stage, ahead }: where a photo's reading
// stands while the worker reads it (the review screen polls it, then shows the reading).
// The screen asks often, so the tub guard's check (may this user view the tub?) is made in the
// same statement as the status (readingStatusFor), by the guard's own rule (relationOf).
import { apiUser } from "~/lib/api.server";
import { readingStatusFor } from "~/features/readings/readings.server";
import type { Route } from "./+types/tubs.reading-status";

export async function loader({ context, params }: Route.LoaderArgs) {
  const user = apiUser(context);
  const s = await readingStatusFor(user, params.tubId, params.readingId);
  if (s === "no tub") return Response.json({ message: "We could not find that tub." }, { status: 404 });
  if (!s) return Response.json({ message: "We could not find that reading." }, { status: 404 });
  return Response.json(s, { headers: { "cache-control": "private, no-store" } });
}
