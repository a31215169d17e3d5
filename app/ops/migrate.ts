// Applies the SQL migrations committed in drizzle/ to DATABASE_URL.
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import pg from "pg";

export async function migrateDatabase(databaseUrl: string, projectRoot = process.cwd()) {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 1 });
  try {
    await migrate(drizzle({ client: pool }), { migrationsFolder: path.join(projectRoot, "drizzle") });
  } finally {
    await pool.end();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.error("Set DATABASE_URL to the database to migrate.");
    process.exit(2);
  }
  await migrateDatabase(url);
  console.log("Migrations applied.");
}
