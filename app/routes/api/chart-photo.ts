// GET /api/chart-photos/:photoId → the chart photo from storage (for the calibration grid).
import { apiChartUser } from "~/features/charts/api.server";
import { chartPhoto } from "~/features/charts/charts.server";
import { streamObject } from "~/lib/storage.server";
import type { Route } from "./+types/chart-photo";

export async function loader({ context, params }: Route.LoaderArgs) {
  apiChartUser(context);
  const p = await chartPhoto(params.photoId);
  if (!p) return Response.json({ message: "We could not find that chart photo." }, { status: 404 });
  return streamObject(p.s3Key, p.contentType);
}
