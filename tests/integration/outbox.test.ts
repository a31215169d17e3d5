// The e-mail outbox under faults, against real PostgreSQL (pg-boss on this
// worker's database), the real mail catcher, and SMTP servers that refuse or
// hang (tests/support/smtp-servers.ts): a worker that dies mid-send, a
// permanent refusal, a bad address, and many messages at once with several
// workers competing — each message delivered, none twice.
import { eq, inArray, sql } from "drizzle-orm";
import PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { deliverEmail, EmailBeingSent, enqueueEmail, recoverStalledEmails, smtpTransport, type OutgoingEmail } from "~/features/notify/outbox.server";
import { dueAt, SCAN_PAGE } from "~/features/notify/scan.server";
import { deliverJob, registerJobs } from "~/jobs/jobs";
import { createQueues, DELIVER_QUEUE } from "~/jobs/queues";
import { db } from "~/lib/db.server";
import { callRoute, createUser } from "../support/fixtures";
import { importRoute } from "../support/routes";
import { refusingSmtp, silentSmtp } from "../support/smtp-servers";

const catcher = process.env.MAIL_CATCHER_URL!;
type Caught = { subject: string; to: { address: string }[]; messageId: string; headers: Record<string, string> };

/** The mail catcher keeps messages across runs: every domain here is made unique to this run. */
const run = crypto.randomUUID().slice(0, 8);
const unique = (domain: string) => `${run}.${domain}`;

async function caught(domain: string): Promise<Caught[]> {
  const all = (await (await fetch(`${catcher}/email`)).json()) as Caught[];
  return all.filter((m) => m.to.some((t) => t.address.endsWith(domain)));
}

const newBoss = async () => {
  const b = new PgBoss({ connectionString: process.env.DATABASE_URL!, schema: "pgboss", supervise: false, schedule: false, max: 4 });
  await b.start();
  await createQueues(b);
  return b;
};

let boss: PgBoss;
beforeAll(async () => {
  boss = await newBoss();
  await boss.purgeQueue(DELIVER_QUEUE);
});
afterAll(async () => {
  await boss?.stop({ graceful: false, close: true });
});

function message(domain: string, n = 0): OutgoingEmail {
  const id = crypto.randomUUID();
  if (!domain.startsWith(run)) throw new Error("use unique(domain)");
  return { kind: "test", to: `r${n}-${id.slice(0, 6)}@${domain}`, dedupeKey: `outbox-test:${id}`, subject: `Outbox test ${n}`, text: "Hello.", html: "<p>Hello.</p>" };
}

/** Jobs fetched while looking for another one, kept (active) for their own turn. */
const fetched = new Map<string, PgBoss.JobWithMetadata<OutgoingEmail>>();

async function fetchJob(dedupeKey: string) {
  for (let i = 0; i < 50; i++) {
    const early = fetched.get(dedupeKey);
    if (early) return fetched.delete(dedupeKey), early;
    const jobs = await boss.fetch<OutgoingEmail>(DELIVER_QUEUE, { includeMetadata: true, batchSize: 20 });
    for (const j of jobs) fetched.set(j.data.dedupeKey, j);
    if (!jobs.length) await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no job for ${dedupeKey}`);
}

const logRow = async (key: string) => (await db.select().from(s.emailLog).where(eq(s.emailLog.dedupeKey, key)))[0];

describe("a worker that dies while sending", () => {
  it("leaves the message to the next worker once its lease runs out: sent once, with the same Message-ID and the server's answer recorded", async () => {
    const domain = unique("died.outbox.test");
    const mail = message(domain);
    await enqueueEmail(mail, { boss });
    const job = await fetchJob(mail.dedupeKey);

    // Worker A claims the message and is stuck on the wire (a server that never answers); then it "dies":
    // nothing of it runs any more, its promise is abandoned.
    const silent = await silentSmtp();
    const dying = deliverEmail(job.data, { transport: smtpTransport(silent.url), leaseSeconds: 2 }).catch((e) => e);
    const claimed = await waitFor(async () => ((await logRow(mail.dedupeKey)).status === "sending" ? logRow(mail.dedupeKey) : undefined));
    expect(claimed.messageId).toMatch(/^<[0-9a-f]{32}@dipwell\.test>$/);
    expect(claimed.jobId).toBe(job.id);

    // Worker B, while A's lease holds: does not send, the job will be retried later.
    await expect(deliverEmail(job.data)).rejects.toBeInstanceOf(EmailBeingSent);
    expect(await caught(domain)).toHaveLength(0);

    // The lease runs out; the next worker's recovery sweep hands the message back with a fresh job.
    await new Promise((r) => setTimeout(r, 2_200));
    expect(await recoverStalledEmails(boss)).toBeGreaterThanOrEqual(1); // ours (and any left by an earlier run on this database)
    expect((await boss.getJobById(DELIVER_QUEUE, job.id))?.state).toBe("cancelled");
    const handedBack = await logRow(mail.dedupeKey);
    expect(handedBack).toMatchObject({ status: "failed", lastError: "The worker stopped while sending; sending it again." });
    expect(handedBack.jobId).not.toBe(job.id);

    const retry = await fetchJob(mail.dedupeKey);
    expect(retry.id).toBe(handedBack.jobId);
    expect(await deliverJob(boss, retry)).toBe(false);
    const sent = await logRow(mail.dedupeKey);
    expect(sent).toMatchObject({ status: "sent", attempts: 2, lastError: null, leaseUntil: null, messageId: claimed.messageId });
    expect(sent.smtpResponse).toMatch(/^250/);
    expect((await boss.getJobById(DELIVER_QUEUE, retry.id))?.state).toBe("completed");

    // Worker A's connection finally breaks: its failure does not overwrite the delivered message.
    silent.cut();
    expect(await dying).toBeInstanceOf(Error);
    expect((await logRow(mail.dedupeKey)).status).toBe("sent");
    await silent.close();

    const got = await caught(domain);
    expect(got).toHaveLength(1);
    expect(`<${got[0].messageId}>`.replace("<<", "<").replace(">>", ">")).toBe(claimed.messageId);
    // A late retry of the same message finds it sent.
    expect(await deliverEmail(job.data)).toBe("already-sent");
    expect(await caught(domain)).toHaveLength(1);
  });
});

describe("a permanent SMTP refusal", () => {
  it("fails at once (no retries), shows in the admin's e-mail log, and other messages still go", async () => {
    const server = await refusingSmtp((a) => a.startsWith("gone"));
    try {
      const gone = { ...message(unique("refused.outbox.test")), to: `gone-${crypto.randomUUID().slice(0, 6)}@${unique("refused.outbox.test")}` };
      const fine = message(unique("refused.outbox.test"), 1);
      await enqueueEmail(gone, { boss });
      await enqueueEmail(fine, { boss });
      const transport = smtpTransport(server.url);
      for (const m of [gone, fine]) expect(await deliverJob(boss, await fetchJob(m.dedupeKey), transport)).toBe(false);

      const row = await logRow(gone.dedupeKey);
      expect(row).toMatchObject({ status: "dead", attempts: 1 });
      expect(row.lastError).toMatch(/^Refused for good by the mail server, not retried: .*550 5\.1\.1/);
      const job = await boss.getJobById(DELIVER_QUEUE, row.jobId!);
      expect(job?.state).toBe("completed"); // not "retry": nothing will try it again
      expect(await logRow(fine.dedupeKey)).toMatchObject({ status: "sent", attempts: 1 });
      expect(server.accepted).toEqual([fine.to]);

      const admin = await createUser("admin");
      const page = await importRoute("routes/admin/email.tsx");
      const seen = await callRoute(page.loader!, { url: "/admin/email?status=dead", user: admin });
      const rows = (seen.data as { rows: { to: string; status: string; attempts: number; lastError: string | null }[] }).rows;
      expect(rows.find((r) => r.to === gone.to)).toMatchObject({ status: "dead", attempts: 1, lastError: expect.stringMatching(/550/) });
    } finally {
      await server.close();
    }
  });

  it("a malformed address is refused at once too", async () => {
    const bad = { ...message(unique("bad.outbox.test")), to: "not an address" };
    await enqueueEmail(bad, { boss });
    expect(await deliverJob(boss, await fetchJob(bad.dedupeKey))).toBe(false);
    const row = await logRow(bad.dedupeKey);
    expect(row).toMatchObject({ status: "dead", attempts: 1 });
    expect(row.lastError).toMatch(/^Refused for good/);
  });
});

describe("many messages at once", () => {
  /** Queues `n` messages, starts `workers` workers, waits until all are sent; returns the messages and the rate. */
  async function deliverMany(n: number, workerCount: number, domain: string) {
    const mails = Array.from({ length: n }, (_, i) => message(domain, i));
    for (const m of mails) await enqueueEmail(m, { boss });
    const workers = await Promise.all(Array.from({ length: workerCount }, () => newBoss()));
    const keys = mails.map((m) => m.dedupeKey);
    const started = performance.now();
    try {
      for (const w of workers) await registerJobs(w);
      await waitFor(async () => {
        const [{ n: sent }] = (await db.execute<{ n: number }>(sql`select count(*)::int as n from email_log where status = 'sent' and dedupe_key = any(${sql.param(keys)}::text[])`)).rows;
        return sent === n ? true : undefined;
      }, 120_000);
    } finally {
      for (const w of workers) await w.stop({ graceful: false, close: true });
    }
    const seconds = (performance.now() - started) / 1000;
    return { mails, keys, seconds, rate: n / seconds };
  }

  it("one worker delivers 200 messages; two competing workers 200 more; each exactly once", async () => {
    const domain = unique("many.outbox.test");
    const one = await deliverMany(200, 1, domain);
    console.log(`mail per second: ${one.rate.toFixed(1)} (one worker, ${one.mails.length} messages in ${one.seconds.toFixed(1)} s)`);
    const two = await deliverMany(200, 2, domain);
    console.log(`mail per second: ${two.rate.toFixed(1)} (two workers, ${two.mails.length} messages in ${two.seconds.toFixed(1)} s)`);

    const keys = [...one.keys, ...two.keys];
    const rows = await db.select().from(s.emailLog).where(inArray(s.emailLog.dedupeKey, keys));
    expect(rows).toHaveLength(400);
    expect(rows.every((r) => r.status === "sent" && r.attempts === 1 && r.smtpResponse?.startsWith("250"))).toBe(true);
    const got = await waitFor(async () => {
      const c = await caught(domain);
      return c.length >= 400 ? c : undefined;
    }, 20_000);
    await new Promise((r) => setTimeout(r, 300)); // a duplicate would land now
    expect((await caught(domain)).length).toBe(400);
    expect(new Set(got.map((m) => m.to[0].address)).size).toBe(400);
  });
});

describe("the five-minute scan", () => {
  it("finds each tub's latest reading per tub and walks all tubs page by page", async () => {
    const owner = await createUser("owner");
    const now = new Date("2031-03-05T12:00:00Z");
    const created = new Date(now.getTime() - 30 * 86_400_000);
    const tubs = await db
      .insert(s.tub)
      .values(Array.from({ length: SCAN_PAGE + 3 }, (_, i) => ({ ownerId: owner.id, name: `Scan tub ${i}`, volumeLitres: 1200, sanitiser: "chlorine" as const, testEveryDays: 7, createdAt: created })))
      .returning({ id: s.tub.id });
    // One tub with a long history: its latest usable reading (2 days ago) means no test is due yet;
    // a later failed reading does not count.
    const busy = tubs[0].id;
    await db.insert(s.reading).values([
      ...Array.from({ length: 200 }, (_, i) => ({ tubId: busy, status: "confirmed" as const, takenAt: new Date(now.getTime() - (2 + i) * 86_400_000) })),
      { tubId: busy, status: "failed" as const, takenAt: new Date(now.getTime() - 86_400_000) },
    ]);
    const due = await dueAt(now);
    const testDue = new Set(due.filter((d) => d.kind === "test_due").map((d) => d.tubId));
    expect(testDue.has(busy)).toBe(false);
    for (const t of tubs.slice(1)) expect(testDue.has(t.id)).toBe(true); // across both pages
    // Five and a half days on, the busy tub is due, counted from its latest usable reading.
    const later = await dueAt(new Date(now.getTime() + 5.5 * 86_400_000), { tubIds: [busy] });
    expect(later.find((d) => d.kind === "test_due")?.detail.lastTestedAt).toBe(new Date(now.getTime() - 2 * 86_400_000).toISOString());
    await db.delete(s.tub).where(inArray(s.tub.id, tubs.map((t) => t.id)));
  });
});

async function waitFor<T>(check: () => Promise<T | undefined>, timeoutMs = 20_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await check();
    if (v !== undefined) return v;
    if (Date.now() > end) throw new Error("timed out waiting");
    await new Promise((r) => setTimeout(r, 100));
  }
}
