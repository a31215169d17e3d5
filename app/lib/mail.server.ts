// Outgoing e-mail over SMTP with nodemailer: any provider in production
// (SMTP_URL), the local mail catcher when developing and testing. Messages are
// sent by the outbox (app/features/notify/outbox.server.ts), never directly.
import nodemailer, { type Transporter } from "nodemailer";
import { env } from "./env.server";

/**
 * A nodemailer transport for an smtp:// or smtps:// URL (SMTP_URL by default).
 * With `pool`, it keeps up to that many connections open and reuses them, so
 * several messages are on the wire at once.
 */
export function smtpTransport(smtpUrl = env().SMTP_URL, opts: { pool?: number } = {}): Transporter {
  const url = new URL(smtpUrl);
  const base = {
    host: url.hostname,
    port: Number(url.port) || (url.protocol === "smtps:" ? 465 : 587),
    secure: url.protocol === "smtps:",
    auth: url.username ? { user: decodeURIComponent(url.username), pass: decodeURIComponent(url.password) } : undefined,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  };
  return opts.pool ? nodemailer.createTransport({ ...base, pool: true, maxConnections: opts.pool, maxMessages: 500 }) : nodemailer.createTransport(base);
}

let transport: Transporter | undefined;

/** The process's shared, pooled transport to SMTP_URL. */
export function defaultTransport(): Transporter {
  return (transport ??= smtpTransport(env().SMTP_URL, { pool: env().SMTP_MAX_CONNECTIONS }));
}

/**
 * True when the SMTP server refused the message for good: a 5xx answer (no such
 * mailbox, address refused, message refused) or an address it could not even
 * take. Trying again would only give the same answer. A 5xx refusal of our own
 * sign-in (535) is a configuration fault that a fix makes go away, so it is retried.
 */
export function permanentSmtpFailure(error: unknown): boolean {
  const e = error as { responseCode?: number; code?: string };
  if (e?.code === "EAUTH") return false;
  if (typeof e?.responseCode === "number") return e.responseCode >= 500 && e.responseCode < 600;
  return e?.code === "EENVELOPE"; // no valid recipient address at all
}
