// better-auth's own endpoints (sign-in API, e-mail verification links, ...).
import { auth } from "~/lib/auth.server";
import type { Route } from "./+types/auth";

export const loader = ({ request }: Route.LoaderArgs) => auth.handler(request);
export const action = ({ request }: Route.ActionArgs) => auth.handler(request);
