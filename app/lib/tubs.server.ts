// Every tub a request touches goes through here: who may see it, who may change
// it. A tub the user may not see is "not found" (404), so its existence is not
// revealed; an action the user may not take on a tub they can see is 403.
import { and, asc, eq, inArray, isNull } from "drizzle-orm";
import { data } from "react-router";
import { tub, tubAccess, user as userTable } from "../db/schema";
import type { SessionUser } from "./auth.server";
import { db } from "./db.server";
import { hasRole } from "./permissions";

export type Tub = typeof tub.$inferSelect;
/** view: read it; care: add readings, treatments, notes (owner, technician with access, admin); own: settings, sharing, archive */
export type TubNeed = "view" | "care" | "own";
export type TubRelation = "owner" | "technician" | "admin";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export async function tubRelation(user: SessionUser, t: Tub): Promise<TubRelation | null> {
  if (t.ownerId === user.id) return "owner";
  if (hasRole(user, "admin")) return "admin";
  if (hasRole(user, "technician")) {
    const access = await db.query.tubAccess.findFirst({
      where: and(eq(tubAccess.tubId, t.id), eq(tubAccess.technicianId, user.id), isNull(tubAccess.revokedAt)),
    });
    if (access) return "technician";
  }
  return null;
}

export async function requireTub(user: SessionUser, tubId: string | undefined, need: TubNeed = "view") {
  const notFound = () => data({ message: "We could not find that tub." }, { status: 404 });
  if (!tubId || !UUID.test(tubId)) throw notFound();
  const found = await db.query.tub.findFirst({ where: eq(tub.id, tubId) });
  if (!found) throw notFound();
  const relation = await tubRelation(user, found);
  if (!relation) throw notFound();
  if (need === "own" && relation !== "owner" && relation !== "admin") {
    throw data({ message: "Only the tub's owner can do that." }, { status: 403 });
  }
  return { tub: found, relation };
}

/** The tubs a user looks after: their own, those shared with them, or (admin) all. */
export async function listTubs(user: SessionUser, opts: { includeArchived?: boolean } = {}) {
  const live = opts.includeArchived ? undefined : isNull(tub.archivedAt);
  if (hasRole(user, "admin")) {
    return db.select().from(tub).where(live).orderBy(asc(tub.name));
  }
  const own = await db.select().from(tub).where(and(eq(tub.ownerId, user.id), live)).orderBy(asc(tub.name));
  if (!hasRole(user, "technician")) return own;
  const shared = await db
    .select({ tubId: tubAccess.tubId })
    .from(tubAccess)
    .where(and(eq(tubAccess.technicianId, user.id), isNull(tubAccess.revokedAt)));
  if (shared.length === 0) return own;
  const clients = await db
    .select()
    .from(tub)
    .where(and(inArray(tub.id, shared.map((s) => s.tubId)), live))
    .orderBy(asc(tub.name));
  return [...own, ...clients.filter((c) => !own.some((o) => o.id === c.id))];
}

export async function ownerNames(ownerIds: string[]) {
  if (ownerIds.length === 0) return new Map<string, string>();
  const rows = await db.select({ id: userTable.id, name: userTable.name }).from(userTable).where(inArray(userTable.id, ownerIds));
  return new Map(rows.map((r) => [r.id, r.name]));
}
