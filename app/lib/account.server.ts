// Sign-up, sign-in, sign-out and password reset as server actions, so the forms
// work without JavaScript. better-auth does the work; this turns its answers
// into plain words and carries its cookies onto our redirects.
import { data, type RouterContextProvider } from "react-router";
import { isAPIError } from "better-auth/api";
import { z } from "zod";
import { auth } from "./auth.server";
import { env } from "./env.server";
import { redirectWithCookies, safeRedirect } from "./session.server";
import { headersWithClientAddress } from "./sign-in-limit.server";

export type FormErrors = { form?: string; fields?: Record<string, string> };

const email = z.string().trim().toLowerCase().email("Enter an e-mail address like name@example.com");
const password = z.string().min(8, "Use at least 8 characters").max(128, "Use at most 128 characters");

function fieldErrors(error: z.ZodError): FormErrors {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) fields[String(issue.path[0])] ??= issue.message;
  return { fields };
}

async function authError(res: Response) {
  try {
    return (await res.json()) as { code?: string; message?: string };
  } catch {
    return {};
  }
}

export async function signIn(request: Request, form: FormData, context: Readonly<RouterContextProvider>) {
  const parsed = z.object({ email, password: z.string().min(1, "Enter your password").max(1024, "That password is too long") }).safeParse(Object.fromEntries(form));
  if (!parsed.success) return data(fieldErrors(parsed.error), { status: 400 });
  // The same endpoint, hooks and password limiter as better-auth's HTTP API.
  let res: Response;
  try {
    res = await auth.api.signInEmail({
      body: { email: parsed.data.email, password: parsed.data.password, callbackURL: "/tubs?verified=1" },
      headers: headersWithClientAddress(request, context),
      asResponse: true,
    });
  } catch (error) {
    // A refusal from a before-hook (the password limiter) is thrown, not returned.
    if (!isAPIError(error)) throw error;
    res = Response.json(error.body ?? {}, { status: error.statusCode, headers: error.headers });
  }
  if (res.ok) return redirectWithCookies(safeRedirect(form.get("redirectTo")), res);
  const { code, message } = await authError(res);
  if (code === "EMAIL_NOT_VERIFIED") {
    return data({ form: "Please confirm your e-mail address first. We have sent you a new confirmation link." }, { status: 403 });
  }
  if (res.status === 429) {
    const retryAfter = res.headers.get("retry-after");
    return data(
      { form: code === "TOO_MANY_PASSWORD_ATTEMPTS" && message ? message : "Too many attempts. Wait a minute and try again." },
      { status: 429, headers: retryAfter ? { "Retry-After": retryAfter } : undefined },
    );
  }
  return data({ form: "That e-mail address and password do not match an account." }, { status: 401 });
}

export async function signUp(request: Request, form: FormData) {
  const parsed = z
    .object({ name: z.string().trim().min(1, "Tell us your name").max(80, "Keep it under 80 characters"), email, password })
    .safeParse(Object.fromEntries(form));
  if (!parsed.success) return data(fieldErrors(parsed.error), { status: 400 });
  const res = await auth.api.signUpEmail({
    body: { ...parsed.data, callbackURL: "/tubs?verified=1" },
    headers: request.headers,
    asResponse: true,
  });
  if (res.ok) return redirectWithCookies(`/check-email?email=${encodeURIComponent(parsed.data.email)}`, res);
  const { code } = await authError(res);
  if (code === "USER_ALREADY_EXISTS" || code === "USER_ALREADY_EXISTS_USE_ANOTHER_EMAIL") {
    return data({ fields: { email: "An account with this e-mail address exists already. Sign in instead." } }, { status: 409 });
  }
  if (code === "PASSWORD_TOO_SHORT") return data({ fields: { password: "Use at least 8 characters" } }, { status: 400 });
  return data({ form: "We could not create the account just now. Please try again." }, { status: 500 });
}

export async function signOut(request: Request) {
  const res = await auth.api.signOut({ headers: request.headers, asResponse: true });
  return redirectWithCookies("/sign-in", res);
}

export async function requestPasswordReset(request: Request, form: FormData) {
  const parsed = z.object({ email }).safeParse(Object.fromEntries(form));
  if (!parsed.success) return data(fieldErrors(parsed.error), { status: 400 });
  // The same answer, in the same time, whether or not the address has an account:
  // the look-up and the queued e-mail happen after the answer, off the response path.
  const headers = new Headers(request.headers);
  setImmediate(() => {
    auth.api
      .requestPasswordReset({ body: { email: parsed.data.email, redirectTo: `${env().PUBLIC_URL}/reset-password` }, headers })
      .catch((error) => console.error("Password reset request failed:", error));
  });
  return { sent: true as const };
}

export async function resetPassword(form: FormData) {
  const parsed = z
    .object({ token: z.string().min(1, "This reset link is incomplete. Ask for a new one."), password })
    .safeParse(Object.fromEntries(form));
  if (!parsed.success) return data(fieldErrors(parsed.error), { status: 400 });
  try {
    await auth.api.resetPassword({ body: { token: parsed.data.token, newPassword: parsed.data.password } });
  } catch {
    return data({ form: "This reset link has expired or was used already. Ask for a new one." }, { status: 400 });
  }
  return { done: true as const };
}
