// The first middleware of every request: while PostgreSQL is unreachable (a
// restart, a failover), requests get a plain "try again in a moment" with
// status 503 — a page for the browser, JSON for API routes — instead of a 500
// or a dead server. Nothing to reset afterwards: the next request that reaches
// the database is served as usual.
import { data, type MiddlewareFunction } from "react-router";
import { databaseReachable } from "./db.server";
import { databaseUnavailable, noteDatabaseBack, noteDatabaseError } from "./db-health";

export const UNAVAILABLE_MESSAGE = "Dipwell cannot reach its database just now. Nothing you saved is lost. Please try again in a moment.";
const RETRY_AFTER_SECONDS = "5";

function unavailable(request: Request): never {
  const headers = { "Retry-After": RETRY_AFTER_SECONDS, "Cache-Control": "no-store" };
  if (new URL(request.url).pathname.startsWith("/api/")) {
    throw Response.json({ message: UNAVAILABLE_MESSAGE, error: UNAVAILABLE_MESSAGE, retryAfterSeconds: Number(RETRY_AFTER_SECONDS) }, { status: 503, headers });
  }
  throw data({ message: UNAVAILABLE_MESSAGE }, { status: 503 });
}

export const availabilityMiddleware: MiddlewareFunction<Response> = async ({ request }, next) => {
  let response: Response;
  try {
    response = await next();
  } catch (error) {
    // Thrown by a later middleware (the session lookup reads the database).
    if (!databaseUnavailable(error)) throw error;
    noteDatabaseError(error);
    return unavailable(request);
  }
  // A loader or action that failed because the database went away is a 500 by now;
  // ask the database directly whether that was the cause.
  if (response.status >= 500 && response.status !== 503) {
    if (!(await databaseReachable())) {
      noteDatabaseError(new Error(`${request.method} ${new URL(request.url).pathname} failed while the database was unreachable`));
      return unavailable(request);
    }
  } else {
    noteDatabaseBack();
  }
  return response;
};
