// Queue names and their retry policy, shared by the worker, the app (which only
// sends jobs) and the tests.
import type PgBoss from "pg-boss";

export const SCAN_QUEUE = "notify-scan";
export const DELIVER_QUEUE = "notify-deliver";
/** every five minutes, the scan looks for reminders that have come due */
export const SCAN_CRON = "*/5 * * * *";

/**
 * A failed send (SMTP server down, address refused) is retried with growing
 * gaps: pg-boss backs off from retryDelay, doubling each time, for retryLimit
 * retries (about an hour and a half in all).
 */
export const DELIVER_RETRY = { retryLimit: 7, retryDelay: 30, retryBackoff: true } as const;

/** every hour, upload objects whose presigned URL expired without a registration are deleted */
export const UPLOAD_SWEEP_QUEUE = "photo-upload-sweep";
export const UPLOAD_SWEEP_CRON = "17 * * * *";

/** E-mail jobs fetched at once, and how often an idle worker looks for more (pg-boss's shortest interval). */
export const DELIVER_BATCH = 30;
export const DELIVER_POLL_SECONDS = 0.5;

/**
 * Strip photos waiting to be read: one job per reading (the reading id is the singleton key, so
 * a photo registered twice is queued once). A worker that dies mid-read leaves its job active
 * until it expires; pg-boss then retries it.
 */
export const READ_QUEUE = "reading-read";
export const READ_RETRY = { retryLimit: 2, retryDelay: 5, retryBackoff: false, expireInSeconds: 120 } as const;

export async function createQueues(boss: PgBoss) {
  await boss.createQueue(READ_QUEUE, { name: READ_QUEUE, policy: "stately", ...READ_RETRY });
  await boss.createQueue(UPLOAD_SWEEP_QUEUE, { name: UPLOAD_SWEEP_QUEUE, policy: "singleton", retryLimit: 1, expireInSeconds: 600 });
  await boss.createQueue(SCAN_QUEUE, { name: SCAN_QUEUE, policy: "singleton", retryLimit: 1, expireInSeconds: 240 });
  await boss.createQueue(DELIVER_QUEUE, { name: DELIVER_QUEUE, ...DELIVER_RETRY, expireInSeconds: 120 });
}
