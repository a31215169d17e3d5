// GET /tubs/:tubId/history.csv: every reading and treatment of the tub as a spreadsheet, streamed.
import { historyCsvStream } from "~/features/readings/readings.server";
import { tubGuard } from "~/lib/tub-access.server";
import type { Route } from "./+types/history-csv";

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub } = await tubGuard({ context, request, params }, "view");
  const name = tub.name.replace(/[^\w-]+/g, "-").replace(/^-|-$/g, "").toLowerCase() || "tub";
  return new Response(historyCsvStream(tub, request.signal), {
    headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="dipwell-${name}-history.csv"` },
  });
}
