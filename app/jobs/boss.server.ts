// The app process's own pg-boss client: it only sends jobs (no maintenance, no
// schedules); the worker process does the work. Started on first use.
import PgBoss from "pg-boss";
import { env } from "../lib/env.server";
import { processGlobal } from "../lib/process-global";
import { createQueues } from "./queues";

const client = processGlobal<Promise<PgBoss>>("boss");

export function appBoss(): Promise<PgBoss> {
  return client.once(() =>
    (async () => {
      const boss = new PgBoss({ connectionString: env().DATABASE_URL, schema: "pgboss", supervise: false, schedule: false, max: 3 });
      boss.on("error", (error) => console.error("job queue:", error.message));
      await boss.start();
      await createQueues(boss);
      return boss;
    })().catch((error) => {
      client.set(undefined);
      throw error;
    }),
  );
}
