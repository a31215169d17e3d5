// The app process's own pg-boss client: it only sends jobs (no maintenance, no
// schedules); the worker process does the work. Started on first use.
import PgBoss from "pg-boss";
import { env } from "../lib/env.server";
import { createQueues } from "./queues";

const holder = globalThis as unknown as { __dipwellBoss?: Promise<PgBoss> };

export function appBoss(): Promise<PgBoss> {
  if (!holder.__dipwellBoss) {
    holder.__dipwellBoss = (async () => {
      const boss = new PgBoss({ connectionString: env().DATABASE_URL, schema: "pgboss", supervise: false, schedule: false, max: 3 });
      boss.on("error", (error) => console.error("job queue:", error.message));
      await boss.start();
      await createQueues(boss);
      return boss;
    })().catch((error) => {
      holder.__dipwellBoss = undefined;
      throw error;
    });
  }
  return holder.__dipwellBoss;
}
