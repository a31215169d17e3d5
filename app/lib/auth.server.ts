// Sign-in with better-auth: e-mail and password, e-mail verification and
// password reset by e-mail, and roles through the admin plugin.
import { createHash } from "node:crypto";
import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { admin as adminPlugin } from "better-auth/plugins";
import { account, session, user, verification } from "../db/schema";
import { db } from "./db.server";
import { resetPasswordMail, verifyEmailMail } from "./emails";
import { enqueueEmail } from "../features/notify/outbox.server";
import { env } from "./env.server";
import { ac, roles } from "./permissions";

// Account e-mails go through the outbox (app/features/notify): queued in
// PostgreSQL, sent by the worker, retried with back-off, listed at /admin/email.
const digest = (s: string) => createHash("sha256").update(s).digest("hex").slice(0, 24);

function createAuth() {
  const config = env();
  return betterAuth({
    appName: "Dipwell",
    baseURL: config.PUBLIC_URL,
    secret: config.BETTER_AUTH_SECRET,
    trustedOrigins: [config.PUBLIC_URL, config.PUBLIC_URL.replace("localhost", "127.0.0.1")],
    database: drizzleAdapter(db, { provider: "pg", schema: { user, session, account, verification } }),
    emailAndPassword: {
      enabled: true,
      requireEmailVerification: true,
      minPasswordLength: 8,
      resetPasswordTokenExpiresIn: 60 * 60,
      sendResetPassword: async ({ user, url }) => {
        await enqueueEmail({ kind: "reset_password", to: user.email, userId: user.id, dedupeKey: `reset_password:${user.id}:${digest(url)}`, ...resetPasswordMail(user.name, url) });
      },
    },
    emailVerification: {
      sendOnSignUp: true,
      sendOnSignIn: true,
      autoSignInAfterVerification: true,
      expiresIn: 60 * 60 * 24,
      sendVerificationEmail: async ({ user, url }) => {
        await enqueueEmail({ kind: "verify_email", to: user.email, userId: user.id, dedupeKey: `verify_email:${user.id}:${digest(url)}`, ...verifyEmailMail(user.name, url) });
      },
    },
    session: { expiresIn: 60 * 60 * 24 * 30, updateAge: 60 * 60 * 24 },
    rateLimit: { enabled: config.NODE_ENV === "production" && !process.env.DIPWELL_TEST_RUN },
    plugins: [adminPlugin({ ac, roles, defaultRole: "owner", adminRoles: ["admin"] })],
  });
}

type Auth = ReturnType<typeof createAuth>;
const holder = globalThis as unknown as { __dipwellAuth?: Auth };
export const auth: Auth = holder.__dipwellAuth ?? (holder.__dipwellAuth = createAuth());

export type SessionUser = Auth["$Infer"]["Session"]["user"];
