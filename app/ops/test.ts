// `npm test`: the same set-up as `npm start`, isolated for tests (its own
// cluster in .test-run/, its own ports, fresh databases), then the type check,
// Vitest (unit, integration against real PostgreSQL, s3rver and SMTP) and the
// browser tests in Debian's Chromium against the production build; last, on
// their own, the fault tests (tests/faults: PostgreSQL restarted, the worker
// killed mid-send, the app killed mid-registration). `npm run test:faults`
// (`--faults`) runs only those.
import { spawn, spawnSync } from "node:child_process";
import { existsSync, readFileSync, rmSync } from "node:fs";
import path from "node:path";
import { migrateDatabase } from "./migrate";
import { FAULT_PORTS, TEST_PORTS as P, TEST_SLOT } from "./ports";
import {
  SetupError, aptGet, assertPortFree, createDatabase, serviceEnv, spawnService, startMailCatcher, startPostgres,
  startS3, stopChildren, waitForPort,
} from "./services";

const root = process.cwd();
const publicUrl = `http://127.0.0.1:${P.app}`;
const slotSuffix = TEST_SLOT ? `-${TEST_SLOT}` : "";
const run = path.join(root, `.test-run${slotSuffix}`);
const buildDir = `build${slotSuffix}`;
const bin = (name: string) => path.join(root, "node_modules", ".bin", name);

function ensureChromium() {
  const candidates = [process.env.CHROMIUM_PATH, "/usr/bin/chromium", "/usr/bin/chromium-browser"].filter(Boolean) as string[];
  const found = candidates.find((c) => existsSync(c));
  if (found) return found;
  if (process.getuid?.() !== 0) throw new SetupError("Chromium is not installed. Install Debian's package: sudo apt-get install -y chromium");
  console.log("Installing Chromium (apt-get install chromium)…");
  aptGet(["update"]);
  const r = aptGet(["install", "-y", "--no-install-recommends", "chromium", "fonts-dejavu-core"]);
  if (r.status !== 0 || !existsSync("/usr/bin/chromium")) throw new SetupError("Could not install Chromium with apt-get.");
  return "/usr/bin/chromium";
}

function step(title: string, cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env) {
  console.log(`\n== ${title}`);
  const r = spawnSync(cmd, args, { cwd: root, stdio: "inherit", env });
  return r.status ?? 1;
}

async function main() {
  const faultsOnly = process.argv.includes("--faults");
  const vitestArgs = process.argv.slice(2).filter((a) => a !== "--faults");
  // The fault tests run after the rest (they restart the database under everything),
  // in a full run, with --faults, or when a file under tests/faults is named.
  const faultArgs = vitestArgs.filter((a) => a.includes("tests/faults"));
  const runFaults = faultsOnly || vitestArgs.length === 0 || faultArgs.length > 0;
  const mainArgs = vitestArgs.filter((a) => !a.includes("tests/faults"));
  const runMain = !faultsOnly && !(faultArgs.length > 0 && mainArgs.length === 0);
  const chromium = ensureChromium();
  for (const d of ["s3", "mail"]) rmSync(path.join(run, d), { recursive: true, force: true });

  console.log("Starting the test services…");
  const postgres = await startPostgres({ projectRoot: root, folder: `.test-run${slotSuffix}`, port: P.postgres });
  const cleanup = () => {
    stopChildren();
    postgres.stop();
  };
  process.on("SIGINT", () => (cleanup(), process.exit(130)));
  process.on("SIGTERM", () => (cleanup(), process.exit(143)));

  try {
    const admin = postgres.url("postgres");
    await createDatabase(admin, "dipwell_template", { fresh: true });
    // Each Vitest worker clones the template once; clones from an earlier run lack newer migrations.
    await dropWorkerDatabases(admin);
    await migrateDatabase(postgres.url("dipwell_template"), root);
    await createDatabase(admin, "dipwell_e2e", { fresh: true, template: "dipwell_template" });
    await startS3({ projectRoot: root, dataDir: path.join(run, "s3"), port: P.s3, bucket: "dipwell-photos", allowedOrigins: [publicUrl] });
    await startMailCatcher({ projectRoot: root, dataDir: path.join(run, "mail"), smtpPort: P.smtp, webPort: P.mailWeb });

    const env: NodeJS.ProcessEnv = {
      ...process.env,
      ...serviceEnv({ databaseUrl: postgres.url("dipwell_e2e"), s3Port: P.s3, smtpPort: P.smtp, mailWebPort: P.mailWeb, publicUrl, dataDir: run }),
      DIPWELL_TEST_RUN: "1",
      TEST_ADMIN_DATABASE_URL: admin,
      TEST_DATABASE_URL_PATTERN: postgres.url("dipwell_w{id}"),
      E2E_BASE_URL: publicUrl,
      CHROMIUM_PATH: chromium,
      DIPWELL_BUILD_DIR: buildDir,
    };

    let failed = 0;
    failed += step("Type check", bin("react-router"), ["typegen"], env);
    failed += step("Type check (tsc)", bin("tsc"), ["--noEmit"], env);

    console.log("\n== Seeding the browser tests' database and building the app");
    Object.assign(process.env, { DATABASE_URL: env.DATABASE_URL });
    const { seedDemo } = await import("./seed");
    await seedDemo();
    const build = spawnSync(bin("react-router"), ["build"], { cwd: root, stdio: ["ignore", "ignore", "inherit"], env: { ...env, NODE_ENV: "production" } });
    if (build.status !== 0) throw new SetupError("The app did not build; see the messages above.");

    await assertPortFree(P.app, "the Dipwell app under test");
    const appEnv = { ...env, NODE_ENV: "production", PORT: String(P.app), HOST: "127.0.0.1" };
    spawnService("app", process.execPath, ["app/ops/server.mjs", `./${buildDir}/server/index.js`], { cwd: root, env: appEnv, quiet: true });
    if (existsSync(path.join(root, "app", "jobs", "worker.ts"))) {
      spawnService("worker", process.execPath, ["--import", "tsx", "app/jobs/worker.ts"], { cwd: root, env: appEnv, quiet: true });
    }
    await waitForPort(P.app, "the Dipwell app", 60_000);

    const resultFiles: string[] = [];
    const vitest = async (title: string, name: string, args: string[], extraEnv: NodeJS.ProcessEnv = {}) => {
      console.log(`\n== ${title}`);
      const results = path.join(run, `vitest-${name}.json`);
      rmSync(results, { force: true });
      resultFiles.push(results);
      return new Promise<number>((resolve) => {
        const child = spawn(bin("vitest"), ["run", "--reporter=default", "--reporter=json", `--outputFile.json=${results}`, ...args], { cwd: root, stdio: "inherit", env: { ...env, ...extraEnv } });
        child.on("exit", (c) => resolve(c ?? 1));
      });
    };
    if (runMain) failed += await vitest("Vitest: unit, integration and browser tests", "results", mainArgs);
    if (runFaults) {
      failed += await vitest("Fault tests: database restart, worker and app killed", "faults", ["--project", "faults", ...faultArgs], {
        DIPWELL_FAULTS: "1",
        DIPWELL_PG_FOLDER: `.test-run${slotSuffix}`,
        DIPWELL_PG_PORT: String(P.postgres),
        DIPWELL_FAULT_APP_PORT: String(FAULT_PORTS.app),
        DIPWELL_FAULT_SMTP_PROXY_PORT: String(FAULT_PORTS.smtpProxy),
        DIPWELL_REAL_SMTP_PORT: String(P.smtp),
      });
    }
    cleanup();
    printSummary(resultFiles, failed);
    process.exit(failed ? 1 : 0);
  } catch (error) {
    cleanup();
    throw error;
  }
}

/** The plain closing line: "N passed, N failed" (and skipped), from Vitest's JSON reports. */
function printSummary(files: string[], failedSteps: number) {
  const reports = files.filter((f) => existsSync(f)).map(
    (f) => JSON.parse(readFileSync(f, "utf8")) as { numPassedTests: number; numFailedTests: number; numPendingTests: number; numTodoTests: number },
  );
  const sum = (k: "numPassedTests" | "numFailedTests" | "numPendingTests" | "numTodoTests") => reports.reduce((n, r) => n + r[k], 0);
  const skipped = sum("numPendingTests") + sum("numTodoTests");
  // A failed type check counts as a failure too, so the line never reads as a pass when the run failed.
  const failed = sum("numFailedTests") + (failedSteps && !sum("numFailedTests") ? 1 : 0);
  console.log(`\n${sum("numPassedTests")} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
}

async function dropWorkerDatabases(adminUrl: string) {
  const { default: pg } = await import("pg");
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    const { rows } = await client.query<{ datname: string }>("select datname from pg_database where datname ~ '^dipwell_w[0-9]+$'");
    for (const r of rows) await client.query(`drop database if exists "${r.datname}" with (force)`);
  } finally {
    await client.end();
  }
}

main().catch((error) => {
  console.error(error instanceof SetupError ? error.message : error);
  stopChildren();
  process.exit(1);
});
