// better-auth's own endpoints (sign-in API, e-mail verification links, ...). The
// client's address goes along for the password limiter (app/lib/sign-in-limit.server.ts).
import { auth } from "~/lib/auth.server";
import { headersWithClientAddress } from "~/lib/sign-in-limit.server";
import type { Route } from "./+types/auth";

function forward(request: Request, context: Route.LoaderArgs["context"]) {
  const init: RequestInit & { duplex?: "half" } = { headers: headersWithClientAddress(request, context) };
  if (request.body) init.duplex = "half";
  return auth.handler(new Request(request, init));
}

export const loader = ({ request, context }: Route.LoaderArgs) => forward(request, context);
export const action = ({ request, context }: Route.ActionArgs) => forward(request, context);
