// Sign-in with better-auth: e-mail and password, e-mail verification and
// password reset by e-mail, and roles through the admin plugin.
import { createHash } from "node:crypto";
import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { APIError, createAuthMiddleware, getSessionFromCtx, isAPIError } from "better-auth/api";
import { and, eq, like, ne } from "drizzle-orm";
import { admin as adminPlugin } from "better-auth/plugins";
import { account, session, user, verification } from "../db/schema";
import { db } from "./db.server";
import { resetPasswordMail, verifyEmailMail } from "./emails";
import { env } from "./env.server";
import { ac, roles } from "./permissions";
import { processGlobal } from "./process-global";
import { CLIENT_ADDRESS_HEADER, PASSWORD_PATHS, attemptKeys, countAttempt, forgiveAttempt } from "./sign-in-limit.server";

// Account e-mails (address check, password reset) leave through the mailer the app
// plugs in at start-up (`sendAccountMailWith`): the outbox of app/features/notify, which
// queues them in PostgreSQL, sends them from the worker, retries with back-off and lists
// them at /admin/email. Sign-in sits below the features, so it names no feature itself.
const digest = (s: string) => createHash("sha256").update(s).digest("hex").slice(0, 24);

export const NAME_MAX = 80;

/** An account e-mail as sign-in hands it to the mailer. */
export type AccountMail = { kind: "verify_email" | "reset_password"; to: string; userId: string; dedupeKey: string; subject: string; text: string; html: string };
export type AccountMailer = (mail: AccountMail) => Promise<unknown>;

const accountMailer = processGlobal<AccountMailer>("accountMailer");

/** Plugs in how account e-mails leave (the app's outbox); every process that signs people up calls it once at start-up. */
export function sendAccountMailWith(mailer: AccountMailer) {
  accountMailer.set(mailer);
}

async function sendAccountMail(mail: AccountMail) {
  const mailer = accountMailer.get();
  if (!mailer) throw new Error("Account e-mail has no way out: call sendAccountMailWith (app/lib/auth.server.ts) with the outbox at start-up.");
  await mailer(mail);
}

type HookCtx = Parameters<Parameters<typeof createAuthMiddleware>[0]>[0];

/** The account a password attempt is for: the e-mail address typed, or the signed-in user. */
async function attemptAccount(ctx: HookCtx): Promise<string | null> {
  const typed = (ctx.body as { email?: unknown } | undefined)?.email;
  if (typeof typed === "string" && typed.trim()) return typed;
  const found = await getSessionFromCtx(ctx).catch(() => null);
  return found ? `user:${found.user.id}` : null;
}

const hasPassword = (ctx: HookCtx) => typeof (ctx.body as { password?: unknown; currentPassword?: unknown } | undefined)?.password === "string"
  || typeof (ctx.body as { currentPassword?: unknown } | undefined)?.currentPassword === "string";

/** Before every endpoint: the password limiter, and names of a sensible length however they arrive. */
const beforeHook = createAuthMiddleware(async (ctx) => {
  if (ctx.path === "/update-user" || ctx.path === "/sign-up/email") {
    const name = (ctx.body as { name?: unknown } | undefined)?.name;
    if (name !== undefined && (typeof name !== "string" || !name.trim() || name.length > NAME_MAX)) {
      throw new APIError("BAD_REQUEST", { code: "NAME_TOO_LONG", message: `Give a name of 1 to ${NAME_MAX} characters.` });
    }
  }
  if (PASSWORD_PATHS.has(ctx.path) && hasPassword(ctx)) {
    const verdict = await countAttempt(attemptKeys(ctx.headers, await attemptAccount(ctx)));
    if (!verdict.ok) {
      throw new APIError("TOO_MANY_REQUESTS", { code: "TOO_MANY_PASSWORD_ATTEMPTS", message: verdict.message }, { "Retry-After": String(verdict.retryAfterSeconds) });
    }
  }
});

/** After a password endpoint succeeds, the limiter forgives the attempt. */
const afterHook = createAuthMiddleware(async (ctx) => {
  if (!PASSWORD_PATHS.has(ctx.path) || !hasPassword(ctx)) return;
  if (ctx.context.returned === undefined || isAPIError(ctx.context.returned)) return;
  await forgiveAttempt(attemptKeys(ctx.headers, await attemptAccount(ctx)));
});

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
      // A new password signs out every device that had the old one.
      revokeSessionsOnPasswordReset: true,
      sendResetPassword: async ({ user, url, token }) => {
        // One outstanding reset link per account: a newer link ends every older one.
        await db.delete(verification).where(and(eq(verification.value, user.id), like(verification.identifier, "reset-password:%"), ne(verification.identifier, `reset-password:${token}`)));
        await sendAccountMail({ kind: "reset_password", to: user.email, userId: user.id, dedupeKey: `reset_password:${user.id}:${digest(url)}`, ...resetPasswordMail(user.name, url) });
      },
    },
    emailVerification: {
      sendOnSignUp: true,
      sendOnSignIn: true,
      autoSignInAfterVerification: true,
      expiresIn: 60 * 60 * 24,
      sendVerificationEmail: async ({ user, url }) => {
        await sendAccountMail({ kind: "verify_email", to: user.email, userId: user.id, dedupeKey: `verify_email:${user.id}:${digest(url)}`, ...verifyEmailMail(user.name, url) });
      },
    },
    session: { expiresIn: 60 * 60 * 24 * 30, updateAge: 60 * 60 * 24 },
    // better-auth's own limiter guards its other endpoints; password checks have ours (hooks), shared by every server.
    rateLimit: {
      enabled: config.NODE_ENV === "production" && !process.env.DIPWELL_TEST_RUN,
      customRules: Object.fromEntries([...PASSWORD_PATHS].map((p) => [p, false as const])),
    },
    advanced: { ipAddress: { ipAddressHeaders: [CLIENT_ADDRESS_HEADER] } },
    hooks: { before: beforeHook, after: afterHook },
    plugins: [adminPlugin({ ac, roles, defaultRole: "owner", adminRoles: ["admin"] })],
  });
}

type Auth = ReturnType<typeof createAuth>;
export const auth: Auth = processGlobal<Auth>("auth").once(createAuth);

export type SessionUser = Auth["$Infer"]["Session"]["user"];
