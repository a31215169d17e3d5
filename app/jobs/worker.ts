// The background worker: scheduled and queued jobs on PostgreSQL through
// pg-boss, which keeps jobs across restarts. It runs as its own process beside
// the app (`npm start` starts one); start more for more throughput.
//
// It rides through a database restart: pg-boss's pollers report errors and poll
// again, the shared pool drops dead connections, and while the database is
// away the outage is logged once, not once per poll. A worker that cannot start
// because the database is not there yet waits for it.
import PgBoss from "pg-boss";
import { databaseDownSince, databaseUnavailable, noteDatabaseBack, noteDatabaseError } from "../lib/db-health";
import { databaseReachable } from "../lib/db.server";
import { env } from "../lib/env.server";
import { registerJobs, startRecovery } from "./jobs";

// pg-boss completes or fails a finished job without waiting for the answer; when
// the database went away in that instant the promise rejects with nobody
// listening. That job is expired and retried by pg-boss, so log and carry on.
// Anything else unexpected stops the process, and its supervisor starts a fresh one.
process.on("unhandledRejection", (reason) => {
  if (databaseUnavailable(reason)) return noteDatabaseError(reason, "worker: database unavailable");
  console.error("worker: unexpected error, stopping:", reason);
  process.exit(1);
});

// Wait for the database before starting (it may still be starting up, or restarting).
for (let wait = 500; !(await databaseReachable()); wait = Math.min(wait * 2, 15_000)) {
  noteDatabaseError(new Error("no answer"), "worker: waiting for the database");
  await new Promise((r) => setTimeout(r, wait));
}
noteDatabaseBack();

const boss = new PgBoss({ connectionString: env().DATABASE_URL, schema: "pgboss" });
boss.on("error", (error) => {
  if (databaseUnavailable(error)) noteDatabaseError(error, "worker: database unavailable");
  else console.error("worker:", error.message);
});

const stop = async () => {
  await boss.stop({ graceful: true, timeout: 10_000 }).catch(() => {});
  process.exit(0);
};
process.on("SIGINT", stop);
process.on("SIGTERM", stop);

await boss.start();
await registerJobs(boss);
startRecovery(boss);
console.log("Dipwell worker is running.");

// Say so in the log when the database answers again after an outage.
setInterval(() => {
  if (databaseDownSince() !== null) void databaseReachable().then((up) => up && noteDatabaseBack(), () => {});
}, 5_000).unref();
