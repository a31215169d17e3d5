// The worker killed (SIGKILL) while messages are on the wire: the supervisor
// starts it again, the new worker takes over what the dead one left "sending"
// once its lease has run out, and every message arrives exactly once.
import { inArray, sql } from "drizzle-orm";
import PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { enqueueEmail } from "~/features/notify/outbox.server";
import { createQueues } from "~/jobs/queues";
import { db } from "~/lib/db.server";
import { caughtMail, kill, smtpRelay, sleep, startStack, until, type SmtpRelay, type Stack } from "./support";

const LEASE_SECONDS = 6;
let stack: Stack;
let relay: SmtpRelay;
let boss: PgBoss;

beforeAll(async () => {
  relay = await smtpRelay();
  boss = new PgBoss({ connectionString: process.env.DATABASE_URL!, schema: "pgboss", supervise: false, schedule: false, max: 2 });
  await boss.start();
  await createQueues(boss);
  stack = await startStack({ app: false, env: { EMAIL_SEND_LEASE_SECONDS: String(LEASE_SECONDS), SMTP_MAX_CONNECTIONS: "3" } });
});

afterAll(async () => {
  await stack?.stop();
  await boss?.stop({ graceful: false });
  await relay?.close();
});

describe("the worker killed mid-send", () => {
  it("loses no message and sends none twice", async () => {
    const domain = `${crypto.randomUUID().slice(0, 8)}.killed.faults.test`;
    const count = 60;
    const keys: string[] = [];
    for (let i = 0; i < count; i++) {
      const key = `fault-worker-kill:${domain}:${i}`;
      keys.push(key);
      await enqueueEmail({ kind: "test", to: `r${i}@${domain}`, dedupeKey: key, subject: `Message ${i}`, text: `Message ${i}.`, html: `<p>Message ${i}.</p>` }, { boss });
    }
    const statuses = async () =>
      Object.fromEntries(
        (await db.execute<{ status: string; n: number }>(sql`select status, count(*)::int as n from email_log where dedupe_key = any(${sql.param(keys)}::text[]) group by status`)).rows.map((r) => [r.status, r.n]),
      ) as Record<string, number>;

    // Let some go, then the mail server goes quiet mid-conversation and the worker is killed
    // with messages claimed and on the wire.
    await until("a few messages to go out", async () => ((await statuses()).sent ?? 0) >= 5);
    relay.stall();
    const stuck = await until("messages to be stuck on the wire", async () => {
      const st = await statuses();
      return (st.sending ?? 0) > 0 ? st : undefined;
    });
    // Anything the server accepted before it went quiet gets marked sent; wait until that has
    // settled (no change for 1.5 s), so what is still "sending" truly is on the wire.
    let before = await statuses();
    for (let calm = 0; calm < 6; ) {
      await sleep(250);
      const now = await statuses();
      calm = now.sent === before.sent && now.sending === before.sending ? calm + 1 : 0;
      before = now;
    }
    const dead = await kill(stack.worker);
    // The relay learns of the dead worker's closed connections a moment after its exit; only then
    // may the held bytes go on (else a message's end-of-data mark would reach the catcher for a
    // conversation nobody is left to finish, which no real server would deliver).
    await until("the dead worker's connections to close", async () => relay.holding() === 0 || undefined, 10_000);
    relay.resume();
    expect(before.sending, `stuck: ${JSON.stringify(stuck)}`).toBeGreaterThan(0);
    expect(before.sent ?? 0).toBeLessThan(count);

    // The supervisor brings a new worker; it takes over once the dead worker's lease runs out.
    const next = await stack.worker.nextStart(dead);
    expect(next.pid).not.toBe(dead.pid);
    await until("every message to be sent", async () => ((await statuses()).sent ?? 0) === count, 120_000);

    const rows = await db.select().from(s.emailLog).where(inArray(s.emailLog.dedupeKey, keys));
    expect(rows.filter((r) => r.attempts > 1).length).toBeGreaterThanOrEqual(before.sending);
    expect(rows.every((r) => r.smtpResponse?.startsWith("250"))).toBe(true);
    expect(new Set(rows.map((r) => r.messageId)).size).toBe(count);

    const caught = await until("the catcher to hold every message", async () => {
      const c = await caughtMail(domain);
      return c.length >= count ? c : undefined;
    }, 30_000);
    await sleep(500); // a duplicate would land now
    const all = await caughtMail(domain);
    const twice = all.map((m) => m.to[0].address).filter((a, i, list) => list.indexOf(a) !== i);
    expect(twice, `sent twice: ${twice.join(", ")}`).toEqual([]);
    expect(all.length).toBe(count);
    expect(new Set(caught.map((m) => m.to[0].address)).size).toBe(count);
    expect(stack.log).toContain("worker was stopped by SIGKILL; starting it again in 1 s.");
    expect(stack.worker.restarts()).toBe(1);
    console.log(`worker killed with ${before.sending} message(s) on the wire and ${count - (before.sent ?? 0)} unsent; all ${count} delivered once`);
  });
});
