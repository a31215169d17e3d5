// A visit report for one tub, on one printed page or two: the readings of a bounded period with
// each value against its target, the treatments, the current plan (with its cautions) and the
// visit notes. Every list is bounded; the period is one of a few fixed lengths.
import type { Units } from "~/chemistry";
import { tubPlan } from "~/features/plan/plan.server";
import { db } from "~/lib/db.server";
import { formatDateTime, formatDay } from "~/lib/dates";
import { rangeStatus, type RangeStatus } from "~/lib/range-status";
import type { Tub } from "~/lib/tub-access.server";
import { REPORT_LIMITS } from "./report-periods";
import { analyteName } from "~/chemistry";
import { displayVolume, tubTargets } from "./tubs.server";

export { REPORT_LIMITS, REPORT_PERIODS, reportDays } from "./report-periods";

type PadRow = { analyte: string; value: number | null; unit: string | null };

export async function visitReport(t: Tub, opts: { days: number; locale: string; units: Units; now?: Date }) {
  const now = opts.now ?? new Date();
  const since = new Date(now.getTime() - opts.days * 86_400_000);
  const zone = t.timeZone;
  const when = (d: Date) => formatDateTime(d, opts.locale, zone);
  const [readings, readingCount, treatments, treatmentCount, notes, noteCount, owner, plan] = await Promise.all([
    // Pads gathered per reading in SQL; the tub-and-time index bounds the scan.
    db.$client.query<{ id: string; takenAt: Date; status: string; unsure: boolean; pads: PadRow[] | null }>(
      `select r.id, r.taken_at as "takenAt", r.status, (r.needs_review and r.reviewed_at is null and r.status <> 'confirmed') as unsure,
              (select json_agg(json_build_object('analyte', p.analyte, 'value', coalesce(p.confirmed_value, p.read_value), 'unit', p.unit) order by p.analyte)
                 from reading_pad p where p.reading_id = r.id) as pads
         from reading r
        where r.tub_id = $1 and r.taken_at >= $2 and r.status <> 'pending' and r.status <> 'failed'
        order by r.taken_at desc, r.id desc limit $3`,
      [t.id, since, REPORT_LIMITS.readings],
    ),
    db.$client.query<{ n: number }>(`select count(*)::int as n from reading where tub_id = $1 and taken_at >= $2 and status <> 'pending' and status <> 'failed'`, [t.id, since]),
    db.$client.query<{ id: string; addedAt: Date; productName: string; chemical: string; parameter: string | null; amount: number; unit: string; shock: boolean; note: string | null; by: string | null }>(
      `select x.id, x.added_at as "addedAt", x.product_name as "productName", x.chemical, x.parameter, x.amount, x.unit, x.shock, x.note, u.name as by
         from treatment x left join "user" u on u.id = x.added_by
        where x.tub_id = $1 and x.added_at >= $2
        order by x.added_at desc, x.id desc limit $3`,
      [t.id, since, REPORT_LIMITS.treatments],
    ),
    db.$client.query<{ n: number }>(`select count(*)::int as n from treatment where tub_id = $1 and added_at >= $2`, [t.id, since]),
    db.$client.query<{ id: string; visitedAt: Date; body: string; author: string | null }>(
      `select n.id, n.visited_at as "visitedAt", n.body, u.name as author
         from visit_note n left join "user" u on u.id = n.author_id
        where n.tub_id = $1 and n.visited_at >= $2
        order by n.visited_at desc, n.id desc limit $3`,
      [t.id, since, REPORT_LIMITS.notes],
    ),
    db.$client.query<{ n: number }>(`select count(*)::int as n from visit_note where tub_id = $1 and visited_at >= $2`, [t.id, since]),
    db.$client.query<{ name: string }>(`select name from "user" where id = $1`, [t.ownerId]),
    tubPlan(t, { now, units: opts.units, locale: opts.locale }),
  ]);

  const targets = tubTargets(t);
  const band = new Map(targets.map((x) => [x.parameter, { min: x.min, max: x.max }]));
  // Columns: the parameters these readings measured, in the order of the tub's targets.
  const seen = new Set(readings.rows.flatMap((r) => (r.pads ?? []).map((p) => p.analyte)));
  const order = [...targets.map((x) => x.parameter).filter((p) => seen.has(p)), ...[...seen].filter((a) => !band.has(a)).sort()];
  const units = new Map<string, string>();
  for (const r of readings.rows) for (const p of r.pads ?? []) if (p.unit && !units.has(p.analyte)) units.set(p.analyte, p.unit);

  return {
    tub: {
      id: t.id, name: t.name, owner: owner.rows[0]?.name ?? "", volume: displayVolume(t), sanitiser: t.sanitiser, timeZone: zone,
      fillDate: t.fillDate ? formatDay(t.fillDate, opts.locale) : null,
    },
    period: { days: opts.days, from: formatDay(since, opts.locale), to: formatDay(now, opts.locale), printed: when(now) },
    columns: order.map((a) => ({ analyte: a, label: analyteName(a), unit: units.get(a) ?? "", target: band.get(a) ?? null })),
    readings: {
      total: readingCount.rows[0]?.n ?? 0,
      rows: readings.rows.map((r) => {
        const pads = new Map((r.pads ?? []).map((p) => [p.analyte, p.value]));
        return {
          id: r.id, when: when(r.takenAt), confirmed: r.status === "confirmed", unsure: r.unsure,
          values: order.map((a) => {
            const v = pads.get(a) ?? null;
            return { analyte: a, value: v, status: rangeStatus(v, band.get(a)) as RangeStatus };
          }),
        };
      }),
    },
    treatments: {
      total: treatmentCount.rows[0]?.n ?? 0,
      rows: treatments.rows.map((x) => ({
        id: x.id, when: when(x.addedAt), product: x.productName, chemical: x.chemical, for: x.parameter ? analyteName(x.parameter) : null,
        amount: `${x.amount} ${x.unit}`, shock: x.shock, note: x.note, by: x.by,
      })),
    },
    notes: {
      total: noteCount.rows[0]?.n ?? 0,
      rows: notes.rows.map((n) => ({ id: n.id, day: formatDay(n.visitedAt, opts.locale), body: n.body, author: n.author ?? "" })),
    },
    plan: {
      source: plan.source,
      readingWhen: plan.reading ? when(new Date(plan.reading.takenAt)) : null,
      readingConfirmed: plan.reading?.confirmed ?? false,
      headline: plan.plan?.headline ?? null,
      steps: plan.plan?.steps ?? [],
      usable: plan.plan?.predicted.usableWords ?? null,
      error: plan.error,
      timer: plan.timer ? { product: plan.timer.productName, until: `${plan.timer.retestDay}, ${plan.timer.retestClock}` } : null,
    },
  };
}

export type VisitReport = Awaited<ReturnType<typeof visitReport>>;
