// Who may work on charts: whoever may edit them (technicians and admins). Owners only read charts through their tubs.
import type { RouterContextProvider } from "react-router";
import { requirePermission } from "~/lib/session.server";

export const requireChartRole = (context: Readonly<RouterContextProvider>, request: Request) => requirePermission(context, request, { chart: ["edit"] });
