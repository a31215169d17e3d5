// Who is asking: the root middleware reads better-auth's session cookie once per
// request; loaders and actions then ask for the user they need.
import { data, redirect, type MiddlewareFunction, type RouterContextProvider } from "react-router";
import { auth, type SessionUser } from "./auth.server";
import { userContext } from "./context";
import { env } from "./env.server";
import { can, rolesThatCan, type Permission } from "./permissions";

export const sessionMiddleware: MiddlewareFunction<Response> = async ({ request, context }, next) => {
  const found = await auth.api.getSession({ headers: request.headers });
  context.set(userContext, found?.user ?? null);
  return next();
};

type Ctx = Readonly<RouterContextProvider>;

export function optionalUser(context: Ctx): SessionUser | null {
  return context.get(userContext);
}

/** The signed-in user, or a redirect to the sign-in page that comes back here afterwards. */
export function requireUser(context: Ctx, request: Request): SessionUser {
  const user = context.get(userContext);
  if (!user) {
    const url = new URL(request.url);
    const back = url.pathname + url.search;
    throw redirect(`/sign-in?redirectTo=${encodeURIComponent(back)}`);
  }
  return user;
}

/** The signed-in user if their role grants `permission` (app/lib/permissions.ts); 403 otherwise. */
export function requirePermission(context: Ctx, request: Request, permission: Permission): SessionUser {
  const user = requireUser(context, request);
  if (!can(user, permission)) {
    throw data({ message: "This page is for " + rolesThatCan(permission).join(" or ") + " accounts." }, { status: 403 });
  }
  return user;
}

/**
 * Keeps a redirect target on this site: the target is resolved with the URL API
 * against the app's own origin (PUBLIC_URL), the way a browser would resolve it
 * (backslashes, encoded slashes, tabs and newlines included), and only a path on
 * that same origin comes back.
 */
export function safeRedirect(to: FormDataEntryValue | string | null | undefined, fallback = "/tubs") {
  if (typeof to !== "string" || !to.startsWith("/") || to.length > 2000) return fallback;
  // Browsers drop tabs and newlines from URLs and read "\" as "/": refuse rather than guess.
  if (/[\u0000-\u001f\u007f\\]/.test(to)) return fallback;
  let decoded = to;
  try {
    decoded = decodeURIComponent(to);
  } catch {
    return fallback;
  }
  if (/^\/[\/\\]/.test(decoded) || /[\u0000-\u001f\u007f]/.test(decoded)) return fallback;
  const home = new URL(env().PUBLIC_URL).origin;
  let url: URL;
  try {
    url = new URL(to, home);
  } catch {
    return fallback;
  }
  if (url.origin !== home) return fallback;
  const path = url.pathname + url.search + url.hash;
  return path.startsWith("/") && !path.startsWith("//") ? path : fallback;
}

/** Copies every Set-Cookie from a better-auth response onto a redirect. */
export function redirectWithCookies(to: string, from: Response | Headers) {
  const headers = new Headers();
  const source = from instanceof Response ? from.headers : from;
  for (const cookie of source.getSetCookie()) headers.append("Set-Cookie", cookie);
  return redirect(to, { headers });
}
