// GET /api/chart-versions/:versionId → the version as a strip-chart/1 file (download).
import { apiChartUser } from "~/features/charts/api.server";
import { versionDocument } from "~/features/charts/charts.server";
import type { Route } from "./+types/chart-version";

export async function loader({ context, params }: Route.LoaderArgs) {
  apiChartUser(context);
  const { version, document } = await versionDocument(params.versionId);
  const name = `${String((document as { name?: string }).name || "chart").replace(/[^a-z0-9]+/gi, "-").slice(0, 60)}-v${version.version}.json`;
  return new Response(JSON.stringify(document, null, 2) + "\n", {
    headers: { "content-type": "application/json; charset=utf-8", "content-disposition": `attachment; filename="${name}"` },
  });
}
