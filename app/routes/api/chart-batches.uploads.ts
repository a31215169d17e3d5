// POST /api/chart-batches/:batchId/uploads  { contentType, size } → { key, url } for a presigned PUT
// of a chart-card photo or a reference-solution strip photo of this batch.
import { z } from "zod";
import { apiChartBatch } from "~/features/charts/api.server";
import { presignBatchPhoto } from "~/features/charts/charts.server";
import { PhotoError } from "~/features/photos/intake.server";
import type { Route } from "./+types/chart-batches.uploads";

const body = z.object({ contentType: z.string(), size: z.number() });

export async function action({ context, params, request }: Route.ActionArgs) {
  const { batch } = await apiChartBatch(context, params.batchId);
  const parsed = body.safeParse(await request.json().catch(() => null));
  if (!parsed.success) return Response.json({ code: "bad_request", message: "The upload request was incomplete. Reload the page and try again." }, { status: 400 });
  try {
    return Response.json(await presignBatchPhoto(batch.id, parsed.data.contentType, parsed.data.size));
  } catch (error) {
    if (error instanceof PhotoError) return Response.json({ code: error.code, message: error.message }, { status: error.status });
    throw error;
  }
}
