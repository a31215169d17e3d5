// The queues the worker serves. Each job module registers its queue and
// handler here; the schedule of recurring work lives beside its handler.
import type PgBoss from "pg-boss";

export async function registerJobs(boss: PgBoss) {
  void boss;
}
