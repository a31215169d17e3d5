// Strip charts, their immutable versions and the batches that read with them; calibration
// from a chart photo, from reference solutions and from owners' corrections. Nothing here
// changes the chart a batch reads with except saveVersion, which adds a new version row.
import { and, asc, desc, eq, inArray, isNotNull, max } from "drizzle-orm";
import { isUuid } from "~/lib/ids";
import { RefitError, refitFromSolutions } from "~/reading/refit";
import { CalibrationError, proposeFromSample, sampleChartPhoto, type ChartGrid, type Quad } from "~/reading/calibrate";
import { ChartError, exportChart, parseChart, ReadingError, type StripChart } from "~/reading";
import { deltaE2000, hexToLab, labToHex, type Lab } from "~/reading/colour";
import { chartVersion, photo, reading, readingPad, stripBatch, stripChart } from "~/db/schema";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { inspectUpload, PhotoError, presignPhoto, receivePhoto, withStorage, type PhotoCheck } from "~/features/photos/intake.server";
import { readObject } from "~/lib/storage.server";

/** A refusal shown to the technician in plain words. */
export class ChartInputError extends Error {
  constructor(message: string, public status = 400) {
    super(message);
  }
}

const notFound = (what: string) => new Response(JSON.stringify({ message: `We could not find that ${what}.` }), { status: 404, headers: { "content-type": "application/json" } });

/** Too close to tell apart on a phone photo: below about 3 ΔE00 neighbouring swatches blur into each other (common practice). */
export const TOO_CLOSE_DELTA_E = 3;

export function blankChart(name: string): object {
  return {
    format: "strip-chart/1",
    name,
    strip: { widthMm: 6, lengthMm: 76, color: "#f5f4ee" },
    pads: [
      { analyte: "ph", label: "pH", unit: "pH", centerMm: 5, sizeMm: 5.5, swatches: [{ value: 6.8, color: "#eaa446" }, { value: 7.2, color: "#e5813f" }, { value: 7.6, color: "#da5e45" }, { value: 8.0, color: "#c84458" }] },
    ],
  };
}

/** Parses a strip-chart/1 document from text or JSON; ChartInputError with plain words otherwise. */
export function readChartDocument(input: unknown): StripChart {
  let json = input;
  if (typeof input === "string") {
    try {
      json = JSON.parse(input);
    } catch {
      throw new ChartInputError("This file is not a strip-chart/1 chart: it is not JSON text.");
    }
  }
  try {
    return parseChart(json);
  } catch (e) {
    if (e instanceof ChartError) throw new ChartInputError(e.message);
    throw e;
  }
}

export async function listCharts() {
  const charts = await db.select().from(stripChart).orderBy(asc(stripChart.name));
  const batches = charts.length ? await db.select().from(stripBatch).where(inArray(stripBatch.chartId, charts.map((c) => c.id))).orderBy(asc(stripBatch.lot)) : [];
  const versions = charts.length
    ? await db.select({ id: chartVersion.id, version: chartVersion.version, chartId: chartVersion.chartId }).from(chartVersion).where(inArray(chartVersion.chartId, charts.map((c) => c.id)))
    : [];
  return charts.map((c) => ({
    id: c.id,
    name: c.name,
    versions: versions.filter((v) => v.chartId === c.id).length,
    batches: batches
      .filter((b) => b.chartId === c.id)
      .map((b) => ({ id: b.id, lot: b.lot, expiresOn: b.expiresOn, currentVersion: versions.find((v) => v.id === b.currentVersionId)?.version ?? null })),
  }));
}

async function nextVersionNumber(chartId: string, tx: Pick<typeof db, "select"> = db) {
  const [row] = await tx.select({ n: max(chartVersion.version) }).from(chartVersion).where(eq(chartVersion.chartId, chartId));
  return (row?.n ?? 0) + 1;
}

export async function createChart(user: Pick<SessionUser, "id">, input: { name: string; lot: string; expiresOn: string | null; definition: unknown }) {
  const chart = readChartDocument(input.definition ?? blankChart(input.name));
  const doc = { ...(exportChart(chart) as Record<string, unknown>), name: input.name || chart.name };
  return db.transaction(async (tx) => {
    const [c] = await tx.insert(stripChart).values({ name: input.name || chart.name || "Untitled chart", createdBy: user.id }).returning();
    const [b] = await tx.insert(stripBatch).values({ chartId: c.id, lot: input.lot, expiresOn: input.expiresOn, createdBy: user.id }).returning();
    const [v] = await tx
      .insert(chartVersion)
      .values({ chartId: c.id, batchId: b.id, version: 1, definition: doc, source: input.definition ? "import" : "editor", note: input.definition ? "Imported from a strip-chart/1 file" : "New chart", createdBy: user.id })
      .returning();
    await tx.update(stripBatch).set({ currentVersionId: v.id }).where(eq(stripBatch.id, b.id));
    return { chartId: c.id, batchId: b.id, versionId: v.id };
  });
}

export async function loadChart(chartId: string | undefined) {
  if (!isUuid(chartId)) throw notFound("chart");
  const c = await db.query.stripChart.findFirst({ where: eq(stripChart.id, chartId) });
  if (!c) throw notFound("chart");
  const batches = await db.select().from(stripBatch).where(eq(stripBatch.chartId, c.id)).orderBy(asc(stripBatch.lot));
  const versions = await db.select().from(chartVersion).where(eq(chartVersion.chartId, c.id)).orderBy(desc(chartVersion.version));
  return { chart: c, batches, versions };
}

export async function loadBatch(chartId: string | undefined, batchId: string | undefined) {
  const found = await loadChart(chartId);
  const batch = found.batches.find((b) => b.id === batchId);
  if (!batch) throw notFound("strip batch");
  const current = found.versions.find((v) => v.id === batch.currentVersionId) ?? found.versions[0];
  if (!current) throw notFound("chart version");
  return { ...found, batch, current, currentChart: parseChart(current.definition) };
}

export async function addBatch(user: Pick<SessionUser, "id">, chartId: string, input: { lot: string; expiresOn: string | null; versionId?: string }) {
  const { versions, batches } = await loadChart(chartId);
  if (batches.some((b) => b.lot.toLowerCase() === input.lot.toLowerCase())) throw new ChartInputError(`This chart already has a batch with lot number “${input.lot}”.`);
  const from = versions.find((v) => v.id === input.versionId) ?? versions[0];
  const [b] = await db.insert(stripBatch).values({ chartId, lot: input.lot, expiresOn: input.expiresOn, currentVersionId: from?.id ?? null, createdBy: user.id }).returning();
  return b;
}

export async function updateBatch(chartId: string, batchId: string, input: { lot: string; expiresOn: string | null }) {
  const { batches } = await loadChart(chartId);
  if (!batches.some((b) => b.id === batchId)) throw notFound("strip batch");
  if (batches.some((b) => b.id !== batchId && b.lot.toLowerCase() === input.lot.toLowerCase())) throw new ChartInputError(`This chart already has a batch with lot number “${input.lot}”.`);
  await db.update(stripBatch).set({ lot: input.lot, expiresOn: input.expiresOn }).where(eq(stripBatch.id, batchId));
}

export const SOURCES = { editor: "Edited by hand", import: "Imported file", photo: "Chart photo", solutions: "Reference solutions", corrections: "Owners' corrections" } as const;
export type VersionSource = keyof typeof SOURCES;

/**
 * Saves a new immutable version for a batch and makes it the batch's current chart. The
 * definition is validated first; on any error nothing changes.
 */
export async function saveVersion(user: Pick<SessionUser, "id">, chartId: string, batchId: string, definition: unknown, source: VersionSource, note?: string) {
  const chart = readChartDocument(definition);
  const { batches } = await loadChart(chartId);
  if (!batches.some((b) => b.id === batchId)) throw notFound("strip batch");
  const doc = exportChart(chart);
  return db.transaction(async (tx) => {
    const version = await nextVersionNumber(chartId, tx);
    const [v] = await tx.insert(chartVersion).values({ chartId, batchId, version, definition: doc, source, note: note || SOURCES[source], createdBy: user.id }).returning();
    await tx.update(stripBatch).set({ currentVersionId: v.id }).where(eq(stripBatch.id, batchId));
    return v;
  });
}

export async function versionDocument(versionId: string | undefined) {
  if (!isUuid(versionId)) throw notFound("chart version");
  const v = await db.query.chartVersion.findFirst({ where: eq(chartVersion.id, versionId) });
  if (!v) throw notFound("chart version");
  return { version: v, document: exportChart(parseChart(v.definition)) };
}

/** ΔE00 between neighbouring swatches of every pad, with the pairs too close to tell apart. */
export function neighbourDistances(chart: { pads: { analyte: string; label?: string; swatches: { value: number; color: string }[] }[] }) {
  return chart.pads.map((p) => ({
    analyte: p.analyte,
    steps: p.swatches.slice(1).map((s, i) => {
      const a = p.swatches[i];
      let d = NaN;
      try {
        d = deltaE2000(hexToLab(a.color), hexToLab(s.color));
      } catch {
        /* an unfinished colour in the editor */
      }
      return { from: a.value, to: s.value, deltaE: d, tooClose: Number.isFinite(d) && d < TOO_CLOSE_DELTA_E };
    }),
  }));
}

function closeWarnings(doc: Parameters<typeof neighbourDistances>[0]) {
  return neighbourDistances(doc).flatMap((p) =>
    p.steps.filter((st) => st.tooClose).map((st) => `${p.analyte.replace(/_/g, " ")}: the swatches for ${st.from} and ${st.to} are only ${st.deltaE.toFixed(1)} ΔE00 apart, too close to tell apart on a photo.`),
  );
}

// ---------------------------------------------------------------- chart and reference-solution photos

// Both come in through the one photo intake (features/photos): a presigned upload under the
// batch's upload prefix, with the type and length signed, then the server's checks on the bytes.

/** A photo refusal becomes the chart screen's refusal, in the same words and status. */
export async function chartIntake<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (error) {
    if (error instanceof PhotoError) throw new ChartInputError(error.message, error.status);
    throw error;
  }
}

/** A presigned PUT for one photo of this batch (its chart card or a reference-solution strip). */
export function presignBatchPhoto(batchId: string, contentType: string, size: number) {
  return presignPhoto({ batchId }, contentType, size);
}

/** Below this many pixels on a side, the chart card's swatches are too few pixels to sample (common practice). */
export const MIN_CHART_PHOTO_SIDE = 300;

const chartPhotoSize: PhotoCheck = ({ width, height }) =>
  Math.min(width, height) < MIN_CHART_PHOTO_SIDE
    ? new PhotoError("too_small", `This photo is too small (${width} × ${height} pixels) to sample the chart. Use a photo at least ${MIN_CHART_PHOTO_SIDE} pixels on each side.`)
    : null;

/**
 * Registers an uploaded photo of the batch's printed chart: the intake's checks (size limit, real
 * type, one decode, hash, kept copy under the batch's key), then the photo row. The same bytes
 * again give the same photo.
 */
export async function registerChartPhoto(user: Pick<SessionUser, "id">, batchId: string, key: string) {
  const received = await receivePhoto({ batchId }, key, chartPhotoSize);
  const mine = and(eq(photo.batchId, batchId), eq(photo.sha256, received.sha256), eq(photo.purpose, "chart"));
  const existing = await db.query.photo.findFirst({ where: mine });
  if (existing) return existing;
  const [row] = await db
    .insert(photo)
    .values({ tubId: null, batchId, purpose: "chart", uploaderId: user.id, s3Key: received.s3Key, contentType: received.contentType, sizeBytes: received.sizeBytes, sha256: received.sha256, width: received.width, height: received.height })
    .onConflictDoNothing()
    .returning();
  return row ?? (await db.query.photo.findFirst({ where: mine }))!;
}

/**
 * The bytes of one uploaded reference-solution photo, checked by the intake's rules. It is read
 * for the refit and not kept: no photo row, no kept copy; the upload object goes with the sweep
 * (so the technician can correct a known value and refit again without sending it again).
 */
export async function solutionPhoto(batchId: string, key: string) {
  return (await inspectUpload({ batchId }, key)).bytes;
}

/** A strip batch by its id alone (the photo endpoints' URLs name only the batch). */
export async function batchById(batchId: string | undefined) {
  if (!isUuid(batchId)) return null;
  return (await db.query.stripBatch.findFirst({ where: eq(stripBatch.id, batchId) })) ?? null;
}

export async function chartPhoto(photoId: string | undefined, batchId?: string) {
  if (!isUuid(photoId)) return null;
  const p = await db.query.photo.findFirst({ where: and(eq(photo.id, photoId), eq(photo.purpose, "chart")) });
  if (!p || (batchId && p.batchId !== batchId)) return null;
  return p;
}

export async function latestChartPhoto(batchId: string) {
  const [p] = await db.select().from(photo).where(and(eq(photo.batchId, batchId), eq(photo.purpose, "chart"))).orderBy(desc(photo.createdAt)).limit(1);
  return p ?? null;
}

/** A proposed chart version; `pad` (chart pad index) is set for an analyte read from several pads. */
export type Proposal = { definition: object; changes: { analyte: string; value: number; from: string; to: string; deltaE: number; pad?: number }[]; warnings: string[] };

/** Samples the grid on the stored chart photo and proposes swatch colours (nothing is saved). */
export async function proposeFromChartPhoto(chart: StripChart, photoId: string, batchId: string, grid: ChartGrid, white: Quad): Promise<Proposal> {
  const p = await chartPhoto(photoId, batchId);
  if (!p) throw new ChartInputError("Upload a photo of this batch's colour chart first.");
  const bytes = await chartIntake(() => withStorage(() => readObject(p.s3Key)));
  try {
    const sample = await sampleChartPhoto(bytes, grid, white);
    const { definition, changes } = proposeFromSample(chart, sample);
    return { definition, changes, warnings: [...sample.warnings, ...closeWarnings(definition)] };
  } catch (e) {
    if (e instanceof CalibrationError || e instanceof ReadingError) throw new ChartInputError(e.message);
    throw e;
  }
}

// ---------------------------------------------------------------- reference solutions

type Doc = { format: string; name: string; strip: { widthMm: number; lengthMm: number; color: string }; pads: { analyte: string; label: string; unit: string; centerMm: number; sizeMm: number; swatches: { value: number; color: string }[] }[] };

function setSwatch(doc: Doc, analyte: string, value: number, color: string) {
  const pad = doc.pads.find((p) => p.analyte === analyte);
  if (!pad) return null;
  const at = pad.swatches.findIndex((s) => Math.abs(s.value - value) < 1e-9);
  const from = at >= 0 ? pad.swatches[at].color : null;
  if (at >= 0) pad.swatches[at] = { value, color };
  else {
    pad.swatches.push({ value, color });
    pad.swatches.sort((a, b) => a.value - b.value);
  }
  return from;
}

/**
 * Photos of strips dipped in solutions of known value: the reader's refit (app/reading/refit.ts,
 * the same function as the calibrate-chart command) proposes the new swatches.
 */
export async function proposeFromSolutions(chart: StripChart, samples: { photo: Buffer; known: Record<string, number> }[]): Promise<Proposal> {
  try {
    const r = await refitFromSolutions(chart, samples);
    const multi = new Set(chart.pads.filter((p, i) => chart.pads.findIndex((q) => q.analyte === p.analyte) !== i).map((p) => p.analyte));
    const changes: Proposal["changes"] = r.changes.map((c) => ({
      analyte: c.analyte,
      value: c.value,
      from: c.from ?? "(new swatch)",
      to: c.to,
      deltaE: c.deltaE ?? NaN,
      ...(multi.has(c.analyte) ? { pad: c.pad } : {}),
    }));
    const skipped = r.skipped.map((k) => `${k.sample} was not used: ${k.reason}`);
    return { definition: r.definition, changes, warnings: [...skipped, ...r.warnings, ...closeWarnings(r.definition)] };
  } catch (e) {
    if (e instanceof RefitError || e instanceof ChartError) throw new ChartInputError(e.message);
    throw e;
  }
}

const avg = (a: number[]) => a.reduce((s, x) => s + x, 0) / a.length;

// ---------------------------------------------------------------- owners' corrections

/**
 * Per pad of this batch: how far what the reader saw lies from what owners confirmed, and
 * for values that owners confirmed at least twice, the colour the strips really showed.
 */
export async function correctionsReport(chart: StripChart, batchId: string) {
  const rows = await db
    .select({ analyte: readingPad.analyte, readValue: readingPad.readValue, confirmedValue: readingPad.confirmedValue, lab: readingPad.lab, source: readingPad.source })
    .from(readingPad)
    .innerJoin(reading, eq(reading.id, readingPad.readingId))
    .where(and(eq(reading.batchId, batchId), isNotNull(readingPad.confirmedValue), isNotNull(readingPad.readValue)));
  const doc = exportChart(chart) as Doc;
  const changes: Proposal["changes"] = [];
  const firstPads = chart.pads.filter((p, i) => chart.pads.findIndex((q) => q.analyte === p.analyte) === i);
  const pads = firstPads.map((p) => {
    const mine = rows.filter((r) => r.analyte === p.analyte);
    const corrected = mine.filter((r) => r.confirmedValue !== r.readValue);
    const offsets = mine.map((r) => (r.confirmedValue ?? 0) - (r.readValue ?? 0));
    const bySwatch = p.swatches.map((s) => {
      const labs = mine.filter((r) => Math.abs((r.confirmedValue ?? NaN) - s.value) < 1e-9 && isLab(r.lab)).map((r) => r.lab as Lab);
      if (labs.length < 2) return { value: s.value, n: labs.length, seen: null as string | null, deltaE: null as number | null };
      const mean = { l: avg(labs.map((l) => l.l)), a: avg(labs.map((l) => l.a)), b: avg(labs.map((l) => l.b)) };
      return { value: s.value, n: labs.length, seen: labToHex(mean), deltaE: deltaE2000(s.lab, mean) };
    });
    // An analyte read from several pads keeps one colour per pad; owners' confirmations of the
    // joint value cannot say which pad was off, so only single-pad analytes get proposals here.
    const onePad = chart.pads.filter((q) => q.analyte === p.analyte).length === 1;
    for (const b of bySwatch) {
      if (onePad && b.seen && b.deltaE !== null && b.deltaE >= 1) {
        const from = setSwatch(doc, p.analyte, b.value, b.seen);
        changes.push({ analyte: p.analyte, value: b.value, from: from ?? "", to: b.seen, deltaE: b.deltaE });
      }
    }
    return {
      analyte: p.analyte,
      label: p.label,
      unit: p.unit,
      n: mine.length,
      corrected: corrected.length,
      meanOffset: offsets.length ? avg(offsets) : null,
      bySwatch,
    };
  });
  let valid = true;
  try {
    readChartDocument(doc);
  } catch {
    valid = false;
  }
  return { pads, proposal: changes.length && valid ? ({ definition: doc, changes, warnings: [] } as Proposal) : null };
}

function isLab(x: unknown): x is Lab {
  const l = x as Lab;
  return !!l && typeof l.l === "number" && typeof l.a === "number" && typeof l.b === "number";
}
