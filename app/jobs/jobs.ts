// The queues the worker serves. Each job module registers its queue and
// handler here; the schedule of recurring work lives beside its handler.
import type PgBoss from "pg-boss";
import { deliverEmail, type OutgoingEmail } from "../features/notify/outbox.server";
import { runScan } from "../features/notify/scan.server";
import { sweepUploads } from "../features/photos/intake.server";
import { createQueues, DELIVER_QUEUE, SCAN_CRON, SCAN_QUEUE, UPLOAD_SWEEP_CRON, UPLOAD_SWEEP_QUEUE } from "./queues";

export async function registerJobs(boss: PgBoss) {
  await createQueues(boss);

  // Reminders: every five minutes, queue whatever has come due by now.
  await boss.schedule(SCAN_QUEUE, SCAN_CRON, {}, { singletonKey: "scan" });
  await boss.work(SCAN_QUEUE, async () => {
    const result = await runScan(boss, new Date());
    if (result.queued) console.log(`reminders: ${result.queued} queued (${result.delayed} after quiet hours)`);
  });

  // E-mail: one job per message; a failure throws so pg-boss retries with back-off.
  await boss.work<OutgoingEmail>(DELIVER_QUEUE, { includeMetadata: true, batchSize: 1 }, async ([job]) => {
    await deliverEmail(job.data, { finalAttempt: job.retryCount >= job.retryLimit });
  });

  // Photos: upload objects nobody registered (an abandoned or refused upload) are deleted.
  await boss.schedule(UPLOAD_SWEEP_QUEUE, UPLOAD_SWEEP_CRON, {}, { singletonKey: "upload-sweep" });
  await boss.work(UPLOAD_SWEEP_QUEUE, async () => {
    const deleted = await sweepUploads(new Date());
    if (deleted) console.log(`photo uploads: ${deleted} abandoned upload object(s) deleted`);
  });
}
