// Technicians and their clients: invitations by e-mail, access and its revocation, the
// dashboard of client tubs, the review queue of unsure readings, visit notes.
import { randomBytes } from "node:crypto";
import { isUuid } from "~/lib/ids";
import { padsByReading, padsOf } from "~/features/readings/pads.server";
import { and, count, desc, eq, inArray, isNull } from "drizzle-orm";
import type { Range } from "~/chemistry";
import { tubTargets } from "~/features/plan/plan.server";
import { chartVersion, invitation, notification, reading, readingPad, tub, tubAccess, user as userTable, visitNote } from "~/db/schema";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import { invitationEmail, reviewedEmail } from "~/features/notify/messages.server";
import { enqueueEmail } from "~/features/notify/outbox.server";
import { ensurePreferences } from "~/features/notify/preferences.server";
import { can } from "~/lib/permissions";
import { likePattern, pageOf, stopIfAborted } from "~/lib/paging";
import type { Tub } from "~/lib/tub-access.server";
import { parseChart } from "~/reading/chart";
import { rangeStatus, type RangeStatus } from "~/lib/range-status";
import { analyteName } from "~/chemistry";
import { analyteSwatches, type AnalyteSwatches } from "~/features/charts/analyte-swatches";

export class ClientInputError extends Error {
  constructor(message: string, public status = 400) {
    super(message);
  }
}

const INVITATION_DAYS = 14;

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
    .orderBy(desc(invitation.createdAt))
    .limit(50);
  return { access, invites };
}

export async function inviteTechnician(owner: SessionUser, t: Tub, emailIn: string) {
  const email = emailIn.trim().toLowerCase();
  if (!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(email)) throw new ClientInputError("Enter the technician's e-mail address, e.g. name@example.com.");
  if (email === owner.email.toLowerCase()) throw new ClientInputError("That is your own address. Enter the technician's e-mail address.");
  const pending = await db.query.invitation.findFirst({ where: and(eq(invitation.tubId, t.id), eq(invitation.email, email), isNull(invitation.revokedAt), isNull(invitation.acceptedAt), isNull(invitation.declinedAt)) });
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
  if (!isUuid(invitationId)) throw new ClientInputError("We could not find that invitation.", 404);
  await db.update(invitation).set({ revokedAt: new Date() }).where(and(eq(invitation.id, invitationId), eq(invitation.tubId, t.id), isNull(invitation.revokedAt)));
}

export async function revokeAccess(t: Tub, accessId: string) {
  if (!isUuid(accessId)) throw new ClientInputError("We could not find that technician's access.", 404);
  await db.update(tubAccess).set({ revokedAt: new Date() }).where(and(eq(tubAccess.id, accessId), eq(tubAccess.tubId, t.id), isNull(tubAccess.revokedAt)));
}

export async function loadInvitation(token: string | undefined) {
  if (!token || token.length > 100) return null;
  const inv = await db.query.invitation.findFirst({ where: eq(invitation.token, token) });
  if (!inv) return null;
  const t = await db.query.tub.findFirst({ where: eq(tub.id, inv.tubId) });
  const owner = t ? await db.query.user.findFirst({ where: eq(userTable.id, t.ownerId) }) : null;
  const state = inv.revokedAt ? "withdrawn" : inv.declinedAt ? "declined" : inv.acceptedAt ? "accepted" : inv.expiresAt < new Date() ? "expired" : "open";
  return { inv, tub: t, ownerName: owner?.name ?? "", state } as const;
}

export async function acceptInvitation(user: SessionUser, token: string | undefined) {
  const found = await loadInvitation(token);
  if (!found || !found.tub) throw new ClientInputError("This invitation does not exist. Ask the tub's owner to invite you again.", 404);
  if (found.state === "withdrawn") throw new ClientInputError("The owner has withdrawn this invitation.");
  if (found.state === "declined") throw new ClientInputError("This invitation was declined. Ask the tub's owner to invite you again.");
  if (found.state === "expired") throw new ClientInputError("This invitation has expired. Ask the tub's owner to invite you again.");
  if (found.state === "accepted") {
    if (found.inv.acceptedBy === user.id) return found.tub;
    throw new ClientInputError("This invitation has already been accepted.");
  }
  if (!can(user, { client: ["look-after"] })) throw new ClientInputError("Only a technician account can accept this invitation. Sign in with your technician account.", 403);
  if (user.email.toLowerCase() !== found.inv.email.toLowerCase())
    throw new ClientInputError(`This invitation was sent to ${found.inv.email}, but you are signed in as ${user.email}. Sign in with the invited address.`, 403);
  await db.transaction(async (tx) => {
    const active = await tx.query.tubAccess.findFirst({ where: and(eq(tubAccess.tubId, found.tub!.id), eq(tubAccess.technicianId, user.id), isNull(tubAccess.revokedAt)) });
    if (!active) await tx.insert(tubAccess).values({ tubId: found.tub!.id, technicianId: user.id, grantedBy: found.inv.invitedBy });
    await tx.update(invitation).set({ acceptedAt: new Date(), acceptedBy: user.id }).where(eq(invitation.id, found.inv.id));
  });
  return found.tub;
}

/**
 * The invited person says no: the invitation closes, the owner finds it marked declined on the
 * sharing page and gets a notification. Only the invited address may decline.
 */
export async function declineInvitation(user: SessionUser, token: string | undefined) {
  const found = await loadInvitation(token);
  if (!found || !found.tub) throw new ClientInputError("This invitation does not exist.", 404);
  if (found.state === "declined") return found.tub;
  if (found.state !== "open") throw new ClientInputError(found.state === "accepted" ? "This invitation has already been accepted; the tub's owner can end the access from the tub's sharing page." : found.state === "expired" ? "This invitation has expired, so there is nothing to decline." : "The owner has withdrawn this invitation, so there is nothing to decline.");
  if (user.email.toLowerCase() !== found.inv.email.toLowerCase())
    throw new ClientInputError(`This invitation was sent to ${found.inv.email}, but you are signed in as ${user.email}. Only the invited address can decline it.`, 403);
  const now = new Date();
  await db.transaction(async (tx) => {
    await tx.update(invitation).set({ declinedAt: now }).where(and(eq(invitation.id, found.inv.id), isNull(invitation.declinedAt)));
    await tx
      .insert(notification)
      .values({
        userId: found.inv.invitedBy, tubId: found.tub!.id, kind: "invitation_declined",
        title: `${found.inv.email} declined to look after “${found.tub!.name}”`,
        body: "You can invite another technician from the tub's sharing page.",
        link: `/tubs/${found.tub!.id}/sharing`, dedupeKey: `invitation-declined:${found.inv.id}`,
      })
      .onConflictDoNothing();
  });
  return found.tub;
}

// ---------------------------------------------------------------- dashboard

/**
 * SQL that limits a query to the tubs a technician looks after for clients (an admin: every tub).
 * `$1` is the technician's id, or null for an admin. `alias` is the tub table's alias.
 */
const clientTubFilter = (alias: string) =>
  `${alias}.archived_at is null and ($1::text is null or exists (select 1 from tub_access a where a.tub_id = ${alias}.id and a.technician_id = $1 and a.revoked_at is null))`;

const technicianParam = (user: SessionUser) => (can(user, { tub: ["all"] }) ? null : user.id);

/** Whether the user may review readings of this tub: an admin, or a technician with active access. */
async function looksAfter(user: SessionUser, tubId: string) {
  const r = await db.$client.query(`select 1 from tub t where t.id = $2 and ${clientTubFilter("t")}`, [technicianParam(user), tubId]);
  return (r.rowCount ?? 0) > 0;
}


export const DASHBOARD_PAGE_SIZE = 24;
export const DASHBOARD_VIEWS = ["attention", "all"] as const;
export type DashboardView = (typeof DASHBOARD_VIEWS)[number];

type DashboardSqlRow = {
  id: string; name: string; sanitiser: "chlorine" | "bromine"; targets: unknown; guidance: string; everyDays: number; ownerName: string; timeZone: string;
  latestAt: Date | null; analytes: string[] | null; units: (string | null)[] | null; vals: (number | null)[] | null;
  waiting: number; waitingNewest: Date | null; overdue: boolean;
  trName: string | null; trAmount: number | null; trUnit: string | null; trAt: Date | null;
};

type DashboardTotals = { tubs: number; attention: number; waiting: number; outOfRange: number; overdue: number; listed: number };
type DashboardTotalsSql = { allTubs: number; allAttention: number; allWaiting: number; allOutOfRange: number; allOverdue: number; allListed: number };

type TubKind = { sanitiser: "chlorine" | "bromine"; targets: unknown; guidance: string };
/** A kind of tub as the dashboard's query reads it: its key and its bands, as parallel arrays. */
type KindBands = { s: string; t: unknown; g: string; a: string[]; lo: number[]; hi: number[] };

const kindKey = (t: TubKind) => `${t.sanitiser}|${t.guidance}|${JSON.stringify(t.targets ?? null)}`;
/** Bands by kind (a pure function of the kind, so they never go stale); a bounded number of kinds. */
const bandsByKind = new Map<string, Partial<Record<string, Range>>>();

/** A tub's target bands as its own pages show them (its guidance and overrides; broken overrides ignored). */
function bandsOf(t: TubKind): Partial<Record<string, Range>> {
  const key = kindKey(t);
  let bands = bandsByKind.get(key);
  if (!bands) {
    bands = tubTargets({ sanitiser: t.sanitiser, targets: t.targets as Tub["targets"], guidance: t.guidance }) as unknown as Record<string, Range>;
    if (bandsByKind.size >= 1000) bandsByKind.clear();
    bandsByKind.set(key, bands);
  }
  return bands;
}

const bandsKey = (k: KindBands) => kindKey({ sanitiser: k.s as TubKind["sanitiser"], targets: k.t, guidance: k.g });

function kindBands(k: TubKind): KindBands {
  const bands = Object.entries(bandsOf(k)).flatMap(([analyte, r]) => (r && !(r.min === 0 && r.max === 0) ? [{ a: analyte, min: r.min, max: r.max }] : []));
  return { s: k.sanitiser, t: k.targets ?? null, g: k.guidance, a: bands.map((b) => b.a), lo: bands.map((b) => b.min), hi: bands.map((b) => b.max) };
}

/**
 * The kinds of tub (sanitiser, guidance, overrides) each technician's dashboard met last time (an
 * admin's under ""), a bounded number of technicians: passed to the page's query, which says how
 * many tubs have a kind not among them, so a visit is one query unless a tub's kind has changed.
 */
const kindsSeen = new Map<string, KindBands[]>();

/**
 * The dashboard in PostgreSQL, ordered and paged there: per client tub the current water (the
 * latest sure reading: read without doubts, confirmed, entered by hand, or reviewed), the readings
 * waiting for review (count and newest) and whether a value of the current water is outside the
 * tub's target bands; tubs needing attention first (readings to review 4, out of range 2, test
 * overdue 1), then by name. Totals over every client tub come from the same pass. Each tub's
 * water, waiting readings and last treatment come from its one row in tub_water (kept by triggers,
 * drizzle/0008), so the cost grows with the number of tubs, not with their history.
 *
 * The bands come from the chemistry code, once per distinct sanitiser, guidance and overrides
 * among the tubs (usually a handful), passed in as one JSON value and read out of it once (a
 * materialized CTE: otherwise each tub's out-of-range check would unpack the JSON again). The
 * kinds passed are those the technician's tubs had last time (kindsSeen); the query counts the
 * tubs whose kind is not among them, and only then are the kinds looked up and the page asked
 * again, so a visit is one round trip to the database.
 */
async function dashboardPage(user: SessionUser, opts: { q: string; view: DashboardView; offset: number; signal?: AbortSignal }, now: Date) {
  const scope = [technicianParam(user), opts.q ? likePattern(opts.q) : null];
  const inScope = `${clientTubFilter("t")} and ($2::text is null or t.name ilike $2 or exists (select 1 from "user" o where o.id = t.owner_id and o.name ilike $2))`;
  const seenKey = technicianParam(user) ?? "";
  let kinds = kindsSeen.get(seenKey) ?? [];
  // Usually once; again (at most twice more) when a tub in the list has a kind not passed in.
  for (let attempt = 0; ; attempt++) {
    const r = await pageQuery(kinds);
    stopIfAborted(opts.signal);
    const [first] = r.rows;
    if (!first?.unknownKinds || attempt === 2) {
      const totals: DashboardTotals = first
        ? { tubs: first.allTubs, attention: first.allAttention, waiting: first.allWaiting, outOfRange: first.allOutOfRange, overdue: first.allOverdue, listed: first.allListed }
        : { tubs: 0, attention: 0, waiting: 0, outOfRange: 0, overdue: 0, listed: 0 };
      return { totals, rows: r.rows.filter((x) => x.id !== null) };
    }
    const found = (
      await db.$client.query<TubKind>({
        name: "dipwell-dashboard-kinds",
        text: `select distinct t.sanitiser, coalesce(t.targets, 'null'::jsonb) as targets, t.guidance from tub t where ${inScope}`,
        values: scope,
      })
    ).rows.map(kindBands);
    stopIfAborted(opts.signal);
    // The kinds met before stay (a search sees some of the tubs), a bounded number of them.
    const fresh = new Set(found.map(bandsKey));
    const kept = kinds.filter((k) => !fresh.has(bandsKey(k)));
    kinds = kept.length + found.length <= 100 ? [...kept, ...found] : found;
    if (kindsSeen.size >= 1000) kindsSeen.clear();
    kindsSeen.set(seenKey, kinds);
  }

  function pageQuery(kinds: KindBands[]) {
    return db.$client.query<DashboardSqlRow & DashboardTotalsSql & { score: number | null; unknownKinds: number }>({
      // A named statement: planned once per connection, not on every visit to the dashboard.
      name: "dipwell-dashboard-page",
      text: `with kind as materialized (
          select k->>'s' as sanitiser, k->'t' as targets, k->>'g' as guidance,
                 array(select jsonb_array_elements_text(k->'a')) as band_analytes,
                 array(select x::float8 from jsonb_array_elements_text(k->'lo') x) as band_min,
                 array(select x::float8 from jsonb_array_elements_text(k->'hi') x) as band_max
            from jsonb_array_elements($3::jsonb) k
        ), scored as materialized (
          -- every client tub, narrow: what orders the list and makes the totals
          select x.id, x.name, x.waiting, x.overdue, x.out_of_range, x.unknown_kind,
                 (case when x.waiting > 0 then 4 else 0 end) + (case when x.out_of_range then 2 else 0 end) + (case when x.overdue then 1 else 0 end) as score
            from (
              select t.id, t.name, coalesce(w.waiting, 0) as waiting, k.sanitiser is null as unknown_kind,
                     (w.taken_at is null or w.taken_at + t.test_every_days * interval '24 hours' < $4::timestamptz) as overdue,
                     -- each of the tub's bands (a handful) looks its value up in the current water's arrays: no join per tub
                     exists (
                       select 1 from unnest(k.band_analytes, k.band_min, k.band_max) b(analyte, min, max)
                        cross join lateral (select w.vals[array_position(w.analytes, b.analyte)] as v) p
                        where p.v < b.min or p.v > b.max
                     ) as out_of_range
                from tub t
                left join kind k on k.sanitiser = t.sanitiser::text and k.targets = coalesce(t.targets, 'null'::jsonb) and k.guidance = t.guidance
                left join tub_water w on w.tub_id = t.id
               where ${inScope}
              offset 0
            ) x
        ), totals as (
          select count(*)::int as "allTubs", count(*) filter (where score > 0)::int as "allAttention", coalesce(sum(waiting), 0)::int as "allWaiting",
                 count(*) filter (where out_of_range)::int as "allOutOfRange", count(*) filter (where overdue)::int as "allOverdue",
                 (case when $5::text = 'attention' then count(*) filter (where score > 0) else count(*) end)::int as "allListed",
                 count(*) filter (where unknown_kind)::int as "unknownKinds"
            from scored
        )
        -- the page's tubs only: their water, last treatment and owner
        select totals.*, p.score, p.id, p.name, t.sanitiser, t.targets, t.guidance, t.test_every_days as "everyDays", t.time_zone as "timeZone",
               o.name as "ownerName", w.taken_at as "latestAt", w.analytes, w.units, w.vals, p.waiting, w.waiting_newest as "waitingNewest", p.overdue,
               w.treatment_name as "trName", w.treatment_amount as "trAmount", w.treatment_unit as "trUnit", w.treated_at as "trAt"
          from totals
          left join lateral (
            select * from scored
             where $5::text <> 'attention' or score > 0
             order by score desc, name collate "und-x-icu", id
             limit $6 offset (case when $7::int < totals."allListed" then $7::int else 0 end)
          ) p on true
          left join tub t on t.id = p.id
          left join tub_water w on w.tub_id = p.id
          left join "user" o on o.id = t.owner_id
         order by p.score desc, p.name collate "und-x-icu", p.id`,
      values: [...scope, JSON.stringify(kinds), now, opts.view, DASHBOARD_PAGE_SIZE, opts.offset],
    });
  }
}

/**
 * The technicians' dashboard: every client tub's state, those needing attention first
 * (readings to review, water out of range, test overdue), one page at a time, with totals.
 * `q` searches tub and owner names. A page past the end gives the first page.
 */
export async function dashboard(
  user: SessionUser,
  opts: { page?: number; q?: string; view?: DashboardView; signal?: AbortSignal } = {},
  now = new Date(),
) {
  const view = opts.view ?? "all";
  const asked = Number.isInteger(opts.page) && opts.page! >= 1 && opts.page! <= 1_000_000 ? opts.page! : 1;
  const found = await dashboardPage(user, { q: opts.q ?? "", view, offset: (asked - 1) * DASHBOARD_PAGE_SIZE, signal: opts.signal }, now);
  stopIfAborted(opts.signal);
  const { listed, ...totals } = found.totals;
  const page = pageOf(listed, DASHBOARD_PAGE_SIZE, asked);
  const rows = found.rows.map((t) => {
    const targets = bandsOf(t);
    const pads = (t.analytes ?? []).map((a, i) => ({ a, u: t.units?.[i] ?? null, v: t.vals?.[i] ?? null }));
    const outOfRange = pads.flatMap((p) => {
      const r = targets[p.a];
      if (p.v === null || !r || (r.min === 0 && r.max === 0)) return [];
      const unit = p.u ? ` ${p.u}` : "";
      if (p.v < r.min) return [`${analyteName(p.a)} low (${p.v}${unit}; aim ${r.min}–${r.max})`];
      if (p.v > r.max) return [`${analyteName(p.a)} high (${p.v}${unit}; aim ${r.min}–${r.max})`];
      return [];
    });
    const statuses = pads.flatMap((p) => (p.v === null ? [] : [{ analyte: p.a, label: analyteName(p.a), value: p.v, unit: p.u ?? "", status: rangeStatus(p.v, targets[p.a]) }]));
    const dueAt = t.latestAt ? new Date(t.latestAt.getTime() + t.everyDays * 86_400_000) : null;
    return {
      id: t.id,
      name: t.name,
      timeZone: t.timeZone,
      ownerName: t.ownerName,
      latestAt: t.latestAt?.toISOString() ?? null,
      outOfRange,
      /** each value of the current water with its status, for words and icons on the card */
      statuses,
      overdue: t.overdue,
      dueAt: dueAt?.toISOString() ?? null,
      waiting: t.waiting,
      /** a reading newer than the current water that is unsure and not yet reviewed */
      unsureNewerAt: t.waitingNewest && (!t.latestAt || t.waitingNewest > t.latestAt) ? t.waitingNewest.toISOString() : null,
      lastTreatment: t.trName && t.trAt ? { name: t.trName, amount: t.trAmount, unit: t.trUnit, at: t.trAt.toISOString() } : null,
    };
  });
  return { rows, page, totals };
}

/** A tub's card on the dashboard: only what the card says, its times already in words in the tub's zone. */
export type DashboardCard = {
  id: string;
  name: string;
  ownerName: string;
  /** the current water (the last sure reading), or null before the first one */
  water: null | {
    /** each value outside its target band, in words with its unit and the aim */
    outOfRange: string[];
    /** low or high: the first value out of range, for the icon of the out-of-range line */
    worst: "low" | "high";
    values: { label: string; value: number; status: RangeStatus }[];
    /** when the water was tested */
    at: string;
  };
  /** when a newer reading, unsure and waiting for review, was taken */
  unsureNewer: string | null;
  overdue: boolean;
  /** when the next test is due */
  due: string | null;
  waiting: number;
  /** "Granular chlorine, 18 g on 12 Oct 2026, 11:57" */
  lastTreatment: string | null;
};

/**
 * The dashboard page's data: the page of tubs as cards (see dashboard), times put into words here
 * with the request's words (the tub's zone), so the browser gets the sentences it shows and no
 * field twice.
 */
export async function dashboardCards(
  user: SessionUser,
  opts: { page?: number; q?: string; view?: DashboardView; signal?: AbortSignal },
  words: { tub: (at: string, zone: string) => string },
) {
  const board = await dashboard(user, opts);
  const cards = board.rows.map((t): DashboardCard => {
    const when = (iso: string | null) => (iso ? words.tub(iso, t.timeZone) : null);
    const worst = t.statuses.find((v) => v.status === "low" || v.status === "high")?.status;
    const tr = t.lastTreatment;
    return {
      id: t.id,
      name: t.name,
      ownerName: t.ownerName,
      water: t.latestAt
        ? { outOfRange: t.outOfRange, worst: worst === "low" ? "low" : "high", values: t.statuses.map((v) => ({ label: v.label, value: v.value, status: v.status })), at: when(t.latestAt)! }
        : null,
      unsureNewer: when(t.unsureNewerAt),
      overdue: t.overdue,
      due: when(t.dueAt),
      waiting: t.waiting,
      lastTreatment: tr ? `${tr.name}, ${tr.amount} ${tr.unit} on ${when(tr.at)}` : null,
    };
  });
  return { rows: cards, page: { page: board.page.page, pages: board.page.pages }, totals: board.totals };
}

// ---------------------------------------------------------------- review

export const REVIEW_PAGE_SIZE = 10;

/** Each chart version's swatches by analyte (undefined: the chart does not parse), a bounded number of versions. */
const swatchesByVersion = new Map<string, Map<string, AnalyteSwatches> | undefined>();

type ReviewSqlRow = { id: string; tubId: string; tubName: string; timeZone: string; ownerName: string; takenAt: Date; status: string; photoId: string | null; chartVersionId: string | null };

/**
 * Every reading waiting for a technician (unsure and not yet reviewed) in the tubs the user
 * looks after, oldest first, one page at a time: the photo, each pad's crop and value beside
 * the chart's swatches for that pad.
 */
export async function reviewQueue(user: SessionUser, opts: { page?: number; signal?: AbortSignal } = {}) {
  const params = [technicianParam(user)];
  const waiting = `r.reviewed_at is null and r.needs_review and ${clientTubFilter("t")}`;
  const [{ total }] = (await db.$client.query<{ total: number }>(`select count(*)::int as total from reading r join tub t on t.id = r.tub_id where ${waiting}`, params)).rows;
  const page = pageOf(total, REVIEW_PAGE_SIZE, opts.page ?? 1);
  stopIfAborted(opts.signal);
  if (total === 0) return { items: [], page };
  const rows = (
    await db.$client.query<ReviewSqlRow>(
      `select r.id, r.tub_id as "tubId", t.name as "tubName", t.time_zone as "timeZone", o.name as "ownerName", r.taken_at as "takenAt", r.status,
              r.photo_id as "photoId", r.chart_version_id as "chartVersionId"
         from reading r join tub t on t.id = r.tub_id join "user" o on o.id = t.owner_id
        where ${waiting}
        order by r.taken_at asc, r.id asc
        limit $2 offset $3`,
      [...params, page.size, page.offset],
    )
  ).rows;
  // One page: at most REVIEW_PAGE_SIZE readings, so these lists stay small.
  const pads = await padsByReading(rows.map((r) => r.id));
  // A chart version is never changed once saved, so its swatches are read and parsed once.
  const versionIds = [...new Set(rows.map((r) => r.chartVersionId).filter((v): v is string => Boolean(v)))];
  const unknown = versionIds.filter((id) => !swatchesByVersion.has(id));
  const versions = unknown.length ? await db.select({ id: chartVersion.id, definition: chartVersion.definition }).from(chartVersion).where(inArray(chartVersion.id, unknown)) : [];
  if (swatchesByVersion.size + versions.length > 500) swatchesByVersion.clear();
  for (const v of versions) {
    try {
      const chart = parseChart(v.definition);
      swatchesByVersion.set(v.id, new Map(analyteSwatches(chart.pads).map((g) => [g.analyte, g])));
    } catch {
      // a chart that no longer parses: the values are shown without swatches
      swatchesByVersion.set(v.id, undefined);
    }
  }
  return {
    page,
    items: rows.map((r) => {
      const chartPads = r.chartVersionId ? swatchesByVersion.get(r.chartVersionId) : undefined;
      return {
        id: r.id,
        tubId: r.tubId,
        tubName: r.tubName,
        timeZone: r.timeZone,
        ownerName: r.ownerName,
        takenAt: r.takenAt.toISOString(),
        status: r.status,
        photoId: r.photoId,
        pads: (pads.get(r.id) ?? [])
          .sort((a, b) => a.analyte.localeCompare(b.analyte))
          .map((p) => ({
            id: p.id, analyte: p.analyte, label: chartPads?.get(p.analyte)?.label ?? analyteName(p.analyte), unit: p.unit,
            readValue: p.readValue, confirmedValue: p.confirmedValue, needsReview: p.needsReview, reason: p.reviewReason,
            hasCrop: Boolean(p.cropKey && r.photoId), padCount: chartPads?.get(p.analyte)?.pads ?? 1,
            // the chart's colours to tap, for the pads the reader was unsure of (the others are confirmed as read or typed)
            swatches: p.needsReview ? (chartPads?.get(p.analyte)?.swatches ?? []) : [],
          })),
      };
    }),
  };
}

/**
 * A technician's review: corrected values (pad id -> value) replace what was read; the other pads
 * are confirmed as read. The reading counts as the tub's water from then on, and the owner is told
 * (e-mail through the outbox, and the in-app notifications).
 */
export async function markReviewed(user: SessionUser, readingId: string, corrections: Record<string, number>) {
  const notFound = () => new ClientInputError("We could not find that reading among your clients' tubs.", 404);
  if (!isUuid(readingId) || !Object.keys(corrections).every(isUuid)) throw notFound();
  const r = await db.query.reading.findFirst({ where: eq(reading.id, readingId) });
  if (!r || !(await looksAfter(user, r.tubId))) throw notFound();
  if (r.reviewedAt) throw new ClientInputError("This reading has already been reviewed.", 409);
  const now = new Date();
  const changes: string[] = [];
  await db.transaction(async (tx) => {
    const pads = await padsOf(r.id, tx);
    for (const p of pads) {
      const corrected = corrections[p.id];
      if (corrected !== undefined && corrected !== p.readValue) {
        await tx.update(readingPad).set({ confirmedValue: corrected, source: "corrected" }).where(eq(readingPad.id, p.id));
        changes.push(`${analyteName(p.analyte)}: ${p.readValue ?? "no value"} → ${corrected}${p.unit ? ` ${p.unit}` : ""}`);
      } else if (p.confirmedValue === null && p.readValue !== null) {
        await tx.update(readingPad).set({ confirmedValue: p.readValue, source: "confirmed" }).where(eq(readingPad.id, p.id));
      }
    }
    await tx
      .update(reading)
      .set({
        reviewedBy: user.id, reviewedAt: now,
        ...(r.status === "read" ? { status: "confirmed" as const, confirmedBy: user.id, confirmedAt: now } : {}),
      })
      .where(eq(reading.id, r.id));
  });
  const t = await db.query.tub.findFirst({ where: eq(tub.id, r.tubId) });
  const owner = t ? await db.query.user.findFirst({ where: eq(userTable.id, t.ownerId) }) : null;
  if (t && owner && owner.id !== user.id) {
    const pref = await ensurePreferences(owner.id);
    await enqueueEmail(
      reviewedEmail({
        readingId: r.id, tubId: t.id, tubName: t.name, takenAt: r.takenAt, timeZone: t.timeZone, technicianName: user.name, changes,
        recipient: { id: owner.id, name: owner.name, email: owner.email, unsubscribeToken: pref.unsubscribeToken },
      }),
    );
  }
}

// ---------------------------------------------------------------- visit notes

export const NOTES_PAGE_SIZE = 20;

/** One page of a tub's visit notes, newest visit first (years of visits are never sent at once). */
export async function notesFor(t: Tub, pageAsked = 1) {
  const [{ total }] = await db.select({ total: count() }).from(visitNote).where(eq(visitNote.tubId, t.id));
  const page = pageOf(total, NOTES_PAGE_SIZE, pageAsked);
  const rows = await db
    .select({ id: visitNote.id, body: visitNote.body, visitedAt: visitNote.visitedAt, authorId: visitNote.authorId, author: userTable.name })
    .from(visitNote)
    .leftJoin(userTable, eq(userTable.id, visitNote.authorId))
    .where(eq(visitNote.tubId, t.id))
    .orderBy(desc(visitNote.visitedAt), desc(visitNote.id))
    .limit(page.size)
    .offset(page.offset);
  return { rows, page };
}

export async function addNote(user: SessionUser, t: Tub, body: string, visitedAt: Date) {
  await db.insert(visitNote).values({ tubId: t.id, authorId: user.id, body, visitedAt });
}

/** A note of this tub that the user may change: their own, or any note for an admin. */
async function changeableNote(user: SessionUser, t: Tub, noteId: string) {
  if (!isUuid(noteId)) throw new ClientInputError("We could not find that visit note.", 404);
  const n = await db.query.visitNote.findFirst({ where: and(eq(visitNote.id, noteId), eq(visitNote.tubId, t.id)) });
  if (!n) throw new ClientInputError("We could not find that visit note. It may have been deleted.", 404);
  if (n.authorId !== user.id && !can(user, { note: ["edit-any"] })) throw new ClientInputError("Only the person who wrote a visit note can change or delete it.", 403);
  return n;
}

export async function updateNote(user: SessionUser, t: Tub, noteId: string, body: string, visitedAt: Date | null) {
  const n = await changeableNote(user, t, noteId);
  await db.update(visitNote).set({ body, visitedAt: visitedAt ?? n.visitedAt }).where(eq(visitNote.id, n.id));
}

export async function deleteNote(user: SessionUser, t: Tub, noteId: string) {
  const n = await changeableNote(user, t, noteId);
  await db.delete(visitNote).where(eq(visitNote.id, n.id));
}


