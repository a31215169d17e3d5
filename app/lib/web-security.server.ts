// Protections every response gets, in the root middleware (app/root.tsx):
// - security headers: a nonce-based Content-Security-Policy for pages, a locked-down
//   one for everything else, no framing, no type sniffing, no full referrer to other sites;
// - unsafe methods (POST, PUT, PATCH, DELETE) only from this site's own pages;
// - JSON endpoints take JSON only (a cross-site form or text/plain body is refused);
// - a small request-size limit before sign-in, checked before the body is read.
import { randomBytes } from "node:crypto";
import { createContext, type MiddlewareFunction } from "react-router";
import { userContext } from "./context";
import { env } from "./env.server";

/** The nonce of this response's inline scripts (read by app/entry.server.tsx). */
export const nonceContext = createContext<string | undefined>(undefined);

/** Largest request body accepted from someone not signed in (sign-in, sign-up and reset forms are tiny). */
export const ANONYMOUS_BODY_LIMIT = 64 * 1024;

const UNSAFE = new Set(["POST", "PUT", "PATCH", "DELETE"]);

/** The origins a browser may upload photos to: the S3 endpoint, and its bucket-named host when not path-style. */
export function storageOrigins(): string[] {
  const e = env();
  if (!e.S3_ENDPOINT) return [];
  const url = new URL(e.S3_ENDPOINT);
  const origins = [url.origin];
  if (!e.S3_FORCE_PATH_STYLE) origins.push(`${url.protocol}//${e.S3_BUCKET}.${url.host}`);
  return origins;
}

/** The Content-Security-Policy of an HTML page with this nonce. */
export function pagePolicy(nonce: string): string {
  const storage = storageOrigins().join(" ");
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'`,
    // React writes style attributes (charts, progress bars); no style can run script.
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    `connect-src 'self' ${storage}`.trim(),
    "media-src 'self' blob:",
    "worker-src 'self' blob:",
    "manifest-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}

/** For responses that are not pages (JSON, CSV, photos): nothing in them may run or be framed. */
export const RESOURCE_POLICY = "default-src 'none'; frame-ancestors 'none'; sandbox";

export function applySecurityHeaders(headers: Headers, nonce: string) {
  const type = headers.get("content-type") ?? "";
  if (!headers.has("content-security-policy")) {
    headers.set("Content-Security-Policy", type.startsWith("text/html") ? pagePolicy(nonce) : RESOURCE_POLICY);
  }
  headers.set("X-Frame-Options", "DENY");
  headers.set("X-Content-Type-Options", "nosniff");
  headers.set("Referrer-Policy", "strict-origin-when-cross-origin");
  headers.set("Cross-Origin-Opener-Policy", "same-origin");
  if (new URL(env().PUBLIC_URL).protocol === "https:") headers.set("Strict-Transport-Security", "max-age=31536000");
}

/** The origins this site's own pages have (the public address, plus its 127.0.0.1/localhost twin locally). */
export function ownOrigins(request: Request): Set<string> {
  const pub = new URL(env().PUBLIC_URL);
  const set = new Set([pub.origin, new URL(request.url).origin]);
  if (pub.hostname === "localhost") set.add(pub.origin.replace("localhost", "127.0.0.1"));
  if (pub.hostname === "127.0.0.1") set.add(pub.origin.replace("127.0.0.1", "localhost"));
  return set;
}

const plain = (status: number, message: string) =>
  new Response(message, { status, headers: { "content-type": "text/plain; charset=utf-8" } });

/** Why an unsafe request may not go on, or null: it must come from this site, and JSON endpoints take JSON. */
export function refuseCrossSite(request: Request): Response | null {
  if (!UNSAFE.has(request.method.toUpperCase())) return null;
  const origin = request.headers.get("origin");
  const site = request.headers.get("sec-fetch-site");
  const foreign = origin ? origin === "null" || !ownOrigins(request).has(origin) : site === "cross-site" || site === "same-site";
  if (foreign) return plain(403, "This request came from another site, so Dipwell did not act on it.");
  const path = new URL(request.url).pathname;
  if (path.startsWith("/api/") && !path.startsWith("/api/auth/")) {
    const type = (request.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
    if (type !== "application/json" && type !== "multipart/form-data") {
      return Response.json({ code: "unsupported_type", message: "Send the request as JSON (Content-Type: application/json)." }, { status: 415 });
    }
  }
  return null;
}

/** Refuses a body before sign-in that is larger than the limit, from its declared length, before reading it. */
export function refuseLargeAnonymousBody(request: Request, signedIn: boolean): Response | null {
  if (signedIn || !UNSAFE.has(request.method.toUpperCase())) return null;
  const declared = request.headers.get("content-length");
  if (declared === null) {
    if (request.body === null) return null;
    return plain(411, "Send the form again from the page: requests before sign-in must say how long they are.");
  }
  const length = Number(declared);
  if (!Number.isFinite(length) || length < 0) return plain(400, "The request's length is not a number.");
  if (length > ANONYMOUS_BODY_LIMIT) return plain(413, "That request is too large. Sign-in and account forms are small; reload the page and try again.");
  return null;
}

function withHeaders(res: Response, nonce: string): Response {
  try {
    applySecurityHeaders(res.headers, nonce);
    return res;
  } catch {
    // Immutable headers (a fetched or static Response): copy it.
    const copy = new Response(res.body, res);
    applySecurityHeaders(copy.headers, nonce);
    return copy;
  }
}

/** Outermost root middleware: the nonce, the headers on whatever comes back, and the cross-site check. */
export const securityMiddleware: MiddlewareFunction<Response> = async ({ request, context }, next) => {
  const nonce = randomBytes(16).toString("base64");
  context.set(nonceContext, nonce);
  const refused = refuseCrossSite(request);
  if (refused) return withHeaders(refused, nonce);
  try {
    return withHeaders(await next(), nonce);
  } catch (thrown) {
    if (thrown instanceof Response) return withHeaders(thrown, nonce);
    throw thrown;
  }
};

/** After the session is read: the anonymous body limit. */
export const bodyLimitMiddleware: MiddlewareFunction<Response> = async ({ request, context }, next) => {
  const refused = refuseLargeAnonymousBody(request, context.get(userContext) !== null);
  if (refused) return refused;
  return next();
};
