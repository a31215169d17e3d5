// Technicians and their clients: invitations by e-mail, access and its revocation, the
// dashboard of client tubs, the review queue of unsure readings, visit notes.
import { randomBytes } from "node:crypto";
import { and, desc, eq, inArray, isNull } from "drizzle-orm";
import { resolveTargets, type Parameter, type Range } from "~/chemistry";
import { invitation, reading, readingPad, treatment, tub, tubAccess, user as userTable, visitNote } from "~/db/schema";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import { invitationEmail } from "~/features/notify/messages.server";
import { enqueueEmail } from "~/features/notify/outbox.server";
import { ensurePreferences } from "~/features/notify/preferences.server";
import { hasRole } from "~/lib/permissions";
import type { Tub } from "~/lib/tubs.server";
import { analyteLabel } from "./labels";

export class ClientInputError extends Error {
  constructor(message: string, public status = 400) {
    super(message);
  }
}

const INVITATION_DAYS = 14;
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

// ---------------------------------------------------------------- sharing

export async function sharingFor(t: Tub) {
  const access = await db
    .select({ id: tubAccess.id, technicianId: tubAccess.technicianId, createdAt: tubAccess.createdAt, name: userTable.name, email: userTable.email })
    .from(tubAccess)
    .innerJoin(userTable, eq(userTable.id, tubAccess.technicianId))
    .where(and(eq(tubAccess.tubId, t.id), isNull(tubAccess.revokedAt)));
  const invites = await db
    .select()
    .from(invitation)
    .where(and(eq(invitation.tubId, t.id), isNull(invitation.revokedAt), isNull(invitation.acceptedAt)))
    .orderBy(desc(invitation.createdAt));
  return { access, invites };
}

export async function inviteTechnician(owner: SessionUser, t: Tub, emailIn: string) {
  const email = emailIn.trim().toLowerCase();
  if (!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(email)) throw new ClientInputError("Enter the technician's e-mail address, e.g. name@example.com.");
  if (email === owner.email.toLowerCase()) throw new ClientInputError("That is your own address. Enter the technician's e-mail address.");
  const pending = await db.query.invitation.findFirst({ where: and(eq(invitation.tubId, t.id), eq(invitation.email, email), isNull(invitation.revokedAt), isNull(invitation.acceptedAt)) });
  if (pending && pending.expiresAt > new Date()) throw new ClientInputError(`${email} has already been invited to this tub. Withdraw that invitation first to send a new one.`);
  const token = randomBytes(24).toString("base64url");
  const [row] = await db
    .insert(invitation)
    .values({ tubId: t.id, email, token, invitedBy: owner.id, expiresAt: new Date(Date.now() + INVITATION_DAYS * 86_400_000) })
    .returning();
  const acceptUrl = `${env().PUBLIC_URL.replace(/\/$/, "")}/invitations/${token}`;
  // Through the outbox: retried with back-off if the mail server is down, sent once.
  const known = await db.query.user.findFirst({ where: eq(userTable.email, email) });
  const recipient = known ? { id: known.id, name: known.name, unsubscribeToken: (await ensurePreferences(known.id)).unsubscribeToken } : null;
  await enqueueEmail(invitationEmail({ invitationId: row.id, to: email, tubName: t.name, inviterName: owner.name, acceptUrl, validDays: INVITATION_DAYS, recipient }));
  return row;
}

export async function withdrawInvitation(t: Tub, invitationId: string) {
  if (!UUID.test(invitationId)) throw new ClientInputError("We could not find that invitation.", 404);
  await db.update(invitation).set({ revokedAt: new Date() }).where(and(eq(invitation.id, invitationId), eq(invitation.tubId, t.id), isNull(invitation.revokedAt)));
}

export async function revokeAccess(t: Tub, accessId: string) {
  if (!UUID.test(accessId)) throw new ClientInputError("We could not find that technician's access.", 404);
  await db.update(tubAccess).set({ revokedAt: new Date() }).where(and(eq(tubAccess.id, accessId), eq(tubAccess.tubId, t.id), isNull(tubAccess.revokedAt)));
}

export async function loadInvitation(token: string | undefined) {
  if (!token || token.length > 100) return null;
  const inv = await db.query.invitation.findFirst({ where: eq(invitation.token, token) });
  if (!inv) return null;
  const t = await db.query.tub.findFirst({ where: eq(tub.id, inv.tubId) });
  const owner = t ? await db.query.user.findFirst({ where: eq(userTable.id, t.ownerId) }) : null;
  const state = inv.revokedAt ? "withdrawn" : inv.acceptedAt ? "accepted" : inv.expiresAt < new Date() ? "expired" : "open";
  return { inv, tub: t, ownerName: owner?.name ?? "", state } as const;
}

export async function acceptInvitation(user: SessionUser, token: string | undefined) {
  const found = await loadInvitation(token);
  if (!found || !found.tub) throw new ClientInputError("This invitation does not exist. Ask the tub's owner to invite you again.", 404);
  if (found.state === "withdrawn") throw new ClientInputError("The owner has withdrawn this invitation.");
  if (found.state === "expired") throw new ClientInputError("This invitation has expired. Ask the tub's owner to invite you again.");
  if (found.state === "accepted") {
    if (found.inv.acceptedBy === user.id) return found.tub;
    throw new ClientInputError("This invitation has already been accepted.");
  }
  if (!hasRole(user, "technician", "admin")) throw new ClientInputError("Only a technician account can accept this invitation. Sign in with your technician account.", 403);
  if (user.email.toLowerCase() !== found.inv.email.toLowerCase())
    throw new ClientInputError(`This invitation was sent to ${found.inv.email}, but you are signed in as ${user.email}. Sign in with the invited address.`, 403);
  await db.transaction(async (tx) => {
    const active = await tx.query.tubAccess.findFirst({ where: and(eq(tubAccess.tubId, found.tub!.id), eq(tubAccess.technicianId, user.id), isNull(tubAccess.revokedAt)) });
    if (!active) await tx.insert(tubAccess).values({ tubId: found.tub!.id, technicianId: user.id, grantedBy: found.inv.invitedBy });
    await tx.update(invitation).set({ acceptedAt: new Date(), acceptedBy: user.id }).where(eq(invitation.id, found.inv.id));
  });
  return found.tub;
}

// ---------------------------------------------------------------- dashboard

/** Tubs the technician looks after for clients (for an admin: every tub). */
export async function clientTubs(user: SessionUser) {
  if (hasRole(user, "admin")) return db.select().from(tub).where(isNull(tub.archivedAt)).orderBy(tub.name);
  const shared = await db.select({ tubId: tubAccess.tubId }).from(tubAccess).where(and(eq(tubAccess.technicianId, user.id), isNull(tubAccess.revokedAt)));
  if (!shared.length) return [];
  return db.select().from(tub).where(and(inArray(tub.id, shared.map((s) => s.tubId)), isNull(tub.archivedAt))).orderBy(tub.name);
}

const label = analyteLabel;

export async function dashboard(user: SessionUser, now = new Date()) {
  const tubs = await clientTubs(user);
  if (!tubs.length) return [];
  const ids = tubs.map((t) => t.id);
  const readings = await db.select().from(reading).where(inArray(reading.tubId, ids)).orderBy(desc(reading.takenAt));
  const latestByTub = new Map<string, typeof reading.$inferSelect>();
  for (const r of readings) if (!latestByTub.has(r.tubId) && r.status !== "failed") latestByTub.set(r.tubId, r);
  const latestIds = [...latestByTub.values()].map((r) => r.id);
  const unreviewed = readings.filter((r) => !r.reviewedAt);
  const pads = latestIds.length || unreviewed.length
    ? await db.select().from(readingPad).where(inArray(readingPad.readingId, [...new Set([...latestIds, ...unreviewed.map((r) => r.id)])]))
    : [];
  const treatments = await db.select().from(treatment).where(inArray(treatment.tubId, ids)).orderBy(desc(treatment.addedAt));
  const owners = await db.select({ id: userTable.id, name: userTable.name }).from(userTable).where(inArray(userTable.id, [...new Set(tubs.map((t) => t.ownerId))]));
  const rows = tubs.map((t) => {
    const latest = latestByTub.get(t.id);
    let targets: Partial<Record<string, Range>> = {};
    try {
      targets = resolveTargets(t.sanitiser, (t.targets ?? {}) as Partial<Record<Parameter, Partial<Range>>>) as unknown as Record<string, Range>;
    } catch {
      targets = resolveTargets(t.sanitiser) as unknown as Record<string, Range>;
    }
    const outOfRange = latest
      ? pads
          .filter((p) => p.readingId === latest.id)
          .flatMap((p) => {
            const v = p.confirmedValue ?? p.readValue;
            const r = targets[p.analyte];
            if (v === null || !r || (r.min === 0 && r.max === 0)) return [];
            if (v < r.min) return [`${label(p.analyte)} low (${v}${p.unit ? ` ${p.unit}` : ""}; aim ${r.min}–${r.max})`];
            if (v > r.max) return [`${label(p.analyte)} high (${v}${p.unit ? ` ${p.unit}` : ""}; aim ${r.min}–${r.max})`];
            return [];
          })
      : [];
    const dueAt = latest ? new Date(latest.takenAt.getTime() + t.testEveryDays * 86_400_000) : null;
    const waiting = unreviewed.filter((r) => r.tubId === t.id && (r.needsReview || pads.some((p) => p.readingId === r.id && p.needsReview))).length;
    const lastTreatment = treatments.find((x) => x.tubId === t.id);
    return {
      id: t.id,
      name: t.name,
      ownerName: owners.find((o) => o.id === t.ownerId)?.name ?? "",
      latestAt: latest?.takenAt.toISOString() ?? null,
      outOfRange,
      overdue: !dueAt || dueAt < now,
      dueAt: dueAt?.toISOString() ?? null,
      waiting,
      lastTreatment: lastTreatment ? { name: lastTreatment.productName, amount: lastTreatment.amount, unit: lastTreatment.unit, at: lastTreatment.addedAt.toISOString() } : null,
    };
  });
  // Tubs that need attention first: readings to review, water out of range, test overdue.
  const score = (r: (typeof rows)[number]) => (r.waiting ? 4 : 0) + (r.outOfRange.length ? 2 : 0) + (r.overdue ? 1 : 0);
  return rows.sort((a, b) => score(b) - score(a) || a.name.localeCompare(b.name));
}

// ---------------------------------------------------------------- review

export async function reviewQueue(user: SessionUser) {
  const tubs = await clientTubs(user);
  if (!tubs.length) return [];
  const ids = tubs.map((t) => t.id);
  const candidates = await db.select().from(reading).where(and(inArray(reading.tubId, ids), isNull(reading.reviewedAt))).orderBy(desc(reading.takenAt)).limit(200);
  if (!candidates.length) return [];
  const pads = await db.select().from(readingPad).where(inArray(readingPad.readingId, candidates.map((r) => r.id)));
  return candidates
    .filter((r) => r.needsReview || pads.some((p) => p.readingId === r.id && p.needsReview))
    .map((r) => ({
      id: r.id,
      tubId: r.tubId,
      tubName: tubs.find((t) => t.id === r.tubId)?.name ?? "",
      takenAt: r.takenAt.toISOString(),
      status: r.status,
      pads: pads
        .filter((p) => p.readingId === r.id)
        .map((p) => ({ id: p.id, analyte: p.analyte, unit: p.unit, readValue: p.readValue, confirmedValue: p.confirmedValue, needsReview: p.needsReview, reason: p.reviewReason, confidence: p.confidence })),
    }));
}

/** Marks a reading reviewed; corrected values (pad id -> value) replace what was confirmed. */
export async function markReviewed(user: SessionUser, readingId: string, corrections: Record<string, number>) {
  if (!UUID.test(readingId) || !Object.keys(corrections).every((id) => UUID.test(id))) throw new ClientInputError("We could not find that reading among your clients' tubs.", 404);
  const r = await db.query.reading.findFirst({ where: eq(reading.id, readingId) });
  const allowed = (await clientTubs(user)).map((t) => t.id);
  if (!r || !allowed.includes(r.tubId)) throw new ClientInputError("We could not find that reading among your clients' tubs.", 404);
  await db.transaction(async (tx) => {
    for (const [padId, value] of Object.entries(corrections)) {
      await tx.update(readingPad).set({ confirmedValue: value, source: "corrected" }).where(and(eq(readingPad.id, padId), eq(readingPad.readingId, r.id)));
    }
    await tx.update(reading).set({ reviewedBy: user.id, reviewedAt: new Date() }).where(eq(reading.id, r.id));
  });
}

// ---------------------------------------------------------------- visit notes

export async function notesFor(t: Tub) {
  return db
    .select({ id: visitNote.id, body: visitNote.body, visitedAt: visitNote.visitedAt, author: userTable.name })
    .from(visitNote)
    .leftJoin(userTable, eq(userTable.id, visitNote.authorId))
    .where(eq(visitNote.tubId, t.id))
    .orderBy(desc(visitNote.visitedAt));
}

export async function addNote(user: SessionUser, t: Tub, body: string, visitedAt: Date) {
  await db.insert(visitNote).values({ tubId: t.id, authorId: user.id, body, visitedAt });
}


