// GET /tubs/:tubId/readings/:readingId/crops/:analyte: one pad's crop as the reader saw it.
import { streamObject } from "~/lib/storage.server";
import { cropKeyFor } from "~/features/readings/readings.server";
import { tubGuard } from "~/lib/tub-access.server";
import type { Route } from "./+types/reading-crop";

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub } = await tubGuard({ context, request, params }, "view");
  const key = await cropKeyFor(tub, params.readingId, params.analyte);
  if (!key) return new Response("We could not find that pad.", { status: 404 });
  return streamObject(key, "image/webp");
}
