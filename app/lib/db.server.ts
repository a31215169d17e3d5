import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "../db/schema";
import { env } from "./env.server";

function connect() {
  const pool = new pg.Pool({ connectionString: env().DATABASE_URL, max: 10 });
  return drizzle({ client: pool, schema });
}

type Db = ReturnType<typeof connect>;
const holder = globalThis as unknown as { __dipwellDb?: Db };

/** One pool per process, kept across dev reloads. */
export const db: Db = holder.__dipwellDb ?? (holder.__dipwellDb = connect());
export { schema };
