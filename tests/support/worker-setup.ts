// Each Vitest worker gets a database of its own, cloned from the migrated
// template that `npm test` prepared, so parallel workers never share rows.
import pg from "pg";
import { processGlobal } from "~/lib/process-global";

const pattern = process.env.TEST_DATABASE_URL_PATTERN;
const adminUrl = process.env.TEST_ADMIN_DATABASE_URL;
if (!pattern || !adminUrl) {
  throw new Error("Integration tests need the services that `npm test` starts. Run them with: npm test");
}
const id = process.env.VITEST_POOL_ID ?? "1";
const name = `dipwell_w${id}`;
const workerDb = processGlobal<string>("workerDb");
if (workerDb.get() !== name) {
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    const exists = await client.query("select 1 from pg_database where datname = $1", [name]);
    if (exists.rowCount === 0) {
      try {
        await client.query(`create database "${name}" template "dipwell_template"`);
      } catch (error) {
        if ((error as { code?: string }).code !== "42P04") throw error; // created meanwhile
      }
    }
  } finally {
    await client.end();
  }
  workerDb.set(name);
}
process.env.DATABASE_URL = pattern.replace("{id}", id);

// As in the app's server entry: sign-in's account e-mails leave through the outbox.
const { sendAccountMailWith } = await import("~/lib/auth.server");
const { enqueueEmail } = await import("~/features/notify/outbox.server");
sendAccountMailWith(enqueueEmail);
