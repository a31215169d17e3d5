// The outbox: every e-mail Dipwell sends on a schedule goes through here.
//
// enqueueEmail() claims the message's dedupe key in email_log and queues a
// pg-boss job in the same database transaction, so a message is queued once or
// not at all. deliverEmail() (the job) claims the row before talking to the
// SMTP server, for a lease of EMAIL_SEND_LEASE_SECONDS, and marks it sent with
// the server's answer afterwards. Delivery is at least once: a worker that dies
// mid-send leaves the row "sending" with a lease that runs out; then the job's
// retry, or the next worker's recovery sweep (recoverStalledEmails), sends it
// again with the same Message-ID. A message already sent is never sent again;
// one refused for good (a 5xx answer, a bad address) is not retried.
import { createHash } from "node:crypto";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { Transporter } from "nodemailer";
import type PgBoss from "pg-boss";
import { emailLog, emailPreference, notification } from "../../db/schema";
import { appBoss } from "../../jobs/boss.server";
import { DELIVER_QUEUE } from "../../jobs/queues";
import { db } from "../../lib/db.server";
import { env } from "../../lib/env.server";
import { defaultTransport, permanentSmtpFailure, smtpTransport } from "../../lib/mail.server";

export type OutgoingEmail = {
  /** the kind of message, e.g. "retest", "invitation"; users can switch kinds off */
  kind: string;
  to: string;
  userId?: string | null;
  tubId?: string | null;
  /** one message per event: the same key is never sent twice */
  dedupeKey: string;
  subject: string;
  text: string;
  html: string;
  headers?: Record<string, string>;
  /** inline pictures, referenced from the HTML as cid:<cid> */
  attachments?: { filename: string; contentType: string; cid: string; contentBase64: string }[];
  /** also list it in the user's in-app notifications */
  notification?: { title: string; body: string; link: string | null };
};

export type EnqueueResult = { queued: boolean; jobId: string | null };

/**
 * Queues an e-mail to be sent by the worker, at `startAfter` or as soon as
 * possible. Calling it again with the same dedupeKey does nothing
 * ({ queued: false }). Safe to call from loaders and actions.
 */
export async function enqueueEmail(mail: OutgoingEmail, opts: { boss?: PgBoss; startAfter?: Date } = {}): Promise<EnqueueResult> {
  const boss = opts.boss ?? (await appBoss());
  const client = await db.$client.connect();
  try {
    await client.query("begin");
    const claimed = await client.query(
      `insert into email_log (user_id, kind, dedupe_key, to_address, subject, status)
       values ($1, $2, $3, $4, $5, 'queued') on conflict (dedupe_key) do nothing returning id`,
      [mail.userId ?? null, mail.kind, mail.dedupeKey, mail.to, mail.subject],
    );
    if (claimed.rowCount === 0) {
      await client.query("rollback");
      return { queued: false, jobId: null };
    }
    const jobId = await boss.send(DELIVER_QUEUE, mail, {
      startAfter: opts.startAfter,
      db: { executeSql: (text: string, values: unknown[]) => client.query(text, values) },
    });
    await client.query("update email_log set job_id = $1 where id = $2", [jobId, claimed.rows[0].id]);
    await client.query("commit");
    return { queued: true, jobId };
  } catch (error) {
    await client.query("rollback").catch(() => {});
    throw error;
  } finally {
    client.release();
  }
}

export { smtpTransport };

export type DeliverOutcome = "sent" | "already-sent" | "switched-off" | "refused";

/** Thrown when another worker holds the message right now: the job is retried later and then finds it sent (or sends it). */
export class EmailBeingSent extends Error {}

/** The Message-ID a message keeps across every attempt (so a repeat after a crash is recognisably the same message). */
function messageIdFor(dedupeKey: string) {
  const domain = /@([^>\s]+)>?\s*$/.exec(env().MAIL_FROM)?.[1] ?? "dipwell.invalid";
  return `<${createHash("sha256").update(dedupeKey).digest("hex").slice(0, 32)}@${domain}>`;
}

/**
 * Sends one queued e-mail. Throws when the SMTP server fails for now, after
 * recording the failure (status "failed", or "dead" on the last attempt), so
 * pg-boss retries the job with back-off. A refusal for good is recorded as
 * "dead" at once and not thrown: there is nothing to retry.
 */
export async function deliverEmail(
  mail: OutgoingEmail,
  opts: { transport?: Transporter; finalAttempt?: boolean; leaseSeconds?: number } = {},
): Promise<DeliverOutcome> {
  // The user may have switched this kind off while the message waited out quiet hours.
  if (mail.userId) {
    const pref = await db.query.emailPreference.findFirst({ where: eq(emailPreference.userId, mail.userId) });
    if (pref?.disabledKinds.includes(mail.kind)) {
      await db
        .update(emailLog)
        .set({ status: "skipped", lastError: "The user switched this kind of message off." })
        .where(and(eq(emailLog.dedupeKey, mail.dedupeKey), inArray(emailLog.status, ["queued", "failed"])));
      return "switched-off";
    }
    if (mail.notification) {
      await db
        .insert(notification)
        .values({ userId: mail.userId, tubId: mail.tubId ?? null, kind: mail.kind, dedupeKey: mail.dedupeKey, ...mail.notification })
        .onConflictDoNothing({ target: notification.dedupeKey });
    }
  }

  // Claim before sending: a queued or failed row, or one whose sender died (its lease ran out).
  // The lease outlasts the SMTP client's own time limits (10 s to connect, 10 s for the greeting,
  // 20 s of silence), so a live sender always finishes or fails before anyone may take over.
  const lease = opts.leaseSeconds ?? env().EMAIL_SEND_LEASE_SECONDS;
  const claimed = await db.execute<{ id: string; message_id: string; attempts: number }>(sql`
    update email_log
       set status = 'sending', attempts = attempts + 1, lease_until = now() + make_interval(secs => ${lease}),
           message_id = coalesce(message_id, ${messageIdFor(mail.dedupeKey)}), updated_at = now()
     where dedupe_key = ${mail.dedupeKey}
       and (status in ('queued', 'failed') or (status = 'sending' and (lease_until is null or lease_until < now())))
     returning id, message_id, attempts`);
  const row = claimed.rows[0];
  if (!row) {
    const [current] = await db.select({ status: emailLog.status }).from(emailLog).where(eq(emailLog.dedupeKey, mail.dedupeKey));
    if (current?.status === "sending") throw new EmailBeingSent(`"${mail.subject}" to ${mail.to} is being sent by another worker.`);
    return "already-sent";
  }

  const transport = opts.transport ?? defaultTransport();
  let info: { messageId?: string; response?: string };
  try {
    info = await transport.sendMail({
        from: env().MAIL_FROM,
        to: mail.to,
        subject: mail.subject,
        text: mail.text,
        html: mail.html,
        headers: mail.headers,
        messageId: row.message_id,
        attachments: mail.attachments?.map((a) => ({
          filename: a.filename, contentType: a.contentType, cid: a.cid, content: Buffer.from(a.contentBase64, "base64"),
        })),
      });
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    const refused = permanentSmtpFailure(error);
    await db
      .update(emailLog)
      .set({
        status: refused || opts.finalAttempt ? "dead" : "failed",
        lastError: (refused ? `Refused for good by the mail server, not retried: ${message}` : message).slice(0, 1000),
        leaseUntil: null,
      })
      // only while this attempt still holds the message (another worker may have taken it over)
      .where(and(eq(emailLog.id, row.id), eq(emailLog.status, "sending"), eq(emailLog.attempts, row.attempts)));
    if (refused) return "refused";
    throw new Error(`Could not send "${mail.subject}" to ${mail.to}: ${message}`);
  }
  await db
    .update(emailLog)
    .set({ status: "sent", sentAt: new Date(), lastError: null, leaseUntil: null, messageId: info.messageId ?? row.message_id, smtpResponse: info.response?.slice(0, 500) ?? null })
    .where(eq(emailLog.id, row.id));
  return "sent";
}

/**
 * Recovery of messages whose worker died: rows still "sending" after their
 * lease ran out, and rows waiting ("queued", "failed") whose delivery job a
 * worker fetched more than a lease ago and never finished. Their jobs stay
 * marked active until pg-boss expires them, minutes later; instead each gets a
 * fresh job at once, queued in the same transaction that hands the row back,
 * and the old job is cancelled. A worker that was only slow finds the message
 * sent (or being sent) and sends nothing. Returns how many were handed back.
 * The worker runs this when it starts and then every half lease.
 */
export async function recoverStalledEmails(boss: PgBoss, limit = 100): Promise<number> {
  const lease = env().EMAIL_SEND_LEASE_SECONDS;
  const stale = await db.execute<{ id: string; job_id: string | null; status: string }>(sql`
    (select id, job_id, status from email_log
      where status = 'sending' and lease_until < now()
      order by lease_until limit ${limit})
    union all
    (select l.id, l.job_id, l.status from email_log l
       join pgboss.job j on j.id = l.job_id and j.name = ${DELIVER_QUEUE}
      where l.status in ('queued', 'failed') and j.state = 'active'
        and j.started_on < now() - make_interval(secs => ${lease})
      limit ${limit})`);
  let recovered = 0;
  for (const r of stale.rows) {
    const job = r.job_id ? await boss.getJobById<OutgoingEmail>(DELIVER_QUEUE, r.job_id) : null;
    // A job waiting for its retry (pg-boss expired it already) will take the row over by itself.
    if (job && (job.state === "created" || job.state === "retry")) continue;
    if (!job || job.state !== "active") {
      if (r.status !== "sending") continue;
      await db
        .update(emailLog)
        .set({ status: "dead", leaseUntil: null, lastError: "The worker stopped while sending and the message's job is gone; it was not sent again." })
        .where(and(eq(emailLog.id, r.id), eq(emailLog.status, "sending")));
      continue;
    }
    const client = await db.$client.connect();
    try {
      await client.query("begin");
      const handedBack = await client.query(
        r.status === "sending"
          ? `update email_log set status = 'failed', lease_until = null, updated_at = now(),
                    last_error = 'The worker stopped while sending; sending it again.'
              where id = $1 and status = 'sending' and lease_until < now() returning id`
          : `update email_log set updated_at = now() where id = $1 and status in ('queued', 'failed') returning id`,
        [r.id],
      );
      if (handedBack.rowCount === 0) {
        await client.query("rollback");
        continue;
      }
      const jobId = await boss.send(DELIVER_QUEUE, job.data, { db: { executeSql: (text: string, values: unknown[]) => client.query(text, values) } });
      await client.query("update email_log set job_id = $1 where id = $2", [jobId, r.id]);
      await client.query("commit");
      recovered++;
    } catch (error) {
      await client.query("rollback").catch(() => {});
      throw error;
    } finally {
      client.release();
    }
    // The old job belonged to the dead worker; stop it so nobody runs it later (it would find the message sent anyway).
    await boss.cancel(DELIVER_QUEUE, r.job_id!).catch(() => {});
  }
  return recovered;
}
