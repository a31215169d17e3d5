// Admin: users and their roles. Direct updates of better-auth's admin-plugin columns; a ban
// also ends the user's sessions so it takes effect at once.
import { asc, count, eq, ilike, or } from "drizzle-orm";
import { session, user as userTable } from "~/db/schema";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { likePattern, pageOf } from "~/lib/paging";
import { ROLE_NAMES, type Role } from "~/lib/permissions";
import { ClientInputError } from "./clients.server";

export const USER_PAGE_SIZE = 50;

/** One page of accounts by e-mail address; `q` searches names and addresses. */
export async function listUsers(opts: { q?: string; page?: number } = {}) {
  const where = opts.q ? or(ilike(userTable.email, likePattern(opts.q)), ilike(userTable.name, likePattern(opts.q))) : undefined;
  const [{ total }] = await db.select({ total: count() }).from(userTable).where(where);
  const page = pageOf(total, USER_PAGE_SIZE, opts.page ?? 1);
  const users = await db
    .select({ id: userTable.id, name: userTable.name, email: userTable.email, role: userTable.role, banned: userTable.banned, banReason: userTable.banReason, emailVerified: userTable.emailVerified, createdAt: userTable.createdAt })
    .from(userTable)
    .where(where)
    .orderBy(asc(userTable.email))
    .limit(page.size)
    .offset(page.offset);
  return { users, page };
}

async function target(admin: SessionUser, userId: string) {
  const u = await db.query.user.findFirst({ where: eq(userTable.id, userId) });
  if (!u) throw new ClientInputError("We could not find that user.", 404);
  if (u.id === admin.id) throw new ClientInputError("You cannot change your own role or ban yourself; ask another admin.");
  return u;
}

export async function setRole(admin: SessionUser, userId: string, role: string) {
  if (!ROLE_NAMES.includes(role as Role)) throw new ClientInputError("Choose one of the roles: owner, technician or admin.");
  const u = await target(admin, userId);
  await db.update(userTable).set({ role }).where(eq(userTable.id, u.id));
}

export async function setBanned(admin: SessionUser, userId: string, banned: boolean, reason?: string) {
  const u = await target(admin, userId);
  await db.update(userTable).set({ banned, banReason: banned ? reason || "Banned by an admin" : null, banExpires: null }).where(eq(userTable.id, u.id));
  if (banned) await db.delete(session).where(eq(session.userId, u.id));
}
