import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "../db/schema";
import { databaseUnavailable, noteDatabaseError } from "./db-health";
import { env } from "./env.server";
import { processGlobal } from "./process-global";

function connect() {
  const pool = new pg.Pool({
    connectionString: env().DATABASE_URL,
    max: 10,
    // During a database restart a request waits at most this long for a connection, then fails
    // (and is answered "try again in a moment") instead of hanging.
    connectionTimeoutMillis: 5_000,
  });
  // An idle connection that the server closes (a restart, a failover) emits "error" on the pool.
  // Without a listener Node would stop the whole process; the pool drops that client by itself
  // and opens a new one on the next query.
  pool.on("error", (error) => noteDatabaseError(error, "database connection lost"));
  // A connection lost while checked out (inside a transaction, between two statements) emits
  // "error" on the client itself, where the pool no longer listens: keep a listener on every
  // client for its whole life. The statement in flight fails on its own, and the pool discards
  // the broken client when it is released.
  pool.on("connect", (client) => client.on("error", (error) => noteDatabaseError(error, "database connection lost")));
  return drizzle({ client: pool, schema });
}

type Db = ReturnType<typeof connect>;
/** One pool per process, kept across dev reloads. */
export const db: Db = processGlobal<Db>("db").once(connect);
export { schema };

/** True when PostgreSQL answers a trivial query within `timeoutMs`. */
export async function databaseReachable(timeoutMs = 2_000): Promise<boolean> {
  let timer: NodeJS.Timeout | undefined;
  try {
    await Promise.race([
      db.$client.query("select 1"),
      new Promise((_, reject) => (timer = setTimeout(() => reject(new Error("database probe timed out")), timeoutMs))),
    ]);
    return true;
  } catch (error) {
    if (!databaseUnavailable(error) && !(error instanceof Error && error.message === "database probe timed out")) throw error;
    return false;
  } finally {
    clearTimeout(timer);
  }
}
