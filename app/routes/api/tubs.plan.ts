// GET /api/tubs/:tubId/plan: the tub's plan as JSON, for anyone who may see the tub.
import { apiTub, json } from "~/features/plan/api.server";
import { tubPlan } from "~/features/plan/plan.server";
import type { Route } from "./+types/tubs.plan";

export async function loader({ context, params }: Route.LoaderArgs) {
  const found = await apiTub(context, params.tubId, "view");
  const view = await tubPlan(found.tub);
  return json({ ...view, relation: found.relation });
}
