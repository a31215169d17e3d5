// A worker process that only reads strip photos, against the database in DATABASE_URL: the
// integration tests start it, kill it in the middle of a read, and start another.
import PgBoss from "pg-boss";
import { registerReadingWork } from "../../app/jobs/jobs";
import { createReaderPool } from "../../app/jobs/read-pool";

const boss = new PgBoss({ connectionString: process.env.DATABASE_URL!, schema: "pgboss", supervise: true, maintenanceIntervalSeconds: 1, schedule: false });
boss.on("error", (e) => console.error("read worker:", e.message));
await boss.start();
await registerReadingWork(boss, createReaderPool(1));
console.log("read worker ready");
