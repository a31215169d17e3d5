// Configuration from environment variables, validated once at start-up.
// Every variable has a local default that matches what `npm start` runs on
// 127.0.0.1; production points them at real services (see README.md).
import { z } from "zod";

const bool = z
  .enum(["true", "false", "1", "0"])
  .transform((v) => v === "true" || v === "1");

const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z
    .string()
    .url("DATABASE_URL must be a postgres:// URL")
    .default("postgres://dipwell@127.0.0.1:54329/dipwell"),
  PUBLIC_URL: z.string().url("PUBLIC_URL must be the address users open, e.g. https://dipwell.example").default("http://localhost:3000"),
  BETTER_AUTH_SECRET: z
    .string()
    .min(32, "BETTER_AUTH_SECRET must be at least 32 characters")
    .default("dipwell-local-development-secret-change-me"),
  S3_ENDPOINT: z.string().url("S3_ENDPOINT must be a URL").optional().default("http://127.0.0.1:4569"),
  S3_REGION: z.string().min(1).default("us-east-1"),
  S3_BUCKET: z.string().min(3, "S3_BUCKET must name a bucket").default("dipwell-photos"),
  S3_ACCESS_KEY_ID: z.string().min(1).default("S3RVER"),
  S3_SECRET_ACCESS_KEY: z.string().min(1).default("S3RVER"),
  S3_FORCE_PATH_STYLE: bool.default(true),
  SMTP_URL: z.string().regex(/^smtps?:\/\//, "SMTP_URL must start with smtp:// or smtps://").default("smtp://127.0.0.1:1026"),
  MAIL_FROM: z.string().min(3).default("Dipwell <no-reply@dipwell.test>"),
  /** the local mail catcher's web API, for the admin's dev inbox page; unset in production */
  MAIL_CATCHER_URL: z.string().url().optional(),
  /** SMTP connections the worker keeps open at once (several messages in flight) */
  SMTP_MAX_CONNECTIONS: z.coerce.number().int().min(1).max(50).default(5),
  /**
   * seconds a worker holds a message it is sending; when a worker dies mid-send, another one
   * takes the message over after this (keep it above the SMTP timeouts: 10 + 10 + 20 s)
   */
  EMAIL_SEND_LEASE_SECONDS: z.coerce.number().int().min(2).max(3600).default(120),
  /** largest photo accepted, in bytes */
  MAX_PHOTO_BYTES: z.coerce.number().int().positive().default(15 * 1024 * 1024),
});

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

export function env(): Env {
  if (cached) return cached;
  const parsed = schema.safeParse(process.env);
  if (!parsed.success) {
    const first = parsed.error.issues[0];
    const message = `Configuration error: ${first.path.join(".")}: ${first.message}`;
    throw new Error(message);
  }
  if (parsed.data.NODE_ENV === "production" && parsed.data.BETTER_AUTH_SECRET.startsWith("dipwell-local")) {
    throw new Error("Configuration error: BETTER_AUTH_SECRET must be set to a secret of your own in production");
  }
  cached = parsed.data;
  return cached;
}
