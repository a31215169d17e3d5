// JSON answers for the plan API: errors as { error } with no caching.
import type { RouterContextProvider } from "react-router";
import { apiTub as tubFor, apiUser as userFor } from "~/lib/api.server";
import type { TubNeed } from "~/lib/tub-access.server";

const NO_STORE = { "cache-control": "no-store" };
const asError = (error: string) => ({ error });

export function json(body: unknown, status = 200) {
  return Response.json(body, { status, headers: NO_STORE });
}

export function apiUser(context: Readonly<RouterContextProvider>) {
  return userFor(context, { message: "Sign in to use the water-plan API.", body: asError, headers: NO_STORE });
}

export function apiTub(context: Readonly<RouterContextProvider>, tubId: string | undefined, need: TubNeed) {
  return tubFor(context, tubId, need, { body: asError, headers: NO_STORE });
}
