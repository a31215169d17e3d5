// The background worker: scheduled and queued jobs on PostgreSQL through
// pg-boss, which keeps jobs across restarts. It runs as its own process beside
// the app (`npm start` starts one); start more for more throughput.
import PgBoss from "pg-boss";
import { env } from "../lib/env.server";
import { registerJobs } from "./jobs";

const boss = new PgBoss({ connectionString: env().DATABASE_URL, schema: "pgboss" });
boss.on("error", (error) => console.error("worker:", error.message));

await boss.start();
await registerJobs(boss);
console.log("Dipwell worker is running.");

const stop = async () => {
  await boss.stop({ graceful: true, timeout: 10_000 });
  process.exit(0);
};
process.on("SIGINT", stop);
process.on("SIGTERM", stop);
