// The in-app list of notifications: every reminder also lands here.
import { and, count, desc, eq, isNull } from "drizzle-orm";
import { emailLog, notification } from "../../db/schema";
import { db } from "../../lib/db.server";
import { pageOf } from "../../lib/paging";

export async function listNotifications(userId: string, limit = 100) {
  return db.select().from(notification).where(eq(notification.userId, userId)).orderBy(desc(notification.createdAt)).limit(limit);
}

export async function unreadCount(userId: string) {
  // Asked on every signed-in page (the badge in the navigation): a named statement, planned once
  // per connection, with no query building on the way.
  const { rows } = await db.$client.query<{ n: number }>({
    name: "dipwell-unread-count",
    text: "select count(*)::int as n from notification where user_id = $1 and read_at is null",
    values: [userId],
  });
  return rows[0]?.n ?? 0;
}

/** Marks one notification (or, with id null, all of them) read. Only the user's own. */
export async function markRead(userId: string, id: string | null) {
  const mine = eq(notification.userId, userId);
  const where = id ? and(mine, eq(notification.id, id), isNull(notification.readAt)) : and(mine, isNull(notification.readAt));
  await db.update(notification).set({ readAt: new Date() }).where(where);
}

export const EMAIL_LOG_PAGE_SIZE = 50;

/** One page of the e-mail log, newest first, whole or of one status. */
export async function emailLogRows(status: string | null, pageAsked = 1) {
  const where = status ? eq(emailLog.status, status) : undefined;
  const [{ total }] = await db.select({ total: count() }).from(emailLog).where(where);
  const page = pageOf(total, EMAIL_LOG_PAGE_SIZE, pageAsked);
  const rows = await db.select().from(emailLog).where(where).orderBy(desc(emailLog.updatedAt), desc(emailLog.id)).limit(page.size).offset(page.offset);
  return { rows, page };
}
