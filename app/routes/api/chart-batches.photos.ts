// POST /api/chart-batches/:batchId/photos  { key } → registers an uploaded photo of the batch's
// printed chart card: { photoId, width, height }.
import { z } from "zod";
import { apiChartBatch } from "~/features/charts/api.server";
import { registerChartPhoto } from "~/features/charts/charts.server";
import { PhotoError } from "~/features/photos/intake.server";
import type { Route } from "./+types/chart-batches.photos";

const body = z.object({ key: z.string() });

export async function action({ context, params, request }: Route.ActionArgs) {
  const { user, batch } = await apiChartBatch(context, params.batchId);
  const parsed = body.safeParse(await request.json().catch(() => null));
  if (!parsed.success) return Response.json({ code: "bad_request", message: "The photo could not be registered. Reload the page and try again." }, { status: 400 });
  try {
    const p = await registerChartPhoto(user, batch.id, parsed.data.key);
    return Response.json({ photoId: p.id, width: p.width, height: p.height }, { status: 201 });
  } catch (error) {
    if (error instanceof PhotoError) return Response.json({ code: error.code, message: error.message }, { status: error.status });
    throw error;
  }
}
