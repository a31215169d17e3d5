// The in-app list of notifications: every reminder also lands here.
import { and, count, desc, eq, isNull } from "drizzle-orm";
import { emailLog, notification } from "../../db/schema";
import { db } from "../../lib/db.server";

export async function listNotifications(userId: string, limit = 100) {
  return db.select().from(notification).where(eq(notification.userId, userId)).orderBy(desc(notification.createdAt)).limit(limit);
}

export async function unreadCount(userId: string) {
  const [row] = await db.select({ n: count() }).from(notification).where(and(eq(notification.userId, userId), isNull(notification.readAt)));
  return row?.n ?? 0;
}

/** Marks one notification (or, with id null, all of them) read. Only the user's own. */
export async function markRead(userId: string, id: string | null) {
  const mine = eq(notification.userId, userId);
  const where = id ? and(mine, eq(notification.id, id), isNull(notification.readAt)) : and(mine, isNull(notification.readAt));
  await db.update(notification).set({ readAt: new Date() }).where(where);
}

export async function emailLogRows(status: string | null, limit = 200) {
  const q = db.select().from(emailLog);
  return (status ? q.where(eq(emailLog.status, status)) : q).orderBy(desc(emailLog.updatedAt)).limit(limit);
}
