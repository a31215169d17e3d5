// Connections cut by the server (what a restart or failover does to each of them) do not stop
// the process: an idle pooled connection, and one checked out in the middle of a transaction.
// The error is recognised as "database unavailable", and the next query works.
import { sql } from "drizzle-orm";
import pg from "pg";
import { afterAll, describe, expect, it } from "vitest";
import { db } from "~/lib/db.server";
import { databaseUnavailable } from "~/lib/db-health";

const admin = new pg.Client({ connectionString: process.env.TEST_ADMIN_DATABASE_URL });
await admin.connect();
afterAll(() => admin.end());

const terminate = (pid: number) => admin.query("select pg_terminate_backend($1)", [pid]);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe("a connection cut by the database server", () => {
  it("while idle in the pool: dropped, and the next query opens a new one", async () => {
    const pid = (await db.execute<{ pid: number }>(sql`select pg_backend_pid() as pid`)).rows[0].pid;
    await terminate(pid);
    await sleep(300); // an unhandled "error" event would have ended this process by now
    const again = (await db.execute<{ pid: number }>(sql`select pg_backend_pid() as pid`)).rows[0].pid;
    expect(again).not.toBe(pid);
  });

  it("while checked out between two statements of a transaction: that transaction fails, the process carries on", async () => {
    const client = await db.$client.connect();
    const pid = (await client.query<{ pid: number }>("select pg_backend_pid() as pid")).rows[0].pid;
    await client.query("begin");
    await terminate(pid);
    await sleep(300);
    const failure = await client.query("select 1").then(() => null, (e: unknown) => e);
    expect(failure).toBeInstanceOf(Error);
    expect(databaseUnavailable(failure)).toBe(true);
    client.release(failure as Error);
    expect((await db.execute<{ one: number }>(sql`select 1 as one`)).rows[0].one).toBe(1);
  });

  it("tells an outage from a mistake", async () => {
    const mistake = await db.execute(sql`select * from no_such_table`).then(() => null, (e: unknown) => e);
    expect(databaseUnavailable(mistake)).toBe(false);
    const refused = await new pg.Client({ connectionString: "postgres://dipwell@127.0.0.1:1/none" }).connect().then(() => null, (e: unknown) => e);
    expect(databaseUnavailable(refused)).toBe(true);
  });
});
