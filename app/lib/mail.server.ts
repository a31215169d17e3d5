// Outgoing e-mail over SMTP with nodemailer: any provider in production
// (SMTP_URL), the local mail catcher when developing and testing. Messages are
// sent by the outbox (app/features/notify/outbox.server.ts), never directly.
import nodemailer, { type Transporter } from "nodemailer";
import { env } from "./env.server";

/** A nodemailer transport for an smtp:// or smtps:// URL (SMTP_URL by default). */
export function smtpTransport(smtpUrl = env().SMTP_URL): Transporter {
  const url = new URL(smtpUrl);
  return nodemailer.createTransport({
    host: url.hostname,
    port: Number(url.port) || (url.protocol === "smtps:" ? 465 : 587),
    secure: url.protocol === "smtps:",
    auth: url.username ? { user: decodeURIComponent(url.username), pass: decodeURIComponent(url.password) } : undefined,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
}

let transport: Transporter | undefined;

/** The process's shared transport to SMTP_URL. */
export function defaultTransport(): Transporter {
  return (transport ??= smtpTransport());
}
