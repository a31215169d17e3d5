// The outbox: every e-mail Dipwell sends on a schedule goes through here.
//
// enqueueEmail() claims the message's dedupe key in email_log and queues a
// pg-boss job in the same database transaction, so a message is queued once or
// not at all. deliverEmail() (the job) claims the row again before talking to
// the SMTP server and marks it sent afterwards: a retry, a second worker or a
// restarted worker finds it sent (or being sent) and sends nothing.
import { and, eq, inArray, sql } from "drizzle-orm";
import type { Transporter } from "nodemailer";
import type PgBoss from "pg-boss";
import { emailLog, emailPreference, notification } from "../../db/schema";
import { appBoss } from "../../jobs/boss.server";
import { DELIVER_QUEUE } from "../../jobs/queues";
import { db } from "../../lib/db.server";
import { env } from "../../lib/env.server";
import { defaultTransport, smtpTransport } from "../../lib/mail.server";

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



export type DeliverOutcome = "sent" | "already-sent" | "switched-off";

/**
 * Sends one queued e-mail. Throws when the SMTP server fails, after recording
 * the failure (status "failed", or "dead" on the last attempt), so pg-boss
 * retries the job with back-off.
 */
export async function deliverEmail(
  mail: OutgoingEmail,
  opts: { transport?: Transporter; finalAttempt?: boolean } = {},
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

  // Claim before sending. A row already "sending" belongs to a worker that may
  // have handed the message to the SMTP server before it stopped: leave it.
  const [claimed] = await db
    .update(emailLog)
    .set({ status: "sending", attempts: sql`${emailLog.attempts} + 1` })
    .where(and(eq(emailLog.dedupeKey, mail.dedupeKey), inArray(emailLog.status, ["queued", "failed"])))
    .returning({ id: emailLog.id });
  if (!claimed) return "already-sent";

  const transport = opts.transport ?? defaultTransport();
  try {
    await transport.sendMail({
      from: env().MAIL_FROM,
      to: mail.to,
      subject: mail.subject,
      text: mail.text,
      html: mail.html,
      headers: mail.headers,
      attachments: mail.attachments?.map((a) => ({
        filename: a.filename, contentType: a.contentType, cid: a.cid, content: Buffer.from(a.contentBase64, "base64"),
      })),
    });
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    await db
      .update(emailLog)
      .set({ status: opts.finalAttempt ? "dead" : "failed", lastError: message.slice(0, 1000) })
      .where(eq(emailLog.id, claimed.id));
    throw new Error(`Could not send "${mail.subject}" to ${mail.to}: ${message}`);
  }
  await db.update(emailLog).set({ status: "sent", sentAt: new Date(), lastError: null }).where(eq(emailLog.id, claimed.id));
  return "sent";
}
