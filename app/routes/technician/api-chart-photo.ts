// GET /api/chart-photos/:photoId → the chart photo from storage (for the calibration grid).
import { apiChartUser } from "~/features/charts/api.server";
import { chartPhoto } from "~/features/charts/charts.server";
import { getObjectBytes } from "~/lib/storage.server";
import type { Route } from "./+types/api-chart-photo";

export async function loader({ context, params }: Route.LoaderArgs) {
  apiChartUser(context);
  const p = await chartPhoto(params.photoId);
  if (!p) return Response.json({ message: "We could not find that chart photo." }, { status: 404 });
  const bytes = await getObjectBytes(p.s3Key);
  return new Response(new Uint8Array(bytes), { headers: { "content-type": p.contentType, "cache-control": "private, max-age=3600" } });
}
