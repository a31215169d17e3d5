// Dipwell's data model. Pure table definitions: this file imports nothing but
// drizzle-orm, so drizzle-kit, the app, the worker and the tests can all load it.
//
// The first four tables are the ones better-auth reads and writes (with the
// admin plugin's role/ban columns); their column names follow its documented
// schema. Everything after them is Dipwell's own.
import { sql } from "drizzle-orm";
import {
  boolean,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  smallint,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";

const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();
const updatedAt = () =>
  timestamp("updated_at", { withTimezone: true })
    .notNull()
    .defaultNow()
    .$onUpdate(() => new Date());

// ---------------------------------------------------------------- sign-in

export const user = pgTable("user", {
  id: text("id").primaryKey(),
  name: text("name").notNull(),
  email: text("email").notNull().unique(),
  emailVerified: boolean("email_verified").notNull().default(false),
  image: text("image"),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
  // admin plugin: "owner" | "technician" | "admin"
  role: text("role").notNull().default("owner"),
  banned: boolean("banned").default(false),
  banReason: text("ban_reason"),
  banExpires: timestamp("ban_expires", { withTimezone: true }),
  /** amounts in "metric" (g, mL, L, °C) or "us" (oz, fl oz, US gal, °F) */
  units: text("units").notNull().default("metric"),
});

export const session = pgTable(
  "session",
  {
    id: text("id").primaryKey(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    token: text("token").notNull().unique(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
    ipAddress: text("ip_address"),
    userAgent: text("user_agent"),
    userId: text("user_id")
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    impersonatedBy: text("impersonated_by"),
  },
  (t) => [index("session_user_idx").on(t.userId)],
);

export const account = pgTable(
  "account",
  {
    id: text("id").primaryKey(),
    accountId: text("account_id").notNull(),
    providerId: text("provider_id").notNull(),
    userId: text("user_id")
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    accessToken: text("access_token"),
    refreshToken: text("refresh_token"),
    idToken: text("id_token"),
    accessTokenExpiresAt: timestamp("access_token_expires_at", { withTimezone: true }),
    refreshTokenExpiresAt: timestamp("refresh_token_expires_at", { withTimezone: true }),
    scope: text("scope"),
    password: text("password"),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index("account_user_idx").on(t.userId)],
);

export const verification = pgTable(
  "verification",
  {
    id: text("id").primaryKey(),
    identifier: text("identifier").notNull(),
    value: text("value").notNull(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index("verification_identifier_idx").on(t.identifier)],
);

/**
 * Password attempts per client address and per account, in fixed windows, shared
 * by every app server (app/lib/sign-in-limit.server.ts).
 */
export const passwordAttempt = pgTable(
  "password_attempt",
  {
    key: text("key").primaryKey(),
    attempts: integer("attempts").notNull().default(0),
    windowStart: timestamp("window_start", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("password_attempt_window_idx").on(t.windowStart)],
);

// ---------------------------------------------------------------- strip charts

/** A colour chart family, e.g. "Six-pad spa strip". Its colours live in versions. */
export const stripChart = pgTable("strip_chart", {
  id: uuid("id").primaryKey().defaultRandom(),
  name: text("name").notNull(),
  createdBy: text("created_by").references(() => user.id, { onDelete: "set null" }),
  createdAt: createdAt(),
  archivedAt: timestamp("archived_at", { withTimezone: true }),
});

/** An immutable version of a chart: the whole strip-chart/1 document. */
export const chartVersion = pgTable(
  "chart_version",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    chartId: uuid("chart_id")
      .notNull()
      .references(() => stripChart.id, { onDelete: "cascade" }),
    batchId: uuid("batch_id"),
    version: integer("version").notNull(),
    /** strip-chart/1 JSON, validated by app/reading/chart.ts before it is stored. */
    definition: jsonb("definition").notNull(),
    /** how the colours were made: import, editor, chart photo, reference solutions, owners' corrections */
    source: text("source").notNull().default("editor"),
    note: text("note"),
    createdBy: text("created_by").references(() => user.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("chart_version_number_idx").on(t.chartId, t.version)],
);

/** A production lot of strips. Each batch reads with its own current chart version. */
export const stripBatch = pgTable(
  "strip_batch",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    chartId: uuid("chart_id")
      .notNull()
      .references(() => stripChart.id, { onDelete: "cascade" }),
    lot: text("lot").notNull(),
    expiresOn: date("expires_on"),
    currentVersionId: uuid("current_version_id").references(() => chartVersion.id, {
      onDelete: "set null",
    }),
    createdBy: text("created_by").references(() => user.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("strip_batch_lot_idx").on(t.chartId, t.lot)],
);

// ---------------------------------------------------------------- tubs

export const sanitiserEnum = pgEnum("sanitiser", ["chlorine", "bromine"]);

export const tub = pgTable(
  "tub",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ownerId: text("owner_id")
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    volumeLitres: doublePrecision("volume_litres").notNull(),
    /** the unit the owner entered the volume in, for display */
    volumeUnit: text("volume_unit").notNull().default("L"),
    sanitiser: sanitiserEnum("sanitiser").notNull(),
    fillDate: date("fill_date"),
    timeZone: text("time_zone").notNull().default("UTC"),
    temperatureC: doublePrecision("temperature_c").notNull().default(38),
    bathersPerDay: doublePrecision("bathers_per_day").notNull().default(2),
    /** the strip batch the owner is using now */
    batchId: uuid("batch_id").references(() => stripBatch.id, { onDelete: "set null" }),
    /** per-tub target overrides: { free_chlorine: { min, max }, ... } */
    targets: jsonb("targets").notNull().default(sql`'{}'::jsonb`),
    /** shape and inside dimensions the volume was estimated from, if any */
    shape: jsonb("shape"),
    testEveryDays: integer("test_every_days").notNull().default(2),
    /** which published guidance sets the default ranges: "us_home", "us_public" or "uk" */
    guidance: text("guidance").notNull().default("us_home"),
    firstFillCompletedAt: timestamp("first_fill_completed_at", { withTimezone: true }),
    archivedAt: timestamp("archived_at", { withTimezone: true }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index("tub_owner_idx").on(t.ownerId)],
);

/** A technician looking after a client's tub. Revoked rows are kept for the record. */
export const tubAccess = pgTable(
  "tub_access",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    tubId: uuid("tub_id")
      .notNull()
      .references(() => tub.id, { onDelete: "cascade" }),
    technicianId: text("technician_id")
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    grantedBy: text("granted_by").references(() => user.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [
    uniqueIndex("tub_access_active_idx")
      .on(t.tubId, t.technicianId)
      .where(sql`revoked_at is null`),
    index("tub_access_technician_idx").on(t.technicianId),
  ],
);

/** An owner's invitation of a technician to one tub, by e-mail. */
export const invitation = pgTable(
  "invitation",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    tubId: uuid("tub_id")
      .notNull()
      .references(() => tub.id, { onDelete: "cascade" }),
    email: text("email").notNull(),
    token: text("token").notNull().unique(),
    invitedBy: text("invited_by")
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    acceptedBy: text("accepted_by").references(() => user.id, { onDelete: "set null" }),
    acceptedAt: timestamp("accepted_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    /** the invited technician said no */
    declinedAt: timestamp("declined_at", { withTimezone: true }),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [index("invitation_tub_idx").on(t.tubId)],
);

export const visitNote = pgTable(
  "visit_note",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    tubId: uuid("tub_id")
      .notNull()
      .references(() => tub.id, { onDelete: "cascade" }),
    authorId: text("author_id").references(() => user.id, { onDelete: "set null" }),
    body: text("body").notNull(),
    visitedAt: timestamp("visited_at", { withTimezone: true }).notNull().defaultNow(),
    createdAt: createdAt(),
  },
  (t) => [index("visit_note_tub_idx").on(t.tubId)],
);

// ---------------------------------------------------------------- photos and readings

/** A strip photo (or chart photo) in object storage. Never deleted when a read fails. */
export const photo = pgTable(
  "photo",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    /** null for chart-calibration photos, which belong to a batch instead */
    tubId: uuid("tub_id").references(() => tub.id, { onDelete: "cascade" }),
    batchId: uuid("batch_id").references(() => stripBatch.id, { onDelete: "set null" }),
    purpose: text("purpose").notNull().default("strip"),
    uploaderId: text("uploader_id").references(() => user.id, { onDelete: "set null" }),
    s3Key: text("s3_key").notNull().unique(),
    contentType: text("content_type").notNull(),
    sizeBytes: integer("size_bytes").notNull(),
    sha256: text("sha256").notNull(),
    width: integer("width"),
    height: integer("height"),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("photo_tub_hash_idx").on(t.tubId, t.sha256),
    index("photo_batch_idx").on(t.batchId),
  ],
);

export const readingStatusEnum = pgEnum("reading_status", [
  "pending", // the photo is registered and waits for the worker to read it
  "read", // the reader produced values, waiting for the owner
  "failed", // the photo could not be read; values may be entered by hand
  "confirmed", // the owner confirmed or corrected every pad
  "manual", // entered by hand without a photo
]);

export const reading = pgTable(
  "reading",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    tubId: uuid("tub_id")
      .notNull()
      .references(() => tub.id, { onDelete: "cascade" }),
    photoId: uuid("photo_id").references(() => photo.id, { onDelete: "set null" }),
    chartVersionId: uuid("chart_version_id").references(() => chartVersion.id, {
      onDelete: "set null",
    }),
    batchId: uuid("batch_id").references(() => stripBatch.id, { onDelete: "set null" }),
    takenAt: timestamp("taken_at", { withTimezone: true }).notNull().defaultNow(),
    status: readingStatusEnum("status").notNull(),
    /** why the photo could not be read, in the words shown to the owner */
    error: text("error"),
    /** true when any pad is unsure (a trigger on reading_pad keeps it so; see drizzle/0001) */
    needsReview: boolean("needs_review").notNull().default(false),
    reviewedBy: text("reviewed_by").references(() => user.id, { onDelete: "set null" }),
    reviewedAt: timestamp("reviewed_at", { withTimezone: true }),
    confirmedBy: text("confirmed_by").references(() => user.id, { onDelete: "set null" }),
    confirmedAt: timestamp("confirmed_at", { withTimezone: true }),
    createdBy: text("created_by").references(() => user.id, { onDelete: "set null" }),
    /** reader diagnostics: strip geometry, warnings */
    detail: jsonb("detail"),
    createdAt: createdAt(),
  },
  (t) => [
    index("reading_tub_taken_idx").on(t.tubId, t.takenAt),
    uniqueIndex("reading_photo_idx").on(t.photoId),
    // A tub's current water: its latest sure reading (read without doubts, confirmed, by hand, or reviewed).
    index("reading_current_idx")
      .on(t.tubId, t.takenAt)
      .where(sql`status in ('read', 'confirmed', 'manual') and (not needs_review or reviewed_at is not null)`),
    // Readings waiting for a technician: unsure and not yet reviewed (the review queue, the dashboard's counts).
    index("reading_waiting_idx").on(t.tubId, t.takenAt).where(sql`reviewed_at is null and needs_review`),
    // The same readings oldest first across every tub: the review queue's pages without a sort.
    index("reading_waiting_taken_idx").on(t.takenAt, t.id).where(sql`reviewed_at is null and needs_review`),
  ],
);

/** One pad of one reading: what the reader saw and what the owner confirmed, side by side. */
export const readingPad = pgTable(
  "reading_pad",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    readingId: uuid("reading_id")
      .notNull()
      .references(() => reading.id, { onDelete: "cascade" }),
    analyte: text("analyte").notNull(),
    unit: text("unit"),
    readValue: doublePrecision("read_value"),
    confidence: doublePrecision("confidence"),
    needsReview: boolean("needs_review").notNull().default(false),
    reviewReason: text("review_reason"),
    lab: jsonb("lab"),
    swatchIndex: doublePrecision("swatch_index"),
    cropKey: text("crop_key"),
    confirmedValue: doublePrecision("confirmed_value"),
    /** auto (not yet confirmed), confirmed (as read), corrected, manual */
    source: text("source").notNull().default("auto"),
  },
  (t) => [uniqueIndex("reading_pad_analyte_idx").on(t.readingId, t.analyte)],
);

// ---------------------------------------------------------------- products and treatments

/** An owner's edited copy of a catalogue product (strength, form, package size). */
export const product = pgTable(
  "product",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ownerId: text("owner_id")
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    /** the default catalogue entry this edits, or null for a product of the owner's own */
    catalogueId: text("catalogue_id"),
    name: text("name").notNull(),
    chemical: text("chemical").notNull(),
    form: text("form").notNull(),
    strength: doublePrecision("strength").notNull(),
    densityGPerMl: doublePrecision("density_g_per_ml"),
    packageSize: doublePrecision("package_size"),
    packageUnit: text("package_unit"),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index("product_owner_idx").on(t.ownerId)],
);

export const treatment = pgTable(
  "treatment",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    tubId: uuid("tub_id")
      .notNull()
      .references(() => tub.id, { onDelete: "cascade" }),
    readingId: uuid("reading_id").references(() => reading.id, { onDelete: "set null" }),
    productId: text("product_id"),
    productName: text("product_name").notNull(),
    chemical: text("chemical").notNull(),
    parameter: text("parameter"),
    amount: doublePrecision("amount").notNull(),
    unit: text("unit").notNull(),
    addedAt: timestamp("added_at", { withTimezone: true }).notNull(),
    retestAt: timestamp("retest_at", { withTimezone: true }),
    /** logged as a shock dose: the tub stays closed longer */
    shock: boolean("shock").notNull().default(false),
    addedBy: text("added_by").references(() => user.id, { onDelete: "set null" }),
    note: text("note"),
    createdAt: createdAt(),
  },
  // by reading: removing a reading (or its tub) finds the treatments that point at it
  (t) => [index("treatment_tub_added_idx").on(t.tubId, t.addedAt), index("treatment_reading_idx").on(t.readingId)],
);

/**
 * Each tub's water as the technicians' dashboard shows it, one row per tub, kept up to date by
 * triggers in the database (drizzle/0008) whenever the tub's readings, their pads or its
 * treatments change: the current water (the latest sure reading: read without doubts, confirmed,
 * entered by hand, or reviewed) with its pads, the readings waiting for review, and the last
 * treatment. The dashboard reads one row per tub instead of looking through each tub's history.
 */
export const tubWater = pgTable("tub_water", {
  tubId: uuid("tub_id")
    .primaryKey()
    .references(() => tub.id, { onDelete: "cascade" }),
  /** the current water: the latest sure reading, or null before the first one */
  readingId: uuid("reading_id"),
  takenAt: timestamp("taken_at", { withTimezone: true }),
  /** that reading's pads in analyte order: names, units and values (confirmed, else as read) side by side */
  analytes: text("analytes").array(),
  units: text("units").array(),
  vals: doublePrecision("vals").array(),
  /** readings unsure and not yet reviewed: how many, and when the newest was taken */
  waiting: integer("waiting").notNull().default(0),
  waitingNewest: timestamp("waiting_newest", { withTimezone: true }),
  /** the last treatment logged */
  treatmentName: text("treatment_name"),
  treatmentAmount: doublePrecision("treatment_amount"),
  treatmentUnit: text("treatment_unit"),
  treatedAt: timestamp("treated_at", { withTimezone: true }),
});

/** A guided routine in progress, e.g. first-fill setup. */
export const routineRun = pgTable(
  "routine_run",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    tubId: uuid("tub_id")
      .notNull()
      .references(() => tub.id, { onDelete: "cascade" }),
    kind: text("kind").notNull(),
    stepIndex: integer("step_index").notNull().default(0),
    state: jsonb("state").notNull().default(sql`'{}'::jsonb`),
    startedAt: timestamp("started_at", { withTimezone: true }).notNull().defaultNow(),
    completedAt: timestamp("completed_at", { withTimezone: true }),
  },
  (t) => [index("routine_run_tub_idx").on(t.tubId)],
);

// ---------------------------------------------------------------- notifications and e-mail

export const emailPreference = pgTable("email_preference", {
  userId: text("user_id")
    .primaryKey()
    .references(() => user.id, { onDelete: "cascade" }),
  timeZone: text("time_zone").notNull().default("UTC"),
  /** quiet hours in the user's time zone, 0-23; equal values mean no quiet hours */
  quietStartHour: smallint("quiet_start_hour").notNull().default(22),
  quietEndHour: smallint("quiet_end_hour").notNull().default(7),
  /** kinds of message the user has switched off */
  disabledKinds: text("disabled_kinds")
    .array()
    .notNull()
    .default(sql`'{}'::text[]`),
  /** secret for one-click "stop this kind of message" links */
  unsubscribeToken: text("unsubscribe_token").notNull().unique(),
  updatedAt: updatedAt(),
});

export const notification = pgTable(
  "notification",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: text("user_id")
      .notNull()
      .references(() => user.id, { onDelete: "cascade" }),
    tubId: uuid("tub_id").references(() => tub.id, { onDelete: "cascade" }),
    kind: text("kind").notNull(),
    title: text("title").notNull(),
    body: text("body").notNull(),
    link: text("link"),
    /** one notification per event, whatever retries or restarts happen */
    dedupeKey: text("dedupe_key").notNull().unique(),
    createdAt: createdAt(),
    readAt: timestamp("read_at", { withTimezone: true }),
  },
  (t) => [index("notification_user_idx").on(t.userId, t.createdAt)],
);

/** Every e-mail Dipwell tried to send, so nothing goes twice and failures are visible. */
export const emailLog = pgTable(
  "email_log",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: text("user_id").references(() => user.id, { onDelete: "set null" }),
    kind: text("kind").notNull(),
    dedupeKey: text("dedupe_key").notNull().unique(),
    to: text("to_address").notNull(),
    subject: text("subject").notNull(),
    /** queued, sending, sent, failed (will retry), dead (gave up, or refused for good), skipped */
    status: text("status").notNull().default("queued"),
    attempts: integer("attempts").notNull().default(0),
    lastError: text("last_error"),
    sentAt: timestamp("sent_at", { withTimezone: true }),
    /** while "sending": the worker holds the message until then; after it, another worker may take it over */
    leaseUntil: timestamp("lease_until", { withTimezone: true }),
    /** the delivery job (pg-boss) that carries the message */
    jobId: uuid("job_id"),
    /** the Message-ID header, fixed before the first attempt so a repeat after a crash carries the same one */
    messageId: text("message_id"),
    /** the SMTP server's answer when it accepted the message (its queue id) */
    smtpResponse: text("smtp_response"),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    index("email_log_status_idx").on(t.status),
    // the admin's log, newest first, whole or by status
    index("email_log_updated_idx").on(t.updatedAt),
    index("email_log_status_updated_idx").on(t.status, t.updatedAt),
    // messages whose sender may have died (the worker's recovery sweep)
    index("email_log_sending_lease_idx").on(t.leaseUntil).where(sql`${t.status} = 'sending'`),
  ],
);
