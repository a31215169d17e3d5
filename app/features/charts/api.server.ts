// The chart JSON routes: anonymous → 401, owners → 403, as JSON.
import type { RouterContextProvider } from "react-router";
import { hasRole } from "~/lib/permissions";
import { optionalUser } from "~/lib/session.server";

export function apiChartUser(context: Readonly<RouterContextProvider>) {
  const user = optionalUser(context);
  if (!user) throw Response.json({ message: "Please sign in first." }, { status: 401 });
  if (!hasRole(user, "technician", "admin")) throw Response.json({ message: "Charts are for technician and admin accounts." }, { status: 403 });
  return user;
}
