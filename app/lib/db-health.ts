// Telling "the database is unreachable for now" (a restart, a failover, too many
// connections) apart from a real bug, so the app can answer "try again in a
// moment" and the worker can wait, instead of either crashing.

/** PostgreSQL error classes that mean the server is unavailable, not that the query is wrong. */
const UNAVAILABLE_SQLSTATES = new Set([
  "57P01", // admin_shutdown (the server is stopping or restarting)
  "57P02", // crash_shutdown
  "57P03", // cannot_connect_now (starting up, in recovery)
  "53300", // too_many_connections
]);
const UNAVAILABLE_NODE_CODES = new Set(["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EPIPE", "EHOSTUNREACH", "ENOTFOUND", "EAI_AGAIN"]);
const UNAVAILABLE_MESSAGES = [
  /connection terminated/i,
  /timeout exceeded when trying to connect/i,
  /client has encountered a connection error/i,
  /connection is not open|not queryable/i,
  /terminating connection due to administrator command/i,
  /the database system is (starting up|shutting down|in recovery mode)/i,
];

/**
 * True when `error` (or anything in its `cause` chain: query builders and the
 * auth library wrap driver errors) says PostgreSQL could not be reached.
 */
export function databaseUnavailable(error: unknown): boolean {
  const seen = new Set<unknown>();
  let e: unknown = error;
  while (e && typeof e === "object" && !seen.has(e)) {
    seen.add(e);
    const { code, message } = e as { code?: unknown; message?: unknown };
    if (typeof code === "string" && (UNAVAILABLE_SQLSTATES.has(code) || code.startsWith("08") || UNAVAILABLE_NODE_CODES.has(code))) return true;
    if (typeof message === "string" && UNAVAILABLE_MESSAGES.some((re) => re.test(message))) return true;
    if (e instanceof AggregateError && e.errors.some((inner) => databaseUnavailable(inner))) return true;
    e = (e as { cause?: unknown }).cause;
  }
  return false;
}

let downSince: number | null = null;
let lastNote = 0;

/**
 * Logs a lost database connection once per outage rather than once per query or
 * poll, so an outage is one line in the log, not thousands.
 */
export function noteDatabaseError(error: unknown, what = "database unavailable") {
  const now = Date.now();
  if (downSince === null) downSince = now;
  if (now - lastNote < 30_000) return;
  lastNote = now;
  console.error(`${what}: ${(error as Error)?.message ?? String(error)} (will keep trying)`);
}

/** When the current outage began (ms since the epoch), or null while the database answers. */
export function databaseDownSince() {
  return downSince;
}

/** Logs once that the database answers again after an outage. */
export function noteDatabaseBack() {
  if (downSince === null) return;
  console.log(`database reachable again after ${Math.round((Date.now() - downSince) / 1000)} s`);
  downSince = null;
  lastNote = 0;
}
