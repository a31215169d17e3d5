// Reminders and e-mail against the real PostgreSQL (pg-boss on this worker's
// database) and the real SMTP catcher, with a controlled clock: the scan is run
// at chosen instants (T - 1 minute, T) and the delivery jobs are fetched from
// pg-boss and handed to the same handler the worker uses.
import net from "node:net";
import { eq, sql } from "drizzle-orm";
import PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { litresFromUsGallons } from "~/chemistry";
import { deliverEmail, enqueueEmail, smtpTransport, type OutgoingEmail } from "~/features/notify/outbox.server";
import { invitationEmail } from "~/features/notify/messages.server";
import { ensurePreferences, savePreferences } from "~/features/notify/preferences.server";
import { runScan } from "~/features/notify/scan.server";
import { registerJobs } from "~/jobs/jobs";
import { createQueues, DELIVER_QUEUE, SCAN_CRON, SCAN_QUEUE } from "~/jobs/queues";
import { db } from "~/lib/db.server";
import { callRoute, createTub, createUser } from "../support/fixtures";
import { importRoute } from "../support/routes";

const MIN = 60_000;
const DAY = 24 * 60 * MIN;
const catcher = process.env.MAIL_CATCHER_URL!;

type Caught = {
  id: string; subject: string; text: string; html: string; to: { address: string }[];
  headers: Record<string, string>; attachments?: { contentType: string; contentId?: string; cid?: string }[];
};

async function fetchMailsTo(address: string): Promise<Caught[]> {
  const res = await fetch(`${catcher}/email`);
  const all = (await res.json()) as Caught[];
  return all.filter((m) => m.to.some((t) => t.address === address));
}

/**
 * The catcher files a message a moment after SMTP accepts it: wait until at least
 * `atLeast` messages are there (up to 10 s), then let late ones (a duplicate) land too.
 */
async function mailsTo(address: string, atLeast = 1): Promise<Caught[]> {
  const until = Date.now() + 10_000;
  while ((await fetchMailsTo(address)).length < atLeast && Date.now() < until) await new Promise((r) => setTimeout(r, 100));
  await new Promise((r) => setTimeout(r, 300));
  return fetchMailsTo(address);
}

let boss: PgBoss;
const newBoss = async () => {
  const b = new PgBoss({ connectionString: process.env.DATABASE_URL!, schema: "pgboss", supervise: false, schedule: false, max: 3 });
  await b.start();
  await createQueues(b);
  return b;
};

/** Works every delivery job that is ready, as the worker does: handler, then complete or fail. */
async function work(b: PgBoss, opts: { transport?: ReturnType<typeof smtpTransport>; ignoreStartAfter?: boolean } = {}) {
  const outcomes: string[] = [];
  for (;;) {
    const jobs = await b.fetch<OutgoingEmail>(DELIVER_QUEUE, { includeMetadata: true, batchSize: 1, ignoreStartAfter: opts.ignoreStartAfter ?? false });
    if (jobs.length === 0) return outcomes;
    const [job] = jobs;
    try {
      outcomes.push(await deliverEmail(job.data, { transport: opts.transport, finalAttempt: job.retryCount >= job.retryLimit }));
      await b.complete(DELIVER_QUEUE, job.id);
    } catch (error) {
      outcomes.push("error");
      await b.fail(DELIVER_QUEUE, job.id, { message: (error as Error).message });
      return outcomes; // a failed job waits for its back-off; don't spin on it
    }
  }
}

async function closedPort() {
  const server = net.createServer();
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  const port = (server.address() as net.AddressInfo).port;
  await new Promise<void>((r) => server.close(() => r()));
  return port;
}

beforeAll(async () => {
  boss = await newBoss();
  // Jobs left by an earlier run of this file on the same database are not ours.
  await boss.purgeQueue(DELIVER_QUEUE);
});
afterAll(async () => {
  await boss?.stop({ graceful: false, close: true });
});

// 2030-06-12 is a Wednesday: no weekly summary falls due in these windows.
const T = new Date("2030-06-12T12:00:00Z");

async function tubWithRetest(retestAt: Date) {
  const owner = await createUser("owner");
  const t = await createTub(owner.id, { createdAt: new Date(retestAt.getTime() - DAY), testEveryDays: 2 });
  await db.insert(s.treatment).values({
    tubId: t.id, productName: "Sodium bicarbonate", chemical: "sodium_bicarbonate", amount: 40, unit: "g",
    addedAt: new Date(retestAt.getTime() - 6 * 60 * MIN), retestAt,
  });
  return { owner, tub: t };
}

describe("time to retest", () => {
  it("fires at the end of the wait, not a minute before, with the right content; a restarted worker sends no duplicate", async () => {
    const { owner, tub } = await tubWithRetest(T);
    const early = await runScan(boss, new Date(T.getTime() - MIN), { tubIds: [tub.id] });
    expect(early.queued).toBe(0);

    const onTime = await runScan(boss, T, { tubIds: [tub.id] });
    expect(onTime).toMatchObject({ due: 1, queued: 1, delayed: 0 });
    expect(await work(boss)).toEqual(["sent"]);

    const mails = await mailsTo(owner.email);
    expect(mails).toHaveLength(1);
    const [m] = mails;
    const pref = await ensurePreferences(owner.id);
    expect(m.subject).toBe(`Time to retest ${tub.name}`);
    expect(m.text).toContain(`/tubs/${tub.id}`);
    expect(m.html).toContain(`/tubs/${tub.id}`);
    expect(m.text).toContain("Sodium bicarbonate");
    // RFC 2369 List-Unsubscribe and RFC 8058 one-click POST
    expect(m.headers["list-unsubscribe"]).toContain(`/unsubscribe/${pref.unsubscribeToken}/retest`);
    expect(m.headers["list-unsubscribe-post"]).toBe("List-Unsubscribe=One-Click");
    expect(m.html).toContain(`/unsubscribe/${pref.unsubscribeToken}/retest`);

    const notes = await db.select().from(s.notification).where(eq(s.notification.userId, owner.id));
    expect(notes.map((n) => n.kind)).toEqual(["retest"]);
    const [log] = await db.select().from(s.emailLog).where(eq(s.emailLog.userId, owner.id));
    expect(log).toMatchObject({ status: "sent", attempts: 1, lastError: null });

    // The next scan, and a fresh worker after a restart, find it already sent.
    expect((await runScan(boss, new Date(T.getTime() + 5 * MIN), { tubIds: [tub.id] })).queued).toBe(0);
    await boss.stop({ graceful: true, close: true });
    boss = await newBoss();
    expect((await runScan(boss, new Date(T.getTime() + 10 * MIN), { tubIds: [tub.id] })).queued).toBe(0);
    expect(await work(boss)).toEqual([]);
    // Even a delivery job that ran again (a worker stopped before completing it) sends nothing.
    const again = await reQueuedCopy(owner.id);
    expect(await deliverEmail(again)).toBe("already-sent");
    expect(await mailsTo(owner.email)).toHaveLength(1);
    expect(await db.select().from(s.notification).where(eq(s.notification.userId, owner.id))).toHaveLength(1);
  });
});

/** The message a scan would queue for this user's single e-mail, rebuilt from the log (same dedupe key). */
async function reQueuedCopy(userId: string): Promise<OutgoingEmail> {
  const [log] = await db.select().from(s.emailLog).where(eq(s.emailLog.userId, userId));
  return { kind: log.kind, to: log.to, userId, dedupeKey: log.dedupeKey, subject: log.subject, text: "again", html: "<p>again</p>" };
}

describe("test due from the tub's routine", () => {
  it("fires testEveryDays after the latest reading", async () => {
    const T2 = new Date("2030-06-19T12:00:00Z");
    const owner = await createUser("owner");
    const tub = await createTub(owner.id, { createdAt: new Date(T2.getTime() - 4 * DAY), testEveryDays: 3 });
    await db.insert(s.reading).values({ tubId: tub.id, status: "confirmed", takenAt: new Date(T2.getTime() - 3 * DAY) });
    expect((await runScan(boss, new Date(T2.getTime() - MIN), { tubIds: [tub.id] })).queued).toBe(0);
    expect((await runScan(boss, T2, { tubIds: [tub.id] })).queued).toBe(1);
    expect(await work(boss)).toEqual(["sent"]);
    const [m] = await mailsTo(owner.email);
    expect(m.subject).toBe(`${tub.name}: a water test is due`);
    expect(m.text).toContain("every 3 days");
    expect(m.headers["list-unsubscribe"]).toContain("/test_due");
    expect(m.html).toContain(`/tubs/${tub.id}`);
  });
});

describe("drain and refill, and quiet hours", () => {
  it("comes due at midnight in the tub's zone and waits for the end of the owner's quiet hours", async () => {
    const owner = await createUser("owner");
    await ensurePreferences(owner.id);
    await savePreferences(owner.id, {
      timeZone: "Europe/Berlin", quietStartHour: 22, quietEndHour: 7, enabledKinds: ["retest", "test_due", "drain_due", "weekly_summary", "invitation"],
    });
    // 400 US gal, 4 bathers a day → drain every 33 days (app/chemistry drainIntervalDays, Maine App. B formula).
    const tub = await createTub(owner.id, {
      createdAt: new Date("2030-01-01T00:00:00Z"), fillDate: "2030-01-01", timeZone: "Europe/Berlin",
      volumeLitres: litresFromUsGallons(400), bathersPerDay: 4, testEveryDays: 60,
    });
    const due = new Date("2030-02-02T23:00:00Z"); // 3 Feb 2030 00:00 in Berlin (UTC+1 in winter, IANA tz database)
    expect((await runScan(boss, new Date(due.getTime() - MIN), { tubIds: [tub.id] })).queued).toBe(0);
    expect(await runScan(boss, due, { tubIds: [tub.id] })).toMatchObject({ queued: 1, delayed: 1 });
    expect(await work(boss)).toEqual([]); // nothing goes during quiet hours
    expect(await mailsTo(owner.email, 0)).toHaveLength(0);

    const [job] = await db.execute<{ start_after: Date }>(
      sql`select start_after from pgboss.job where name = ${DELIVER_QUEUE} and data->>'dedupeKey' = ${`drain_due:${tub.id}:2030-01-01`}`,
    ).then((r) => r.rows);
    expect(new Date(job.start_after).toISOString()).toBe("2030-02-03T06:00:00.000Z"); // 07:00 Berlin

    // The clock reaches 07:00 Berlin: the job becomes ready (fetched ignoring its start time).
    expect(await work(boss, { ignoreStartAfter: true })).toEqual(["sent"]);
    const [m] = await mailsTo(owner.email);
    expect(m.subject).toBe(`${tub.name}: time to drain and refill`);
    expect(m.text).toContain("about every 33 days");
    expect(m.text).toContain(`/tubs/${tub.id}`);
    expect(m.headers["list-unsubscribe"]).toContain("/drain_due");
  });
});

describe("weekly summary", () => {
  it("goes on Monday 08:00 with a trend picture inlined by CID", async () => {
    const T3 = new Date("2030-06-24T08:00:00Z"); // a Monday; owner has no saved preferences → the tub's zone, UTC
    const owner = await createUser("owner");
    const tub = await createTub(owner.id, { createdAt: new Date("2030-06-14T12:00:00Z"), testEveryDays: 30 });
    const values = [
      ["2030-06-18T18:00:00Z", 3, 7.4], ["2030-06-20T18:00:00Z", 2, 7.6], ["2030-06-23T18:00:00Z", 4, 7.5],
    ] as const;
    for (const [at, fc, ph] of values) {
      const [r] = await db.insert(s.reading).values({ tubId: tub.id, status: "confirmed", takenAt: new Date(at) }).returning();
      await db.insert(s.readingPad).values([
        { readingId: r.id, analyte: "free_chlorine", unit: "ppm", confirmedValue: fc, source: "confirmed" },
        { readingId: r.id, analyte: "ph", confirmedValue: ph, source: "confirmed" },
      ]);
    }
    expect((await runScan(boss, new Date(T3.getTime() - MIN), { tubIds: [tub.id] })).queued).toBe(0);
    expect((await runScan(boss, T3, { tubIds: [tub.id] })).queued).toBe(1);
    expect(await work(boss)).toEqual(["sent"]);
    const [m] = await mailsTo(owner.email);
    expect(m.subject).toBe(`${tub.name}: your week in water`);
    expect(m.text).toContain("3 water tests this week. Latest: free chlorine 4 ppm, pH 7.5.");
    expect(m.html).toMatch(/<img src="cid:trend-[^"]+"/);
    expect(m.attachments?.[0]?.contentType).toBe("image/png");
    expect(m.headers["list-unsubscribe"]).toContain("/weekly_summary");
  });
});

describe("one-click unsubscribe", () => {
  it("works without signing in and stops that kind only", async () => {
    const { owner, tub } = await tubWithRetest(new Date("2030-07-03T12:00:00Z"));
    const pref = await ensurePreferences(owner.id);
    const route = await importRoute("routes/notifications/unsubscribe.tsx");
    const params = { token: pref.unsubscribeToken, kind: "retest" };
    const page = await callRoute(route.loader!, { url: `/unsubscribe/${pref.unsubscribeToken}/retest`, params, user: null });
    expect(page.status).toBe(200);
    // RFC 8058: the mail client POSTs List-Unsubscribe=One-Click
    const done = await callRoute(route.action!, { url: `/unsubscribe/${pref.unsubscribeToken}/retest`, params, user: null, form: { "List-Unsubscribe": "One-Click" } });
    expect(done.status).toBe(200);
    expect((await ensurePreferences(owner.id)).disabledKinds).toEqual(["retest"]);
    const bad = await callRoute(route.action!, { url: "/unsubscribe/nope/retest", params: { token: "nope", kind: "retest" }, user: null, form: {} });
    expect(bad.status).toBe(404);

    const scan = await runScan(boss, new Date("2030-07-03T12:00:00Z"), { tubIds: [tub.id] });
    expect(scan.queued).toBe(0);
    expect(await mailsTo(owner.email, 0)).toHaveLength(0);

    // Other kinds still go: the routine test falls due a day later (tub added a day before, test every 2 days).
    expect((await runScan(boss, new Date("2030-07-04T12:00:00Z"), { tubIds: [tub.id] })).queued).toBe(1);
    expect(await work(boss)).toEqual(["sent"]);
    expect((await mailsTo(owner.email)).map((m) => m.subject)).toEqual([`${tub.name}: a water test is due`]);
  });
});

describe("SMTP server down", () => {
  it("records the failure, retries with back-off, and the admin sees it; the retry sends once", async () => {
    const TD = new Date("2030-07-10T12:00:00Z");
    const { owner, tub } = await tubWithRetest(TD);
    expect((await runScan(boss, TD, { tubIds: [tub.id] })).queued).toBe(1);
    const down = smtpTransport(`smtp://127.0.0.1:${await closedPort()}`);
    expect(await work(boss, { transport: down })).toEqual(["error"]);

    const [log] = await db.select().from(s.emailLog).where(eq(s.emailLog.userId, owner.id));
    expect(log).toMatchObject({ status: "failed", attempts: 1 });
    expect(log.lastError).toMatch(/ECONNREFUSED|connect/i);
    const jobs = await db.execute<{ state: string; start_after: Date; retry_count: number }>(
      sql`select state, start_after, retry_count from pgboss.job where name = ${DELIVER_QUEUE} and data->>'dedupeKey' = ${log.dedupeKey}`,
    );
    expect(jobs.rows[0].state).toBe("retry");
    expect(new Date(jobs.rows[0].start_after).getTime()).toBeGreaterThan(Date.now()); // backed off, not immediate
    expect(await work(boss)).toEqual([]); // not before its back-off

    const admin = await createUser("admin");
    const page = await importRoute("routes/admin/email.tsx");
    const seen = await callRoute(page.loader!, { url: "/admin/email?status=failed", user: admin });
    const rows = (seen.data as { rows: { to: string; status: string; attempts: number; lastError: string | null }[] }).rows;
    expect(rows.find((r) => r.to === owner.email)).toMatchObject({ status: "failed", attempts: 1 });
    const asOwner = await callRoute(page.loader!, { url: "/admin/email", user: owner });
    expect(asOwner.status).toBe(403);

    // The server is back; the retry (fetched once its back-off has passed) sends it, once.
    expect(await work(boss, { ignoreStartAfter: true })).toEqual(["sent"]);
    expect(await mailsTo(owner.email)).toHaveLength(1);
    const [after] = await db.select().from(s.emailLog).where(eq(s.emailLog.userId, owner.id));
    expect(after).toMatchObject({ status: "sent", attempts: 2, lastError: null });
  });
});

describe("the worker", () => {
  it("registers the five-minute scan and delivers queued e-mail (an invitation) on its own", async () => {
    await boss.stop({ graceful: true, close: true });
    boss = await newBoss();
    await registerJobs(boss);
    const schedules = await boss.getSchedules();
    expect(schedules.find((x) => x.name === SCAN_QUEUE)?.cron).toBe(SCAN_CRON);

    const tech = await createUser("technician");
    const pref = await ensurePreferences(tech.id);
    const mail = invitationEmail({
      invitationId: crypto.randomUUID(), to: tech.email, tubName: "Cedar deck tub", inviterName: "Test owner",
      acceptUrl: "http://127.0.0.1:3100/invitations/abc", recipient: { id: tech.id, name: "Test technician", unsubscribeToken: pref.unsubscribeToken },
    });
    expect((await enqueueEmail(mail, { boss })).queued).toBe(true);
    expect((await enqueueEmail(mail, { boss })).queued).toBe(false); // the same invitation twice queues once

    // Wait for the worker's own polling to pick the job up (an event, not a timing check).
    let status = "";
    for (let i = 0; i < 100 && status !== "sent"; i++) {
      const [log] = await db.select().from(s.emailLog).where(eq(s.emailLog.dedupeKey, mail.dedupeKey));
      status = log.status;
      if (status !== "sent") await new Promise((r) => setTimeout(r, 200));
    }
    expect(status).toBe("sent");
    const [m] = await mailsTo(tech.email);
    expect(m.subject).toBe("Test owner invited you to look after Cedar deck tub");
    expect(m.headers["list-unsubscribe"]).toContain(`/unsubscribe/${pref.unsubscribeToken}/invitation`);
    expect(m.text).toContain("http://127.0.0.1:3100/invitations/abc");
  });
});
