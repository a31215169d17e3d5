// PostgreSQL restarted under a running app and worker: both stay up (no crash,
// no restart by the supervisor), requests during the outage get a plain
// "try again in a moment" (503: a page, or JSON for API routes), and service
// resumes by itself — pages, sign-in sessions and the worker's job queue.
import { eq, sql } from "drizzle-orm";
import PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { enqueueEmail } from "~/features/notify/outbox.server";
import { createQueues } from "~/jobs/queues";
import { db } from "~/lib/db.server";
import { createTub, createUser, type TestUser } from "../support/fixtures";
import { get, restartPostgres, startStack, until, type Stack } from "./support";

let stack: Stack;
let owner: TestUser;
let tubId: string;

beforeAll(async () => {
  owner = await createUser("owner");
  tubId = (await createTub(owner.id)).id;
  stack = await startStack({ env: { SMTP_URL: process.env.SMTP_URL! } });
  await until("the worker to start", async () => (await db.execute(sql`select 1 from pgboss.schedule where name = 'notify-scan'`)).rows.length > 0);
});

afterAll(async () => {
  await stack?.stop();
});

describe("a PostgreSQL restart", () => {
  it("answers 503 'try again in a moment' while the database is away and serves again by itself afterwards", async () => {
    const cookie = { cookie: owner.cookie };
    expect((await get("/tubs", cookie)).status).toBe(200);
    const appPid = stack.app.current()!.pid;
    const workerPid = stack.worker.current()!.pid;

    for (let round = 1; round <= 2; round++) {
      const during: { page: Awaited<ReturnType<typeof get>>; api: Awaited<ReturnType<typeof get>> }[] = [];
      await restartPostgres(4_000, async () => {
        during.push({ page: await get("/tubs", cookie), api: await get(`/api/tubs/${tubId}/trends`, cookie) });
      });
      const { page, api } = during[0];
      expect(page.status, `round ${round}: page during the outage`).toBe(503);
      expect(page.headers.get("content-type")).toMatch(/text\/html/);
      expect(page.body).toContain("Back in a moment");
      expect(page.body).toMatch(/try again in a moment/i);
      expect(api.status, `round ${round}: API during the outage`).toBe(503);
      expect(api.headers.get("content-type")).toMatch(/application\/json/);
      expect(JSON.parse(api.body).message).toMatch(/try again in a moment/i);
      expect(api.headers.get("retry-after")).toBe("5");

      // Back without anyone restarting anything: the same session works again.
      const back = await until("the app to serve /tubs again", async () => ((await get("/tubs", cookie)).status === 200 ? true : undefined), 30_000);
      expect(back).toBe(true);
      expect((await get(`/api/tubs/${tubId}/trends`, cookie)).status).toBe(200);
    }

    // Neither process died: the same processes, never restarted by the supervisor.
    expect(stack.app.current()?.pid).toBe(appPid);
    expect(stack.worker.current()?.pid).toBe(workerPid);
    expect(stack.app.restarts() + stack.worker.restarts()).toBe(0);
    expect(stack.log).toEqual([]);

    // The worker's job queue resumed too: a message queued now is delivered by it.
    const boss = new PgBoss({ connectionString: process.env.DATABASE_URL!, schema: "pgboss", supervise: false, schedule: false, max: 2 });
    await boss.start();
    await createQueues(boss);
    const key = `fault-db-restart-${crypto.randomUUID()}`;
    await enqueueEmail(
      { kind: "test", to: "after-restart@faults.dipwell.test", dedupeKey: key, subject: "After the database restart", text: "Delivered after a restart.", html: "<p>Delivered after a restart.</p>" },
      { boss },
    );
    await boss.stop({ graceful: false });
    const status = await until("the worker to send the message", async () => {
      const [row] = await db.select().from(s.emailLog).where(eq(s.emailLog.dedupeKey, key));
      return row?.status === "sent" ? row.status : undefined;
    });
    expect(status).toBe("sent");
  });

  it("leaves the test run's own app answering too", async () => {
    const res = await fetch(`${process.env.E2E_BASE_URL}/sign-in`);
    expect(res.status).toBe(200);
  });
});
