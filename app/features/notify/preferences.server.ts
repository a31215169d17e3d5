// Per-user e-mail preferences: which kinds of message are on, the time zone and
// the quiet hours. A row is made on first use, with a secret for the one-click
// "stop this kind of message" links.
import { randomBytes } from "node:crypto";
import { eq, inArray } from "drizzle-orm";
import { emailPreference } from "../../db/schema";
import { db } from "../../lib/db.server";
import { MESSAGE_KINDS, isMessageKind, isValidTimeZone, type MessageKind } from "./schedule";

export type Preferences = typeof emailPreference.$inferSelect;

const newToken = () => randomBytes(24).toString("base64url");

/** The user's preferences, made with the defaults (UTC, quiet 22:00–07:00, everything on) if missing. */
export async function ensurePreferences(userId: string, defaults: { timeZone?: string } = {}): Promise<Preferences> {
  const found = await db.query.emailPreference.findFirst({ where: eq(emailPreference.userId, userId) });
  if (found) return found;
  const timeZone = defaults.timeZone && isValidTimeZone(defaults.timeZone) ? defaults.timeZone : "UTC";
  await db.insert(emailPreference).values({ userId, timeZone, unsubscribeToken: newToken() }).onConflictDoNothing();
  return (await db.query.emailPreference.findFirst({ where: eq(emailPreference.userId, userId) }))!;
}

export async function preferencesFor(userIds: string[]): Promise<Map<string, Preferences>> {
  if (userIds.length === 0) return new Map();
  const rows = await db.select().from(emailPreference).where(inArray(emailPreference.userId, userIds));
  return new Map(rows.map((r) => [r.userId, r]));
}

export async function savePreferences(
  userId: string,
  values: { timeZone: string; quietStartHour: number; quietEndHour: number; enabledKinds: MessageKind[] },
) {
  await ensurePreferences(userId);
  const disabledKinds = (Object.keys(MESSAGE_KINDS) as MessageKind[]).filter(
    (k) => !values.enabledKinds.includes(k),
  );
  await db
    .update(emailPreference)
    .set({ timeZone: values.timeZone, quietStartHour: values.quietStartHour, quietEndHour: values.quietEndHour, disabledKinds })
    .where(eq(emailPreference.userId, userId));
}

/** One-click unsubscribe: switches `kind` off for the owner of `token`. Null when the token or kind is unknown. */
export async function unsubscribe(token: string, kind: string): Promise<{ userId: string; kind: MessageKind } | null> {
  if (!isMessageKind(kind) || !token) return null;
  const pref = await db.query.emailPreference.findFirst({ where: eq(emailPreference.unsubscribeToken, token) });
  if (!pref) return null;
  if (!pref.disabledKinds.includes(kind)) {
    await db
      .update(emailPreference)
      .set({ disabledKinds: [...pref.disabledKinds, kind] })
      .where(eq(emailPreference.userId, pref.userId));
  }
  return { userId: pref.userId, kind };
}

export async function preferenceByToken(token: string) {
  return (await db.query.emailPreference.findFirst({ where: eq(emailPreference.unsubscribeToken, token) })) ?? null;
}
