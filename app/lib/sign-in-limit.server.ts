// One limiter for every way to try a password: the sign-in form, better-auth's
// HTTP endpoints (sign-in, change password, delete account) and its server API.
// It runs as a better-auth "before" hook (app/lib/auth.server.ts), so no path
// skips it. Attempts are counted in PostgreSQL (table password_attempt), per
// client address and per account, in fixed windows, so several app servers share
// the counts. A successful attempt clears the account's count and is not held
// against the address.
import { randomBytes } from "node:crypto";
import { sql } from "drizzle-orm";
import type { RouterContextProvider } from "react-router";
import { clientAddressContext } from "./context";
import { db } from "./db.server";

export const WINDOW_SECONDS = 15 * 60;
/** Attempts allowed in one window, per account and per client address. */
export const LIMITS: { account: number; address: number } = { account: 10, address: 100 };

/** The endpoints (better-auth paths) that check a password. */
export const PASSWORD_PATHS = new Set(["/sign-in/email", "/change-password", "/delete-user", "/verify-password"]);

/**
 * The request header that carries the client's address into better-auth's hooks.
 * Its name is random per process, so a header sent by a client can never pose as it.
 */
export const CLIENT_ADDRESS_HEADER = `x-dipwell-client-${randomBytes(8).toString("hex")}`;

/** A copy of the request's headers with the client address (from the web server) for the limiter. */
export function headersWithClientAddress(request: Request, context: Readonly<RouterContextProvider>): Headers {
  const headers = new Headers(request.headers);
  const address = context.get(clientAddressContext);
  if (address) headers.set(CLIENT_ADDRESS_HEADER, address);
  return headers;
}

export type Keys = { address: string | null; account: string | null };

export function attemptKeys(headers: Headers | undefined, account: string | null): Keys {
  const address = headers?.get(CLIENT_ADDRESS_HEADER) ?? null;
  return { address: address ? `address:${address}` : null, account: account ? `account:${account.trim().toLowerCase()}` : null };
}

/** Plain words for a wait of `seconds`. */
export function waitWords(seconds: number): string {
  if (seconds < 60) return `${Math.max(1, Math.ceil(seconds))} seconds`;
  const minutes = Math.ceil(seconds / 60);
  return minutes === 1 ? "1 minute" : `${minutes} minutes`;
}

export type Verdict = { ok: true } | { ok: false; retryAfterSeconds: number; message: string };

/** Counts one attempt against each key; refuses when a key is over its limit in the current window. */
export async function countAttempt(keys: Keys): Promise<Verdict> {
  const entries = [
    keys.account ? { key: keys.account, limit: LIMITS.account } : null,
    keys.address ? { key: keys.address, limit: LIMITS.address } : null,
  ].filter((x): x is { key: string; limit: number } => x !== null);
  if (!entries.length) return { ok: true };
  const values = sql.join(entries.map((e) => sql`(${e.key}, 1, now())`), sql`, `);
  const window = sql.raw(`interval '${WINDOW_SECONDS} seconds'`);
  const result = await db.execute<{ key: string; attempts: number; wait: number }>(sql`
    insert into password_attempt (key, attempts, window_start) values ${values}
    on conflict (key) do update set
      attempts = case when password_attempt.window_start <= now() - ${window} then 1 else password_attempt.attempts + 1 end,
      window_start = case when password_attempt.window_start <= now() - ${window} then now() else password_attempt.window_start end
    returning key, attempts, extract(epoch from (window_start + ${window} - now()))::float8 as wait`);
  if (Math.random() < 0.02) void sweepOldAttempts().catch(() => {});
  let wait = 0;
  for (const row of result.rows) {
    const limit = entries.find((e) => e.key === row.key)!.limit;
    if (Number(row.attempts) > limit) wait = Math.max(wait, Number(row.wait));
  }
  if (wait <= 0) return { ok: true };
  const retryAfterSeconds = Math.max(1, Math.ceil(wait));
  return {
    ok: false,
    retryAfterSeconds,
    message: `Too many password attempts. For your account's safety, wait ${waitWords(retryAfterSeconds)} and try again.`,
  };
}

/** After a successful attempt: the account starts afresh and the address gets its attempt back. */
export async function forgiveAttempt(keys: Keys): Promise<void> {
  if (keys.account) await db.execute(sql`delete from password_attempt where key = ${keys.account}`);
  if (keys.address) {
    await db.execute(sql`update password_attempt set attempts = greatest(attempts - 1, 0) where key = ${keys.address}`);
  }
}

/** Counts from windows that ended long ago are of no use. */
export async function sweepOldAttempts(): Promise<void> {
  await db.execute(sql`delete from password_attempt where window_start < now() - interval '1 day'`);
}
