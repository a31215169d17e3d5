// Every tub a request touches goes through here: who may see it, who may change
// it. A tub the user may not see is "not found" (404), so its existence is not
// revealed; an action the user may not take on a tub they can see is 403.
import { and, eq, isNull, sql } from "drizzle-orm";
import { isUuid } from "./ids";
import { data, type RouterContextProvider } from "react-router";
import { tub, tubAccess } from "../db/schema";
import type { SessionUser } from "./auth.server";
import { db } from "./db.server";
import { can } from "./permissions";
import { requireUser } from "./session.server";

export type Tub = typeof tub.$inferSelect;
/** view: read it; care: add readings, treatments, notes (owner, technician with access, admin); own: settings, sharing, archive */
export type TubNeed = "view" | "care" | "own";
export type TubRelation = "owner" | "technician" | "admin";


// Asked by every request that names a tub: prepared once (named statements, planned once per
// connection), so no query is built on the way.
const tubById = db.select().from(tub).where(eq(tub.id, sql.placeholder("id"))).limit(1).prepare("dipwell-tub-by-id");
const activeAccess = db
  .select({ id: tubAccess.id })
  .from(tubAccess)
  .where(and(eq(tubAccess.tubId, sql.placeholder("tubId")), eq(tubAccess.technicianId, sql.placeholder("technicianId")), isNull(tubAccess.revokedAt)))
  .limit(1)
  .prepare("dipwell-tub-access-active");

/**
 * How a user relates to a tub, from its owner and whether they hold an active grant to it
 * (`shared`, asked only when needed: a function that looks it up). The one rule for every route.
 */
export async function relationOf(user: SessionUser, ownerId: string, shared: () => Promise<boolean>): Promise<TubRelation | null> {
  if (ownerId === user.id) return "owner";
  if (can(user, { tub: ["all"] })) return "admin";
  if (can(user, { tub: ["shared"] }) && (await shared())) return "technician";
  return null;
}

const tubRelation = (user: SessionUser, t: Tub) =>
  relationOf(user, t.ownerId, async () => (await activeAccess.execute({ tubId: t.id, technicianId: user.id })).length > 0);

export async function requireTub(user: SessionUser, tubId: string | undefined, need: TubNeed = "view") {
  const notFound = () => data({ message: "We could not find that tub." }, { status: 404 });
  if (!isUuid(tubId)) throw notFound();
  const [found] = await tubById.execute({ id: tubId });
  if (!found) throw notFound();
  const relation = await tubRelation(user, found);
  if (!relation) throw notFound();
  if (need === "own" && relation !== "owner" && relation !== "admin") {
    throw data({ message: "Only the tub's owner can do that." }, { status: 403 });
  }
  return { tub: found, relation };
}

type TubArgs = { context: Readonly<RouterContextProvider>; request: Request; params: { tubId?: string } };

/**
 * The tub guard of every page whose URL takes a tub id, before it reads the request body:
 * the signed-in user (or a redirect to sign in), the tub they `need`, and how they relate to it.
 */
export async function tubGuard({ context, request, params }: TubArgs, need: TubNeed) {
  const user = requireUser(context, request);
  return { user, ...(await requireTub(user, params.tubId, need)) };
}
