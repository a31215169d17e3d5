// Who is asking: the root middleware reads better-auth's session cookie once per
// request; loaders and actions then ask for the user they need.
import { createHmac, timingSafeEqual } from "node:crypto";
import { data, redirect, type MiddlewareFunction, type RouterContextProvider } from "react-router";
import { auth, type SessionUser } from "./auth.server";
import { userContext } from "./context";
import { db } from "./db.server";
import { env } from "./env.server";
import { can, rolesThatCan, type Permission } from "./permissions";
import { processGlobal } from "./process-global";

export const sessionMiddleware: MiddlewareFunction<Response> = async ({ request, context }, next) => {
  context.set(userContext, await sessionUser(request.headers));
  return next();
};

type CookieSettings = { token: string; others: string[]; key: Buffer; expiresIn: number; updateAge: number };

const cookieSettings = processGlobal<Promise<CookieSettings>>("sessionCookieSettings");

function settings() {
  return cookieSettings.once(async () => {
    const c = await auth.$context;
    return {
      token: c.authCookies.sessionToken.name,
      // "Don't remember me" and the session-data cookie: better-auth handles those requests itself.
      others: [c.authCookies.dontRememberToken.name, c.authCookies.sessionData.name],
      key: Buffer.from(c.secret, "utf8"),
      expiresIn: c.sessionConfig.expiresIn,
      updateAge: c.sessionConfig.updateAge,
    };
  });
}

/** The value of the first cookie with this name in a Cookie header (as better-auth reads it), or null. */
function cookieValue(header: string, name: string): string | null {
  for (const part of header.split(";")) {
    const eq = part.indexOf("=");
    if (eq < 0 || part.slice(0, eq).trim() !== name) continue;
    let value = part.slice(eq + 1).trim();
    if (value.charCodeAt(0) === 34) value = value.slice(1, -1);
    try {
      return value.includes("%") ? decodeURIComponent(value) : value;
    } catch {
      return value;
    }
  }
  return null;
}

/** The session token of a signed cookie value ("token.signature", HMAC-SHA256 in base64), or null when the signature is wrong. */
function verifiedToken(signed: string, key: Buffer): string | null {
  const dot = signed.lastIndexOf(".");
  if (dot < 1) return null;
  const token = signed.slice(0, dot);
  const signature = Buffer.from(signed.slice(dot + 1), "utf8");
  if (signature.length !== 44 || signature[43] !== 61 /* "=" */) return null;
  const expected = Buffer.from(createHmac("sha256", key).update(token).digest("base64"), "utf8");
  return timingSafeEqual(signature, expected) ? token : null;
}

type SessionRow = {
  expiresAt: Date; id: string; name: string; email: string; emailVerified: boolean; image: string | null; createdAt: Date; updatedAt: Date;
  role: string; banned: boolean | null; banReason: string | null; banExpires: Date | null;
};

/**
 * The signed-in user of a request, read from the database on every request (no copy of the
 * session in the cookie: a session ended or revoked is refused at once). The common case is one
 * indexed query joining the session and its user, with the cookie's signature checked in
 * process; a session that has expired or is due to be extended, and the rarer cookies, go
 * through better-auth's own getSession, which deletes or extends the session as it does.
 */
export async function sessionUser(headers: Headers): Promise<SessionUser | null> {
  const header = headers.get("cookie");
  if (!header) return null;
  const c = await settings();
  if (c.others.some((name) => header.includes(name))) return (await auth.api.getSession({ headers }))?.user ?? null;
  const signed = cookieValue(header, c.token);
  const token = signed ? verifiedToken(signed, c.key) : null;
  if (!token) return null;
  const {
    rows: [row],
  } = await db.$client.query<SessionRow>({
    name: "dipwell-session-user",
    text: `select s.expires_at as "expiresAt", u.id, u.name, u.email, u.email_verified as "emailVerified", u.image, u.created_at as "createdAt",
                  u.updated_at as "updatedAt", u.role, u.banned, u.ban_reason as "banReason", u.ban_expires as "banExpires"
             from "session" s join "user" u on u.id = s.user_id
            where s.token = $1`,
    values: [token],
  });
  if (!row) return null;
  const now = Date.now();
  const due = row.expiresAt.getTime() <= now || row.expiresAt.getTime() - c.expiresIn * 1000 + c.updateAge * 1000 <= now;
  if (due) return (await auth.api.getSession({ headers }))?.user ?? null;
  const { expiresAt: _expiresAt, ...user } = row;
  return user as SessionUser;
}

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
