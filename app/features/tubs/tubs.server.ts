// Tub settings: create, edit, archive, with the volume helper and the strip batch in use.
import { and, asc, desc, eq, isNotNull, isNull } from "drizzle-orm";
import { z } from "zod";
import { analyteName, celsiusFromFahrenheit, estimateVolumeLitres, litresFromImperialGallons, litresFromUsGallons, resolveTargets, type Guidance, type Parameter, type Range } from "~/chemistry";
import { chartVersion, stripBatch, stripChart, tub } from "~/db/schema";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { likePattern, pageOf } from "~/lib/paging";
import { can } from "~/lib/permissions";
import type { Tub } from "~/lib/tub-access.server";


/** Today's date (YYYY-MM-DD, UTC) for "use by" checks: a batch may be used through its use-by day. */
export const todayIso = (now = new Date()) => now.toISOString().slice(0, 10);

export function batchExpired(expiresOn: string | null | undefined, now = new Date()) {
  return Boolean(expiresOn && expiresOn < todayIso(now));
}

/**
 * Strip batches an owner can choose from: every batch with a current chart version that is
 * still in date. Expired batches are not offered, except the one the tub uses now (`keep`), which
 * is listed flagged so the owner sees why to change it.
 */
export async function listBatches(opts: { keep?: string | null } = {}) {
  const rows = await db
    .select({ id: stripBatch.id, lot: stripBatch.lot, expiresOn: stripBatch.expiresOn, chartName: stripChart.name, currentVersionId: stripBatch.currentVersionId })
    .from(stripBatch)
    .innerJoin(stripChart, eq(stripChart.id, stripBatch.chartId))
    .where(isNull(stripChart.archivedAt))
    .orderBy(asc(stripChart.name), asc(stripBatch.lot));
  return rows
    .filter((r) => r.currentVersionId && (!batchExpired(r.expiresOn) || r.id === opts.keep))
    .map((r) => ({
      id: r.id,
      expired: batchExpired(r.expiresOn),
      label: `${r.chartName} · lot ${r.lot}${r.expiresOn ? (batchExpired(r.expiresOn) ? ` · EXPIRED ${r.expiresOn}: choose a new batch` : ` · use by ${r.expiresOn}`) : ""}`,
    }));
}

/** The chart version a tub's readings use now, or null when no batch is chosen. */
export async function currentChartFor(t: Pick<Tub, "batchId">) {
  if (!t.batchId) return null;
  const batch = await db.query.stripBatch.findFirst({ where: eq(stripBatch.id, t.batchId) });
  if (!batch?.currentVersionId) return null;
  const version = await db.query.chartVersion.findFirst({ where: eq(chartVersion.id, batch.currentVersionId) });
  if (!version) return null;
  return { batch, version };
}

const num = (what: string) =>
  z
    .string()
    .trim()
    .min(1, `Enter the ${what}.`)
    .transform((v) => Number(v.replace(",", ".")))
    .refine((v) => Number.isFinite(v) && v > 0, `The ${what} must be a number above zero.`);

const optionalNum = z
  .string()
  .trim()
  .optional()
  .transform((v) => (v ? Number(v.replace(",", ".")) : undefined));

const tubForm = z.object({
  name: z.string().trim().min(1, "Give the tub a name, e.g. “Garden tub”.").max(80, "Keep the name under 80 characters."),
  volume: num("volume"),
  volumeUnit: z.enum(["L", "USgal", "UKgal"], { message: "Choose litres, US gallons or imperial gallons." }),
  setTemperature: optionalNum,
  temperatureUnit: z.enum(["C", "F"]).optional(),
  bathersPerDay: optionalNum,
  guidance: z.enum(["us_home", "us_public", "uk"], { message: "Choose which guidance the ranges follow." }).optional(),
  seats: optionalNum,
  dimsUnit: z.enum(["cm", "in"]).optional(),
  sanitiser: z.enum(["chlorine", "bromine"], { message: "Choose chlorine or bromine." }),
  batchId: z
    .string()
    .optional()
    .transform((v) => (v ? v : null)),
  timeZone: z.string().trim().min(1).default("UTC"),
  shape: z.enum(["", "round", "square", "rectangular"]).optional(),
  diameter: optionalNum,
  side: optionalNum,
  length: optionalNum,
  width: optionalNum,
  depth: optionalNum,
});

export type TubFormErrors = Partial<Record<string, string>>;

export async function parseTubForm(form: FormData, opts: { currentBatchId?: string | null } = {}) {
  const parsed = tubForm.safeParse(Object.fromEntries(form));
  if (!parsed.success) {
    const fields: TubFormErrors = {};
    for (const issue of parsed.error.issues) fields[String(issue.path[0])] ??= issue.message;
    return { ok: false as const, fields };
  }
  const v = parsed.data;
  const volumeLitres = v.volumeUnit === "USgal" ? litresFromUsGallons(v.volume) : v.volumeUnit === "UKgal" ? litresFromImperialGallons(v.volume) : v.volume;
  if (volumeLitres < 100 || volumeLitres > 20000) {
    return { ok: false as const, fields: { volume: "A hot tub holds between 100 and 20,000 litres (about 26 to 5,300 US gallons). Check the number and the unit." } };
  }
  const fields: TubFormErrors = {};
  let temperatureC: number | undefined;
  if (v.setTemperature !== undefined) {
    const c = v.temperatureUnit === "F" ? celsiusFromFahrenheit(v.setTemperature) : v.setTemperature;
    if (!Number.isFinite(c) || c < 10 || c > 40)
      fields.setTemperature = v.temperatureUnit === "F" ? "Give the running temperature in °F, between 50 and 104 °F (hot tubs stay at or below 104 °F)." : "Give the running temperature in °C, between 10 and 40 °C (hot tubs stay at or below 40 °C).";
    else temperatureC = Math.round(c * 10) / 10;
  }
  let bathersPerDay: number | undefined;
  if (v.bathersPerDay !== undefined) {
    if (!Number.isFinite(v.bathersPerDay) || v.bathersPerDay < 0 || v.bathersPerDay > 200) fields.bathersPerDay = "Bathers per day must be a number from 0 to 200.";
    else bathersPerDay = v.bathersPerDay;
  }
  if (Object.keys(fields).length) return { ok: false as const, fields };
  if (v.batchId) {
    const batches = await listBatches({ keep: opts.currentBatchId });
    if (!batches.some((b) => b.id === v.batchId)) {
      const expired = await db.query.stripBatch.findFirst({ where: eq(stripBatch.id, v.batchId) });
      return { ok: false as const, fields: { batchId: expired && batchExpired(expired.expiresOn) ? "Those strips are past their use-by date, so their colours can no longer be trusted. Choose a batch that is in date." : "Choose a strip batch from the list." } };
    }
  }
  let shape: Record<string, unknown> | null = null;
  if (v.shape && v.depth) {
    const k = v.dimsUnit === "in" ? 2.54 : 1;
    const cm = (x: number | undefined) => (x === undefined ? undefined : x * k);
    const dims = v.shape === "round" ? { diameter: cm(v.diameter) } : v.shape === "square" ? { side: cm(v.side) } : { length: cm(v.length), width: cm(v.width) };
    try {
      const estimate = estimateVolumeLitres(v.shape, dims as never, cm(v.depth)!, { seats: v.seats ?? 0 });
      shape = { shape: v.shape, insideDimsCm: dims, depthCm: cm(v.depth), seats: v.seats ?? 0, estimateLitres: Math.round(estimate) };
    } catch {
      shape = null;
    }
  }
  return {
    ok: true as const,
    values: {
      name: v.name,
      volumeLitres,
      volumeUnit: v.volumeUnit,
      sanitiser: v.sanitiser,
      batchId: v.batchId,
      timeZone: v.timeZone,
      shape,
      ...(temperatureC !== undefined ? { temperatureC } : {}),
      ...(bathersPerDay !== undefined ? { bathersPerDay } : {}),
      ...(v.guidance ? { guidance: v.guidance } : {}),
    },
  };
}

export async function createTub(user: SessionUser, values: Omit<typeof tub.$inferInsert, "ownerId">) {
  const [row] = await db.insert(tub).values({ ...values, ownerId: user.id }).returning();
  return row;
}

export async function updateTub(tubId: string, values: Partial<typeof tub.$inferInsert>) {
  await db.update(tub).set(values).where(eq(tub.id, tubId));
}

export async function setArchived(tubId: string, archived: boolean) {
  await db.update(tub).set({ archivedAt: archived ? new Date() : null }).where(eq(tub.id, tubId));
}

export type TargetRow = { parameter: string; label: string; min: number; max: number; aim: number; source: string };

/** The tub's target ranges (defaults with its overrides), leaving out the sanitiser it does not use. */
export function tubTargets(t: Pick<Tub, "sanitiser" | "targets"> & Partial<Pick<Tub, "guidance">>): TargetRow[] {
  let ranges;
  try {
    ranges = resolveTargets(t.sanitiser, (t.targets ?? {}) as Partial<Record<Parameter, Partial<Range>>>, (t.guidance ?? "us_home") as Guidance);
  } catch {
    ranges = resolveTargets(t.sanitiser);
  }
  return (Object.entries(ranges) as [Parameter, Range][])
    .filter(([, r]) => r.max > 0)
    .map(([p, r]) => ({ parameter: p, label: analyteName(p), min: r.min, max: r.max, aim: r.aim, source: r.source }));
}

export function displayVolume(t: Pick<Tub, "volumeLitres" | "volumeUnit">) {
  if (t.volumeUnit === "USgal") return `${Math.round(t.volumeLitres / 3.785411784)} US gal (${Math.round(t.volumeLitres)} L)`;
  if (t.volumeUnit === "UKgal") return `${Math.round(t.volumeLitres / 4.54609)} imperial gal (${Math.round(t.volumeLitres)} L)`;
  return `${Math.round(t.volumeLitres)} L`;
}

export const TUB_PAGE_SIZE = 24;

/**
 * One page of the tubs a user looks after: their own first, then their clients' (a technician's
 * shared tubs; an admin's: everyone's), by name; `q` searches tub and owner names.
 */
export async function tubListPage(user: SessionUser, opts: { page?: number; q?: string } = {}) {
  const where = `t.archived_at is null
     and (t.owner_id = $1 or $2::boolean
          or ($3::boolean and exists (select 1 from tub_access a where a.tub_id = t.id and a.technician_id = $1 and a.revoked_at is null)))
     and ($4::text is null or t.name ilike $4 or o.name ilike $4)`;
  const params = [user.id, can(user, { tub: ["all"] }), can(user, { tub: ["shared"] }), opts.q ? likePattern(opts.q) : null];
  const asked = Number.isInteger(opts.page) && opts.page! >= 1 && opts.page! <= 1_000_000 ? opts.page! : 1;
  // The count and the page in one round trip: a page past the end gives the first page, as pageOf does.
  const found = (
    await db.$client.query<{ total: number; own: number; id: string | null; name: string; volumeLitres: number; sanitiser: "chlorine" | "bromine"; mine: boolean; ownerName: string }>({
      name: "dipwell-tub-list-page",
      text: `with listed as (
          select t.id, t.name, t.volume_litres, t.sanitiser, t.owner_id, o.name as owner_name
            from tub t join "user" o on o.id = t.owner_id
           where ${where}
        ), totals as (
          select count(*)::int as total, count(*) filter (where owner_id = $1)::int as own from listed
        )
        select totals.total, totals.own, p.id, p.name, p.volume_litres as "volumeLitres", p.sanitiser, p.mine, p.owner_name as "ownerName"
          from totals
          left join lateral (
            select l.*, l.owner_id = $1 as mine from listed l
             order by (l.owner_id = $1) desc, l.name, l.id
             limit $5 offset (case when $6::int < totals.total then $6::int else 0 end)
          ) p on true
         order by p.mine desc, p.name, p.id`,
      values: [...params, TUB_PAGE_SIZE, (asked - 1) * TUB_PAGE_SIZE],
    })
  ).rows;
  const { total, own } = found[0];
  const page = pageOf(total, TUB_PAGE_SIZE, asked);
  const rows = found.flatMap(({ total: _t, own: _o, id, ...r }) => (id === null ? [] : [{ id, ...r }]));
  return { tubs: rows, page, own };
}

/** The user's own archived tubs (a short list: at most 100, newest first). */
export async function archivedTubs(user: SessionUser) {
  return db
    .select({ id: tub.id, name: tub.name })
    .from(tub)
    .where(and(eq(tub.ownerId, user.id), isNotNull(tub.archivedAt)))
    .orderBy(desc(tub.archivedAt))
    .limit(100);
}
