// POST /api/water-plan: the water-chemistry engine for signed-in users, input as in water-plan.md.
import { ProductError, WaterInputError, hasNonFinite, planTreatment, validateWaterInput } from "~/chemistry";
import { apiUser, json } from "~/features/plan/api.server";
import type { Route } from "./+types/water-plan";


export function loader({ context }: Route.LoaderArgs) {
  apiUser(context);
  return json({ error: "Send the water readings with POST as JSON (see the water-plan input format)." }, 405);
}

export async function action({ context, request }: Route.ActionArgs) {
  apiUser(context);
  if (request.method !== "POST") return json({ error: "Use POST." }, 405);
  let body: unknown;
  try {
    body = JSON.parse(await request.text());
  } catch {
    return json({ error: "The input is not valid JSON." }, 400);
  }
  try {
    const input = validateWaterInput(body);
    const plan = planTreatment(input);
    if (hasNonFinite(plan)) return json({ error: "The plan could not be computed for these readings; please check them." }, 400);
    return json(plan);
  } catch (e) {
    if (e instanceof WaterInputError || e instanceof ProductError || e instanceof RangeError) return json({ error: e.message.split("\n")[0] }, 400);
    throw e;
  }
}
