// Sign-in with better-auth: e-mail and password, e-mail verification and
// password reset by e-mail, and roles through the admin plugin.
import { betterAuth } from "better-auth";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { admin as adminPlugin } from "better-auth/plugins";
import { account, session, user, verification } from "../db/schema";
import { db } from "./db.server";
import { resetPasswordMail, verifyEmailMail } from "./emails";
import { env } from "./env.server";
import { sendMail } from "./mail.server";
import { ac, roles } from "./permissions";

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
        await sendMail({ to: user.email, ...resetPasswordMail(user.name, url) });
      },
    },
    emailVerification: {
      sendOnSignUp: true,
      sendOnSignIn: true,
      autoSignInAfterVerification: true,
      expiresIn: 60 * 60 * 24,
      sendVerificationEmail: async ({ user, url }) => {
        await sendMail({ to: user.email, ...verifyEmailMail(user.name, url) });
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
