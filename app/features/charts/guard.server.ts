// Who may work on charts: technicians and admins. Owners only read charts through their tubs.
import type { RouterContextProvider } from "react-router";
import { requireRole } from "~/lib/session.server";

export const requireChartRole = (context: Readonly<RouterContextProvider>, request: Request) => requireRole(context, request, "technician", "admin");
