// JSON routes: who is asking and which tub, with the answers a script expects:
// anonymous → 401, a tub the user may not see → 404, an action they may not take → 403,
// each as JSON. `body` shapes the message for routes whose API speaks of "error".
import type { RouterContextProvider } from "react-router";
import type { SessionUser } from "./auth.server";
import { optionalUser } from "./session.server";
import { requireTub, type TubNeed } from "./tub-access.server";

type Ctx = Readonly<RouterContextProvider>;
type Body = (message: string) => object;
const asMessage: Body = (message) => ({ message });

export function apiUser(context: Ctx, opts: { message?: string; body?: Body; headers?: HeadersInit } = {}): SessionUser {
  const user = optionalUser(context);
  if (!user) throw Response.json((opts.body ?? asMessage)(opts.message ?? "Please sign in first."), { status: 401, headers: opts.headers });
  return user;
}

export async function apiTub(context: Ctx, tubId: string | undefined, need: TubNeed, opts: { body?: Body; headers?: HeadersInit } = {}) {
  const user = apiUser(context, opts);
  try {
    return { user, ...(await requireTub(user, tubId, need)) };
  } catch (thrown) {
    const t = thrown as { type?: string; data?: { message?: string }; init?: ResponseInit | null };
    if (t?.type !== "DataWithResponseInit") throw thrown;
    throw Response.json((opts.body ?? asMessage)(t.data?.message ?? "Not allowed."), { status: t.init?.status ?? 404, headers: opts.headers });
  }
}
