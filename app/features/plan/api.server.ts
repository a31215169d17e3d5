// JSON answers for the plan API: who is asking, and errors as JSON with the right status.
import type { RouterContextProvider } from "react-router";
import { optionalUser } from "~/lib/session.server";

export function json(body: unknown, status = 200) {
  return Response.json(body, { status, headers: { "cache-control": "no-store" } });
}

export function apiUser(context: Readonly<RouterContextProvider>) {
  const user = optionalUser(context);
  if (!user) throw json({ error: "Sign in to use the water-plan API." }, 401);
  return user;
}

/** A thrown data(…, { status }) from requireTub becomes a JSON response. */
export function asJsonError(thrown: unknown): Response {
  if (thrown instanceof Response) return thrown;
  const t = thrown as { type?: string; data?: { message?: string }; init?: ResponseInit | null };
  if (t && t.type === "DataWithResponseInit") return json({ error: t.data?.message ?? "Not allowed." }, t.init?.status ?? 500);
  throw thrown;
}
