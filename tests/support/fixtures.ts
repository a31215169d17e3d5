// Test fixtures on the real database and the real sign-in machinery: users with
// roles, their session cookies, tubs, and a way to call a route's loader or
// action exactly as React Router does (root middleware first).
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { hashPassword } from "better-auth/crypto";
import { RouterContextProvider } from "react-router";
import * as s from "~/db/schema";
import { auth } from "~/lib/auth.server";
import { userContext } from "~/lib/context";
import { db } from "~/lib/db.server";
import { sessionUser } from "~/lib/session.server";
import type { Role } from "~/lib/permissions";

export const PASSWORD = "correct-horse-battery";

export type TestUser = { id: string; email: string; role: Role; cookie: string };

export async function createUser(role: Role = "owner", opts: { verified?: boolean } = {}): Promise<TestUser> {
  const id = randomUUID();
  const email = `${role}-${id.slice(0, 8)}@dipwell.test`;
  await db.insert(s.user).values({ id, name: `Test ${role} ${id.slice(0, 4)}`, email, emailVerified: opts.verified ?? true, role });
  await db.insert(s.account).values({ id: randomUUID(), accountId: id, providerId: "credential", userId: id, password: await hashPassword(PASSWORD) });
  let cookie = "";
  if (opts.verified ?? true) {
    const { headers } = await auth.api.signInEmail({ body: { email, password: PASSWORD }, returnHeaders: true });
    cookie = headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");
  }
  return { id, email, role, cookie };
}

export async function createTub(ownerId: string, values: Partial<typeof s.tub.$inferInsert> = {}) {
  const [row] = await db
    .insert(s.tub)
    .values({ ownerId, name: `Tub ${randomUUID().slice(0, 6)}`, volumeLitres: 1200, sanitiser: "chlorine", ...values })
    .returning();
  return row;
}

/** A strip chart with one batch whose current version is `definition` (an imported chart). */
export async function createChartBatch(name: string, lot: string, definition: typeof s.chartVersion.$inferInsert["definition"]) {
  const [c] = await db.insert(s.stripChart).values({ name }).returning();
  const [b] = await db.insert(s.stripBatch).values({ chartId: c.id, lot }).returning();
  const [v] = await db.insert(s.chartVersion).values({ chartId: c.id, batchId: b.id, version: 1, definition, source: "import" }).returning();
  await db.update(s.stripBatch).set({ currentVersionId: v.id }).where(eq(s.stripBatch.id, b.id));
  return { chartId: c.id, batchId: b.id, versionId: v.id };
}

export async function shareTub(tubId: string, technicianId: string, grantedBy: string) {
  await db.insert(s.tubAccess).values({ tubId, technicianId, grantedBy });
}

type DataFunction = (args: any) => unknown;

export type RouteResult = { status: number; location: string | null; data: unknown; response: Response | null };

/**
 * Calls a loader or action the way the framework does: the root middleware puts
 * the session's user into the context, then the function runs. A thrown or
 * returned Response (redirect, 404) comes back as its status.
 */
export async function callRoute(
  fn: DataFunction,
  opts: { url: string; params?: Record<string, string>; user?: TestUser | null; method?: string; form?: Record<string, string> | FormData; json?: unknown },
): Promise<RouteResult> {
  const headers = new Headers();
  if (opts.user?.cookie) headers.set("cookie", opts.user.cookie);
  let body: BodyInit | undefined;
  if (opts.form) {
    body = opts.form instanceof FormData ? opts.form : new URLSearchParams(opts.form);
  } else if (opts.json !== undefined) {
    body = JSON.stringify(opts.json);
    headers.set("content-type", "application/json");
  }
  const method = opts.method ?? (body ? "POST" : "GET");
  const url = new URL(opts.url, "http://127.0.0.1:3100");
  const request = new Request(url, { method, headers, body });
  const context = new RouterContextProvider();
  context.set(userContext, await sessionUser(headers));
  try {
    const out = await fn({ request, params: opts.params ?? {}, context, url, pattern: url.pathname });
    return asResult(out);
  } catch (thrown) {
    if (thrown instanceof Response || isDataWithResponseInit(thrown)) return asResult(thrown);
    throw thrown;
  }
}

function isDataWithResponseInit(x: unknown): x is { type: "DataWithResponseInit"; data: unknown; init: ResponseInit | null } {
  return typeof x === "object" && x !== null && (x as { type?: string }).type === "DataWithResponseInit";
}

async function asResult(out: unknown): Promise<RouteResult> {
  if (out instanceof Response) {
    let data: unknown = null;
    const type = out.headers.get("content-type") ?? "";
    if (type.includes("json")) data = await out.clone().json().catch(() => null);
    return { status: out.status, location: out.headers.get("location"), data, response: out };
  }
  if (isDataWithResponseInit(out)) {
    const init = out.init ?? {};
    const location = new Headers(init.headers).get("location");
    return { status: init.status ?? 200, location, data: out.data, response: null };
  }
  return { status: 200, location: null, data: out, response: null };
}
