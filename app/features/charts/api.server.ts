// The chart JSON routes: anonymous → 401, owners → 403, an unknown batch → 404, as JSON.
import type { RouterContextProvider } from "react-router";
import { apiUser } from "~/lib/api.server";
import { can } from "~/lib/permissions";
import { batchById } from "./charts.server";

export function apiChartUser(context: Readonly<RouterContextProvider>) {
  const user = apiUser(context);
  if (!can(user, { chart: ["edit"] })) throw Response.json({ message: "Charts are for technician and admin accounts." }, { status: 403 });
  return user;
}

/** A technician or admin, and the strip batch the URL names. */
export async function apiChartBatch(context: Readonly<RouterContextProvider>, batchId: string | undefined) {
  const user = apiChartUser(context);
  const batch = await batchById(batchId);
  if (!batch) throw Response.json({ message: "We could not find that strip batch." }, { status: 404 });
  return { user, batch };
}
