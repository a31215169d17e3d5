// `npm start`: everything Dipwell needs on one machine, on 127.0.0.1, then the
// app on http://localhost:3000. Ctrl-C stops every child; data is kept in .dev/.
import { spawnSync } from "node:child_process";
import path from "node:path";
import { DEMO_PASSWORD, DEMO_USERS } from "./demo";
import { migrateDatabase } from "./migrate";
import { DEV_PORTS as P } from "./ports";
import {
  SetupError, assertPortFree, createDatabase, serviceEnv, startMailCatcher, startPostgres,
  startS3, stopChildren, superviseService, waitForPort,
} from "./services";

const root = process.cwd();
const publicUrl = `http://localhost:${P.app}`;
let postgres: Awaited<ReturnType<typeof startPostgres>> | undefined;

async function main() {
  console.log("Starting PostgreSQL…");
  const pg = (postgres = await startPostgres({ projectRoot: root, folder: ".dev", port: P.postgres }));
  let stopped = false;
  const stop = () => {
    if (stopped) return;
    stopped = true;
    console.log("\nStopping Dipwell…");
    stopChildren();
    pg.stop();
    process.exit(0);
  };
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);

  await createDatabase(pg.url("postgres"), "dipwell");
  const databaseUrl = pg.url("dipwell");
  console.log("Applying migrations…");
  await migrateDatabase(databaseUrl, root);

  console.log("Starting the S3 fake and the mail catcher…");
  await startS3({
    projectRoot: root, dataDir: path.join(root, ".dev", "s3"), port: P.s3, bucket: "dipwell-photos",
    allowedOrigins: [publicUrl, `http://127.0.0.1:${P.app}`],
  });
  await startMailCatcher({ projectRoot: root, dataDir: path.join(root, ".dev", "mail"), smtpPort: P.smtp, webPort: P.mailWeb });

  const env = {
    ...serviceEnv({ databaseUrl, s3Port: P.s3, smtpPort: P.smtp, mailWebPort: P.mailWeb, publicUrl, dataDir: path.join(root, ".dev") }),
    NODE_ENV: "production",
    PORT: String(P.app),
    HOST: "127.0.0.1",
  };
  Object.assign(process.env, env);
  try {
    (await import("../lib/env.server")).env();
  } catch (error) {
    throw new SetupError((error as Error).message);
  }

  console.log("Seeding the demo scenario…");
  const { seedDemo } = await import("./seed");
  await seedDemo();

  console.log("Building the app…");
  const build = spawnSync(path.join(root, "node_modules", ".bin", "react-router"), ["build"], { cwd: root, stdio: ["ignore", "ignore", "inherit"], env: process.env });
  if (build.status !== 0) throw new SetupError("The app did not build; see the messages above.");

  await assertPortFree(P.app, "the Dipwell app");
  // Supervised: a child that dies (a crash, an out-of-memory kill) is started again, and the log says so.
  superviseService("app", process.execPath, ["app/ops/server.mjs", "./build/server/index.js"], { cwd: root, env, quiet: true });
  superviseService("worker", process.execPath, ["--import", "tsx", "app/jobs/worker.ts"], { cwd: root, env });
  await waitForPort(P.app, "the Dipwell app", 60_000);

  console.log(`
Dipwell is running: ${publicUrl}

Demo sign-ins (password for all: ${DEMO_PASSWORD}):
${DEMO_USERS.map((u) => `  ${u.role.padEnd(11)} ${u.email}`).join("\n")}

Mail catcher: sign in as the admin and open ${publicUrl}/dev/inbox
Press Ctrl-C to stop everything. Data is kept in .dev/ for the next start.
`);
}

main().catch((error) => {
  console.error(error instanceof SetupError ? error.message : error);
  stopChildren();
  postgres?.stop();
  process.exit(1);
});
