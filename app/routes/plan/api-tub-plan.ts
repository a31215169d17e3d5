// GET /api/tubs/:tubId/plan: the tub's plan as JSON, for anyone who may see the tub.
import { apiUser, asJsonError, json } from "~/features/plan/api.server";
import { tubPlan } from "~/features/plan/plan.server";
import { requireTub } from "~/lib/tubs.server";
import type { Route } from "./+types/api-tub-plan";

export async function loader({ context, params }: Route.LoaderArgs) {
  const user = apiUser(context);
  let found;
  try {
    found = await requireTub(user, params.tubId, "view");
  } catch (thrown) {
    return asJsonError(thrown);
  }
  const view = await tubPlan(found.tub);
  return json({ ...view, relation: found.relation });
}
