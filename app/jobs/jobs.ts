// The queues the worker serves. Each job module registers its queue and
// handler here; the schedule of recurring work lives beside its handler.
import type { Transporter } from "nodemailer";
import type PgBoss from "pg-boss";
import { deliverEmail, recoverStalledEmails, type OutgoingEmail } from "../features/notify/outbox.server";
import { runScan } from "../features/notify/scan.server";
import { sweepUploads } from "../features/photos/intake.server";
import { databaseUnavailable, noteDatabaseError } from "../lib/db-health";
import { env } from "../lib/env.server";
import { readPendingReading, type ReadJob } from "../features/readings/read-job.server";
import { createReaderPool } from "./read-pool";
import { createQueues, DELIVER_BATCH, DELIVER_POLL_SECONDS, DELIVER_QUEUE, SCAN_CRON, SCAN_QUEUE, UPLOAD_SWEEP_CRON, UPLOAD_SWEEP_QUEUE, READ_QUEUE } from "./queues";

export async function registerJobs(boss: PgBoss) {
  await createQueues(boss);

  // Reminders: every five minutes, queue whatever has come due by now.
  await boss.schedule(SCAN_QUEUE, SCAN_CRON, {}, { singletonKey: "scan" });
  await boss.work(SCAN_QUEUE, async () => {
    const result = await runScan(boss, new Date());
    if (result.queued) console.log(`reminders: ${result.queued} queued (${result.delayed} after quiet hours)`);
  });

  // E-mail: jobs fetched in batches, several messages on the wire at once (one per
  // pooled SMTP connection, and as many again preparing), each job finished on its own.
  const inFlight = env().SMTP_MAX_CONNECTIONS * 2;
  await boss.work<OutgoingEmail>(
    DELIVER_QUEUE,
    { includeMetadata: true, batchSize: DELIVER_BATCH, pollingIntervalSeconds: DELIVER_POLL_SECONDS },
    async (jobs) => {
      const unfinished = await eachLimited(jobs, inFlight, (job) => deliverJob(boss, job));
      // pg-boss completes the whole batch when this returns; a job we could not finish
      // ourselves (the database went away) must not count as done, so fail the batch:
      // pg-boss then fails (and retries) only the jobs still active.
      if (unfinished.some(Boolean)) throw new Error("Some e-mail jobs could not be finished; they will be retried.");
    },
  );

  // Photos: upload objects nobody registered (an abandoned or refused upload) are deleted.
  await boss.schedule(UPLOAD_SWEEP_QUEUE, UPLOAD_SWEEP_CRON, {}, { singletonKey: "upload-sweep" });
  await boss.work(UPLOAD_SWEEP_QUEUE, async () => {
    const deleted = await sweepUploads(new Date());
    if (deleted) console.log(`photo uploads: ${deleted} abandoned upload object(s) deleted`);
  });

  await registerReadingWork(boss);
}

/**
 * Strip photos: as many jobs in flight as reader processes (one per core), each read in a process of
 * the pool so the worker's own thread stays free for e-mail and the scan.
 */
export async function registerReadingWork(boss: PgBoss, pool = createReaderPool()) {
  for (let i = 0; i < pool.size; i++) {
    await boss.work<ReadJob>(READ_QUEUE, { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 0.5 }, async ([job]) => {
      const outcome = await readPendingReading(job.data.readingId, { reader: pool.read, finalAttempt: job.retryCount >= job.retryLimit });
      if (outcome !== "already-done") console.log(`reading ${job.data.readingId}: ${outcome}`);
    });
  }
  return pool;
}

/** One delivery job: send, then complete it (or fail it, so pg-boss retries with back-off). Returns true when the job could not be finished. */
export async function deliverJob(boss: PgBoss, job: PgBoss.JobWithMetadata<OutgoingEmail>, transport?: Transporter): Promise<boolean> {
  try {
    let outcome: Error | null = null;
    try {
      await deliverEmail(job.data, { transport, finalAttempt: job.retryCount >= job.retryLimit });
    } catch (error) {
      if (databaseUnavailable(error)) throw error;
      outcome = error as Error;
    }
    if (outcome) await boss.fail(DELIVER_QUEUE, job.id, { message: outcome.message });
    else await boss.complete(DELIVER_QUEUE, job.id);
    return false;
  } catch (error) {
    if (databaseUnavailable(error)) noteDatabaseError(error, "worker: database unavailable");
    else console.error("e-mail job:", (error as Error).message);
    return true;
  }
}

async function eachLimited<T, R>(items: T[], limit: number, fn: (item: T) => Promise<R>): Promise<R[]> {
  const results: R[] = new Array(items.length);
  let next = 0;
  const lanes = Array.from({ length: Math.min(limit, items.length) }, async () => {
    while (next < items.length) {
      const i = next++;
      results[i] = await fn(items[i]);
    }
  });
  await Promise.all(lanes);
  return results;
}

/**
 * Hands messages whose worker died mid-send back for sending, when the worker
 * starts and then every half lease, so a killed worker's messages go out within
 * about one lease instead of waiting for pg-boss to expire their jobs.
 */
export function startRecovery(boss: PgBoss): NodeJS.Timeout {
  const sweep = async () => {
    try {
      const n = await recoverStalledEmails(boss);
      if (n) console.log(`e-mail: ${n} message${n === 1 ? "" : "s"} left unsent by a stopped worker, sending again`);
    } catch (error) {
      if (databaseUnavailable(error)) noteDatabaseError(error, "worker: database unavailable");
      else console.error("e-mail recovery:", (error as Error).message);
    }
  };
  void sweep();
  return setInterval(sweep, Math.max(1_000, (env().EMAIL_SEND_LEASE_SECONDS * 1000) / 2));
}
