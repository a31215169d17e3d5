// The chart JSON routes: anonymous → 401, owners → 403, as JSON.
import type { RouterContextProvider } from "react-router";
import { apiUser } from "~/lib/api.server";
import { can } from "~/lib/permissions";

export function apiChartUser(context: Readonly<RouterContextProvider>) {
  const user = apiUser(context);
  if (!can(user, { chart: ["edit"] })) throw Response.json({ message: "Charts are for technician and admin accounts." }, { status: 403 });
  return user;
}
