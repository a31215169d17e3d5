// Starts and stops the local services Dipwell runs against: a project-local
// PostgreSQL cluster, s3rver (the S3 API) and a mail catcher, all bound to
// 127.0.0.1. Used by `npm start` (start.ts) and `npm test` (test.ts).
import { type ChildProcess, execFileSync, spawn, spawnSync } from "node:child_process";
import { createHash, randomBytes } from "node:crypto";
import { appendFileSync, closeSync, existsSync, mkdirSync, openSync, readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import net from "node:net";
import path from "node:path";
import pg from "pg";

export class SetupError extends Error {}

const isRoot = typeof process.getuid === "function" && process.getuid() === 0;

/** Resolves when the port is free on 127.0.0.1; throws a one-line error otherwise. */
export async function assertPortFree(port: number, what: string) {
  await new Promise<void>((resolve, reject) => {
    const server = net.createServer();
    server.once("error", () =>
      reject(new SetupError(`Port ${port} on 127.0.0.1 is taken, so ${what} cannot start. Stop whatever uses it (e.g. \`ss -ltnp | grep ${port}\`) and try again.`)),
    );
    server.listen(port, "127.0.0.1", () => server.close(() => resolve()));
  });
}

export async function waitForPort(port: number, what: string, timeoutMs = 30_000) {
  const start = Date.now();
  while (Date.now() - start < timeoutMs) {
    const ok = await new Promise<boolean>((resolve) => {
      const socket = net.connect(port, "127.0.0.1");
      socket.once("connect", () => (socket.end(), resolve(true)));
      socket.once("error", () => resolve(false));
    });
    if (ok) return;
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new SetupError(`${what} did not start listening on 127.0.0.1:${port} within ${timeoutMs / 1000} s.`);
}

// ---------------------------------------------------------------- PostgreSQL

function findPostgresBin(): string | undefined {
  const base = "/usr/lib/postgresql";
  if (!existsSync(base)) return undefined;
  const versions = readdirSync(base)
    .filter((v) => existsSync(path.join(base, v, "bin", "postgres")))
    .sort((a, b) => Number(b) - Number(a));
  return versions.length ? path.join(base, versions[0], "bin") : undefined;
}

/** Finds Debian's PostgreSQL server, installing the `postgresql` package when it is absent. */
export function ensurePostgresInstalled(): string {
  let bin = findPostgresBin();
  if (bin) return bin;
  if (!isRoot) {
    throw new SetupError("PostgreSQL server is not installed. Install Debian's package: sudo apt-get install -y postgresql");
  }
  console.log("Installing PostgreSQL (apt-get install postgresql)…");
  aptGet(["update"]);
  const r = aptGet(["install", "-y", "--no-install-recommends", "postgresql"]);
  bin = findPostgresBin();
  if (r.status !== 0 || !bin) {
    throw new SetupError("Could not install PostgreSQL with apt-get. Install the `postgresql` package by hand and run the command again.");
  }
  return bin;
}

/**
 * Runs apt-get non-interactively. When another process (an unattended upgrade, a
 * second install) holds Debian's package lock, apt waits for it, up to ten
 * minutes, instead of failing at once.
 */
export function aptGet(args: string[]) {
  const env = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  // `apt-get update` does not honour DPkg::Lock::Timeout for its lists lock on every
  // release, so wait for the lock files here as well.
  waitForPackageLocks(600_000);
  return spawnSync("apt-get", ["-o", "DPkg::Lock::Timeout=600", ...args], { stdio: "inherit", env });
}

const APT_LOCKS = ["/var/lib/dpkg/lock-frontend", "/var/lib/dpkg/lock", "/var/lib/apt/lists/lock", "/var/cache/apt/archives/lock"];

/** True while some process holds a POSIX lock on one of Debian's package lock files (read from /proc/locks). */
function packageLockHeld(): boolean {
  let locks: string;
  try {
    locks = readFileSync("/proc/locks", "utf8");
  } catch {
    return false;
  }
  const held = new Set(locks.split("\n").map((line) => line.trim().split(/\s+/)[5]?.split(":")[2]).filter(Boolean));
  return APT_LOCKS.some((file) => {
    try {
      return held.has(String(statSync(file).ino));
    } catch {
      return false;
    }
  });
}

function waitForPackageLocks(timeoutMs: number) {
  const start = Date.now();
  let said = false;
  while (packageLockHeld() && Date.now() - start < timeoutMs) {
    if (!said) console.log("Another program is installing Debian packages; waiting for it to finish…");
    said = true;
    spawnSync("sleep", ["2"]);
  }
}

/** Runs a PostgreSQL program; as root, as the `postgres` user (the server refuses to run as root). */
function runPg(bin: string, program: string, args: string[], opts: { quiet?: boolean } = {}) {
  const exe = path.join(bin, program);
  const [cmd, argv] = isRoot ? ["runuser", ["-u", "postgres", "--", exe, ...args]] : [exe, args];
  const r = spawnSync(cmd, argv, { encoding: "utf8" });
  if (r.status !== 0 && !opts.quiet) {
    throw new SetupError(`${program} failed: ${(r.stderr || r.stdout || "").trim().split("\n").slice(-3).join(" ")}`);
  }
  return r;
}

/**
 * A directory the `postgres` user can reach. The project folder is used when it
 * is traversable; otherwise (a home folder closed to others) a folder under
 * /var/tmp named after the project path.
 */
function clusterHome(projectRoot: string, name: string) {
  const preferred = path.join(projectRoot, name);
  if (!isRoot) return preferred;
  const probe = spawnSync("runuser", ["-u", "postgres", "--", "test", "-x", projectRoot]);
  if (probe.status === 0) return preferred;
  const hash = createHash("sha1").update(projectRoot).digest("hex").slice(0, 10);
  return path.join("/var/tmp", `dipwell-${hash}`, name);
}

export type Postgres = { url: (db: string) => string; port: number; stop: () => void; dataDir: string };

export async function startPostgres(opts: { projectRoot: string; folder: string; port: number }): Promise<Postgres> {
  const bin = ensurePostgresInstalled();
  const home = clusterHome(opts.projectRoot, opts.folder);
  const dataDir = path.join(home, "pg");
  const runDir = path.join(home, "run");
  const logFile = path.join(home, "postgres.log");
  mkdirSync(runDir, { recursive: true });
  if (isRoot) execFileSync("chown", ["-R", "postgres:postgres", home]);

  if (!existsSync(path.join(dataDir, "PG_VERSION"))) {
    runPg(bin, "initdb", ["-D", dataDir, "-U", "dipwell", "--auth=trust", "--encoding=UTF8", "--locale=C.UTF-8"]);
  }
  const status = runPg(bin, "pg_ctl", ["-D", dataDir, "status"], { quiet: true });
  if (status.status !== 0) {
    await assertPortFree(opts.port, "PostgreSQL");
    runPg(bin, "pg_ctl", [
      "-D", dataDir, "-l", logFile, "-w", "-t", "60",
      "-o", `-c listen_addresses=127.0.0.1 -p ${opts.port} -k ${runDir} -c fsync=off -c max_connections=200`,
      "start",
    ]);
  }
  await waitForPort(opts.port, "PostgreSQL");
  return {
    port: opts.port,
    dataDir,
    url: (db) => `postgres://dipwell@127.0.0.1:${opts.port}/${db}`,
    stop: () => void runPg(bin, "pg_ctl", ["-D", dataDir, "-m", "fast", "-w", "stop"], { quiet: true }),
  };
}

export async function createDatabase(adminUrl: string, name: string, opts: { fresh?: boolean; template?: string } = {}) {
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    if (opts.fresh) await client.query(`drop database if exists "${name}" with (force)`);
    const exists = await client.query("select 1 from pg_database where datname = $1", [name]);
    if (exists.rowCount === 0) {
      await client.query(`create database "${name}"${opts.template ? ` template "${opts.template}"` : ""}`);
    }
  } finally {
    await client.end();
  }
}

// ---------------------------------------------------------------- child processes

const children = new Set<ChildProcess>();
let stoppingAll = false;

export function spawnService(
  name: string, command: string, args: string[],
  opts: { cwd: string; env?: NodeJS.ProcessEnv; quiet?: boolean; /** appends the child's output here (with `quiet`) */ logFile?: string },
) {
  const log = opts.quiet && opts.logFile ? openSync(opts.logFile, "a") : undefined;
  const child = spawn(command, args, {
    cwd: opts.cwd,
    env: { ...process.env, ...opts.env },
    stdio: opts.quiet ? ["ignore", log ?? "ignore", "pipe"] : ["ignore", "inherit", "inherit"],
  });
  if (log !== undefined) closeSync(log);
  let stderr = "";
  child.stderr?.on("data", (d) => {
    stderr = (stderr + d).slice(-4000);
    if (opts.logFile) appendFileSync(opts.logFile, d);
  });
  child.on("exit", (code, signal) => {
    children.delete(child);
    if (code && !signal) console.error(`${name} stopped (exit ${code}). ${stderr.trim().split("\n").slice(-3).join(" ")}`);
  });
  children.add(child);
  return child;
}

export type Supervised = {
  /** the running child, if any */
  current: () => ChildProcess | undefined;
  /** how many times the child was started again after it died */
  restarts: () => number;
  /** resolves with the next child started after `after` (or the current one when none is given) */
  nextStart: (after?: ChildProcess) => Promise<ChildProcess>;
  /** stops the child for good (SIGTERM, then SIGKILL after 10 s) */
  stop: () => Promise<void>;
};

/**
 * Runs a long-lived child (the app, the worker) and starts it again when it dies,
 * saying so, with a growing pause between attempts (1 s doubling to 30 s; back to
 * 1 s once a child has stayed up for a minute) so a child that cannot start does
 * not spin. This is what a production supervisor (systemd, a container runtime)
 * does; `npm start` uses it locally.
 */
export function superviseService(
  name: string, command: string, args: string[],
  opts: { cwd: string; env?: NodeJS.ProcessEnv; quiet?: boolean; log?: (line: string) => void },
): Supervised {
  const log = opts.log ?? ((line: string) => console.error(line));
  let child: ChildProcess | undefined;
  let restarts = 0;
  let pause = 1_000;
  let stopped = false;
  let timer: NodeJS.Timeout | undefined;
  const waiting: ((c: ChildProcess) => void)[] = [];

  const launch = () => {
    if (stopped || stoppingAll) return;
    const startedAt = Date.now();
    const c = (child = spawnService(name, command, args, opts));
    for (const w of waiting.splice(0)) w(c);
    c.on("exit", (code, signal) => {
      if (child === c) child = undefined;
      if (stopped || stoppingAll) return;
      if (Date.now() - startedAt > 60_000) pause = 1_000;
      const why = signal ? `was stopped by ${signal}` : `exited with code ${code}`;
      log(`${name} ${why}; starting it again in ${pause / 1000} s.`);
      timer = setTimeout(() => {
        restarts++;
        launch();
      }, pause);
      pause = Math.min(pause * 2, 30_000);
    });
  };
  launch();

  return {
    current: () => child,
    restarts: () => restarts,
    nextStart: (after) =>
      new Promise((resolve) => (child && child !== after && child.exitCode === null && !child.signalCode ? resolve(child) : waiting.push(resolve))),
    stop: async () => {
      stopped = true;
      clearTimeout(timer);
      const c = child;
      if (!c || c.exitCode !== null || c.signalCode) return;
      const exited = new Promise<void>((r) => c.once("exit", () => r()));
      c.kill("SIGTERM");
      const kill = setTimeout(() => c.kill("SIGKILL"), 10_000);
      await exited;
      clearTimeout(kill);
    },
  };
}

export function stopChildren() {
  stoppingAll = true;
  for (const child of children) child.kill("SIGTERM");
}

// ---------------------------------------------------------------- S3 fake and mail catcher

export async function startS3(opts: { projectRoot: string; dataDir: string; port: number; bucket: string; allowedOrigins: string[] }) {
  await assertPortFree(opts.port, "the S3 fake (s3rver)");
  mkdirSync(opts.dataDir, { recursive: true });
  const cors = path.join(opts.dataDir, "..", "s3-cors.xml");
  writeFileSync(
    cors,
    `<CORSConfiguration>${opts.allowedOrigins
      .map(
        (o) =>
          `<CORSRule><AllowedOrigin>${o}</AllowedOrigin><AllowedMethod>PUT</AllowedMethod><AllowedMethod>GET</AllowedMethod><AllowedMethod>HEAD</AllowedMethod><AllowedHeader>*</AllowedHeader><ExposeHeader>ETag</ExposeHeader><MaxAgeSeconds>3000</MaxAgeSeconds></CORSRule>`,
      )
      .join("")}</CORSConfiguration>`,
  );
  spawnService("s3rver", path.join(opts.projectRoot, "node_modules", ".bin", "s3rver"), [
    "-d", opts.dataDir, "-a", "127.0.0.1", "-p", String(opts.port), "--silent",
    "--configure-bucket", opts.bucket, cors,
  ], { cwd: opts.projectRoot, quiet: true });
  await waitForPort(opts.port, "s3rver");
}

export async function startMailCatcher(opts: { projectRoot: string; dataDir: string; smtpPort: number; webPort: number }) {
  await assertPortFree(opts.smtpPort, "the mail catcher (SMTP)");
  await assertPortFree(opts.webPort, "the mail catcher (web API)");
  mkdirSync(opts.dataDir, { recursive: true });
  spawnService("mail catcher", path.join(opts.projectRoot, "node_modules", ".bin", "maildev"), [
    "--smtp", String(opts.smtpPort), "--web", String(opts.webPort), "--ip", "127.0.0.1",
    "--mail-directory", opts.dataDir, "--silent",
  ], { cwd: opts.projectRoot, quiet: true });
  await waitForPort(opts.smtpPort, "the mail catcher");
  await waitForPort(opts.webPort, "the mail catcher web API");
}

/** A random signing secret for this machine's local data, made once and kept beside it. */
function localSecret(dataDir: string) {
  const file = path.join(dataDir, "auth-secret");
  if (!existsSync(file)) {
    mkdirSync(dataDir, { recursive: true });
    writeFileSync(file, randomBytes(32).toString("hex"), { mode: 0o600 });
  }
  return readFileSync(file, "utf8").trim();
}

/** Environment for the app, the worker and the tests, pointing at the local services. */
export function serviceEnv(p: { databaseUrl: string; s3Port: number; smtpPort: number; mailWebPort: number; publicUrl: string; dataDir: string }) {
  return {
    BETTER_AUTH_SECRET: localSecret(p.dataDir),
    DATABASE_URL: p.databaseUrl,
    S3_ENDPOINT: `http://127.0.0.1:${p.s3Port}`,
    S3_BUCKET: "dipwell-photos",
    S3_ACCESS_KEY_ID: "S3RVER",
    S3_SECRET_ACCESS_KEY: "S3RVER",
    S3_FORCE_PATH_STYLE: "true",
    SMTP_URL: `smtp://127.0.0.1:${p.smtpPort}`,
    MAIL_CATCHER_URL: `http://127.0.0.1:${p.mailWebPort}`,
    PUBLIC_URL: p.publicUrl,
  };
}
