// The fault tests get a database of their own, cloned fresh from the migrated
// template for each file, and run one file at a time (they restart PostgreSQL).
import pg from "pg";

const adminUrl = process.env.TEST_ADMIN_DATABASE_URL;
if (!adminUrl || !process.env.DIPWELL_PG_FOLDER) {
  throw new Error("The fault tests need the services that `npm test` starts. Run them with: npm run test:faults");
}
const client = new pg.Client({ connectionString: adminUrl });
await client.connect();
try {
  await client.query(`drop database if exists "dipwell_faults" with (force)`);
  await client.query(`create database "dipwell_faults" template "dipwell_template"`);
} finally {
  await client.end();
}
const url = new URL(adminUrl);
url.pathname = "/dipwell_faults";
process.env.DATABASE_URL = url.toString();
