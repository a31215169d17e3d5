// What the fault tests share: the app and the worker run as real processes
// under the same supervisor `npm start` uses (so a killed child comes back on
// its own), PostgreSQL is the test run's real cluster (stopped and started
// again), and a small SMTP relay in front of the real mail catcher can be
// stalled, so a worker can be killed while a message is on the wire.
import type { ChildProcess } from "node:child_process";
import net from "node:net";
import { startPostgres, superviseService, waitForPort, type Supervised } from "../../app/ops/services";

const root = process.cwd();
export const APP_PORT = Number(process.env.DIPWELL_FAULT_APP_PORT);
export const APP_URL = `http://127.0.0.1:${APP_PORT}`;
const PROXY_PORT = Number(process.env.DIPWELL_FAULT_SMTP_PROXY_PORT);
const REAL_SMTP_PORT = Number(process.env.DIPWELL_REAL_SMTP_PORT);
export const CATCHER_URL = process.env.MAIL_CATCHER_URL!;

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Polls `check` every 100 ms until it returns a value other than undefined/false, or fails after `timeoutMs`. */
export async function until<T>(what: string, check: () => Promise<T | undefined | false> | T | undefined | false, timeoutMs = 60_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  let last: unknown;
  while (Date.now() < end) {
    try {
      const v = await check();
      if (v !== undefined && v !== false) return v as T;
    } catch (error) {
      last = error;
    }
    await sleep(100);
  }
  throw new Error(`gave up waiting for ${what} after ${timeoutMs / 1000} s${last ? ` (last error: ${(last as Error).message})` : ""}`);
}

// ------------------------------------------------------------------ PostgreSQL

function cluster() {
  return startPostgres({ projectRoot: root, folder: process.env.DIPWELL_PG_FOLDER!, port: Number(process.env.DIPWELL_PG_PORT) });
}

/** Stops the test run's PostgreSQL (fast shutdown: sessions are cut off), waits `downMs`, starts it again. */
export async function restartPostgres(downMs = 3_000, whileDown?: () => Promise<void>) {
  (await cluster()).stop();
  const back = Date.now() + downMs;
  if (whileDown) await whileDown();
  await sleep(Math.max(0, back - Date.now()));
  await cluster();
}

// ------------------------------------------------------------------ app and worker

export type Stack = { app: Supervised; worker: Supervised; log: string[]; stop: () => Promise<void> };

export function childEnv(extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  return {
    ...process.env,
    NODE_ENV: "production",
    PORT: String(APP_PORT),
    HOST: "127.0.0.1",
    PUBLIC_URL: APP_URL,
    SMTP_URL: `smtp://127.0.0.1:${PROXY_PORT}`,
    DIPWELL_FAULTS: "",
    VITEST: "",
    ...extra,
  };
}

/** Starts the built app and a worker, each supervised, against this file's database. */
export async function startStack(opts: { app?: boolean; worker?: boolean; env?: Record<string, string> } = {}): Promise<Stack> {
  const log: string[] = [];
  const env = childEnv(opts.env);
  const common = { cwd: root, env, quiet: true, log: (line: string) => log.push(line) };
  const buildDir = process.env.DIPWELL_BUILD_DIR ?? "build";
  const app = opts.app === false ? undefined : superviseService("app", process.execPath, ["app/ops/server.mjs", `./${buildDir}/server/index.js`], common);
  const worker = opts.worker === false ? undefined : superviseService("worker", process.execPath, ["--import", "tsx", "app/jobs/worker.ts"], common);
  if (app) await waitForPort(APP_PORT, "the app under fault test", 60_000);
  const none: Supervised = { current: () => undefined, restarts: () => 0, nextStart: () => new Promise(() => {}), stop: async () => {} };
  return {
    app: app ?? none,
    worker: worker ?? none,
    log,
    stop: async () => {
      await Promise.all([app?.stop(), worker?.stop()]);
    },
  };
}

/** Kills a supervised child at once (SIGKILL: no clean-up, like a crash or an out-of-memory kill). */
export async function kill(s: Supervised): Promise<ChildProcess> {
  const c = s.current();
  if (!c) throw new Error("nothing to kill: the child is not running");
  const exited = new Promise<void>((r) => c.once("exit", () => r()));
  c.kill("SIGKILL");
  await exited;
  return c;
}

export async function get(pathname: string, headers: Record<string, string> = {}) {
  const res = await fetch(APP_URL + pathname, { headers, redirect: "manual", signal: AbortSignal.timeout(20_000) });
  return { status: res.status, body: await res.text(), headers: res.headers };
}

// ------------------------------------------------------------------ SMTP relay

export type SmtpRelay = {
  /** hold every byte the clients send from now on (a server that has gone quiet mid-message) */
  stall: () => void;
  /** pass bytes again (held bytes of cut connections are dropped) */
  resume: () => void;
  /** connections that hold stalled bytes and are still open (a killed client's close arrives later than its exit) */
  holding: () => number;
  /** connections open now */
  open: () => number;
  close: () => Promise<void>;
};

/** A TCP relay from the fault SMTP port to the real mail catcher that can be stalled. */
export async function smtpRelay(): Promise<SmtpRelay> {
  let stalled = false;
  const sockets = new Set<net.Socket>();
  const held: { client: net.Socket; write: () => void }[] = [];
  const server = net.createServer((client) => {
    const upstream = net.connect(REAL_SMTP_PORT, "127.0.0.1");
    sockets.add(client);
    sockets.add(upstream);
    const closeBoth = () => {
      client.destroy();
      upstream.destroy();
      sockets.delete(client);
      sockets.delete(upstream);
    };
    client.on("error", closeBoth).on("close", closeBoth);
    upstream.on("error", closeBoth).on("close", closeBoth);
    upstream.on("data", (d) => client.write(d));
    client.on("data", (d) => {
      if (!stalled) return void upstream.write(d);
      held.push({ client, write: () => !client.destroyed && !upstream.destroyed && upstream.write(d) });
    });
  });
  await new Promise<void>((r) => server.listen(PROXY_PORT, "127.0.0.1", r));
  return {
    stall: () => void (stalled = true),
    resume: () => {
      stalled = false;
      for (const h of held.splice(0)) h.write();
    },
    holding: () => new Set(held.filter((h) => !h.client.destroyed).map((h) => h.client)).size,
    open: () => [...sockets].length / 2,
    close: async () => {
      for (const s of sockets) s.destroy();
      await new Promise<void>((r) => server.close(() => r()));
    },
  };
}

type Caught = { subject: string; to?: { address: string }[]; html?: string; messageId?: string; headers: Record<string, string> };

/**
 * Every complete message the catcher holds for addresses ending in `suffix`. The catcher also
 * files what it got of a conversation cut mid-message (no end-of-data mark, so never delivered
 * by a real server); those fragments lack the end of the HTML body and are not counted.
 */
export async function caughtMail(suffix: string): Promise<(Caught & { to: { address: string }[] })[]> {
  const res = await fetch(`${CATCHER_URL}/email`);
  const all = (await res.json()) as Caught[];
  return all.filter((m): m is Caught & { to: { address: string }[] } => Boolean(m.to?.some((t) => t.address.endsWith(suffix)) && m.html?.includes("</p>")));
}
