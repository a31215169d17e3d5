// `npm run bench:app`: the production build against a service business's data, on ports of its
// own (PostgreSQL 54400, S3 4600, SMTP 1050, mail web 1100, app 3200), so it runs beside
// `npm start` and the test slots. Prints, side by side:
//   - each page's and API's median and p95 time for a technician with 500 tubs (request to last
//     byte over loopback, one request at a time);
//   - 20 and 50 concurrent photo uploads through the public flow (presign → PUT → register, then
//     until the reading is stored): throughput, p95, and an ordinary page's p95 meanwhile against
//     its p95 just before, measured the same way (requests back to back) with no uploads;
//   - e-mail delivery per second through the outbox and the worker.
// It measures whatever the code does and asserts nothing about time.
//
// The tub page's times compared idle and under the uploads are taken by a probe in a process of
// its own (page-probe.mjs), the same way both times; the uploads follow their readings as the
// owner's review screen does (the app's status API, once a second).
//
// Beside each figure, the app process's own CPU time (from /proc, where there is one): on a
// shared machine wall times wander with the other work, CPU time much less.
//
// Options: --tubs 500 --readings 500 --samples 40 --mails 300 --reuse (keep an earlier seed of
// the same size) --no-build (reuse build-bench/) --pages dashboard,csv (time only the pages whose
// name or address contains one of these words, and skip the uploads and e-mail) --profile DIR (the
// app writes a V8 CPU profile into DIR when it stops).
import { fork, type ChildProcess } from "node:child_process";
import { spawnSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import { existsSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import path from "node:path";
import pg from "pg";
import { migrateDatabase } from "../../app/ops/migrate";
import { seedScale, SCALE_ADMIN_EMAIL, SCALE_PASSWORD, SCALE_TECH_EMAIL } from "../../app/ops/seed-scale";
import {
  assertPortFree, createDatabase, serviceEnv, spawnService, startMailCatcher, startPostgres, startS3, stopChildren, waitForPort,
} from "../../app/ops/services";
import { readingPollDelay } from "../../app/features/readings/status-poll";
import { renderStripPhoto } from "../render/strip-photo";

const P = { postgres: 54400, s3: 4600, smtp: 1050, mailWeb: 1100, app: 3200 };
const root = process.cwd();
const folder = ".bench";
const dataDir = path.join(root, folder);
const buildDir = "build-bench";
const base = `http://127.0.0.1:${P.app}`;
/** The app's and the worker's output, kept for a failed run. */
const logs = { app: path.join(dataDir, "app.log"), worker: path.join(dataDir, "worker.log") };
const args = process.argv.slice(2);
const num = (name: string, fallback: number) => {
  const i = args.indexOf(`--${name}`);
  const v = i >= 0 ? Number(args[i + 1]) : fallback;
  if (!Number.isInteger(v) || v < 1) throw new Error(`--${name} needs a whole number above zero`);
  return v;
};
const TUBS = num("tubs", 500);
const READINGS = num("readings", 500);
const SAMPLES = num("samples", 40);
const MAILS = num("mails", 300);
const PAGES = (() => {
  const i = args.indexOf("--pages");
  if (i < 0) return null;
  const words = (args[i + 1] ?? "").split(",").map((w) => w.trim().toLowerCase()).filter(Boolean);
  if (!words.length) throw new Error("--pages needs words naming pages, e.g. --pages dashboard,csv");
  return words;
})();
const PROFILE = (() => {
  const i = args.indexOf("--profile");
  return i < 0 ? null : path.resolve(args[i + 1] ?? "");
})();
const FINAL = new Set(["read", "failed", "confirmed", "manual"]);

/** CPU seconds (user + system) a process has used so far, from /proc; NaN where there is none. */
function cpuSeconds(pid: number | undefined) {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
    const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    return (Number(fields[11]) + Number(fields[12])) / 100; // utime, stime in clock ticks (USER_HZ = 100)
  } catch {
    return Number.NaN;
  }
}

/** CPU seconds of a process with its descendants: the living ones, and those already ended and waited for. */
function treeCpuSeconds(pid: number | undefined): number {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
    const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    let total = (Number(f[11]) + Number(f[12]) + Number(f[13]) + Number(f[14])) / 100; // utime stime cutime cstime
    for (const task of readdirSync(`/proc/${pid}/task`)) {
      const kids = readFileSync(`/proc/${pid}/task/${task}/children`, "utf8").trim();
      for (const kid of kids ? kids.split(" ") : []) total += treeCpuSeconds(Number(kid));
    }
    return total;
  } catch {
    return 0;
  }
}

/**
 * The CPU seconds so far of everything an upload touches, by part: the app, the worker with its
 * reader processes, the S3 service, PostgreSQL (every backend), and the benchmark's own clients.
 */
function partsCpu(p: { app?: number; worker?: number; postgresDir: string }) {
  const ownKids = readFileSync(`/proc/${process.pid}/task/${process.pid}/children`, "utf8").trim().split(" ").filter(Boolean).map(Number);
  const s3 = ownKids.find((k) => {
    try {
      return readFileSync(`/proc/${k}/cmdline`, "utf8").includes("s3rver");
    } catch {
      return false;
    }
  });
  let postmaster: number | undefined;
  try {
    postmaster = Number(readFileSync(path.join(p.postgresDir, "postmaster.pid"), "utf8").split("\n")[0]);
  } catch {}
  const own = process.cpuUsage();
  const worker = treeCpuSeconds(p.worker);
  return {
    app: treeCpuSeconds(p.app), worker: cpuSeconds(p.worker), readers: worker - cpuSeconds(p.worker), s3: treeCpuSeconds(s3), postgres: treeCpuSeconds(postmaster),
    clients: (own.user + own.system) / 1e6,
  };
}
type PartsCpu = ReturnType<typeof partsCpu>;
const cpuSince = (a: PartsCpu, b: PartsCpu) => Object.fromEntries(Object.entries(b).map(([k, v]) => [k, v - a[k as keyof PartsCpu]])) as PartsCpu;

/** The page probe (page-probe.mjs): one page back to back in a process of its own. */
function startProbe() {
  const child = fork(path.join(root, "tests", "bench", "page-probe.mjs"), [], { stdio: ["ignore", "inherit", "inherit", "ipc"] });
  const next = <T>() => new Promise<T>((resolve) => child.once("message", (m) => resolve(m as T)));
  return {
    async run(url: string, cookie: string) {
      const started = next<{ started: true }>();
      child.send({ run: { url: `${base}${url}`, cookie, origin: base } });
      await started;
    },
    async stop() {
      const answer = next<{ times: number[]; starts: number[] }>();
      child.send({ stop: true });
      const a = await answer;
      this.starts = a.starts;
      return a.times;
    },
    /** When each request of the last run started (ms since the epoch). */
    starts: [] as number[],
    close: () => child.send({ exit: true }),
  };
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const quantile = (xs: number[], q: number) => {
  if (!xs.length) return Number.NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil(q * s.length) - 1)];
};
const ms = (n: number) => (Number.isFinite(n) ? n.toFixed(n < 10 ? 1 : 0) : "–");

async function signIn(email: string) {
  const res = await fetch(`${base}/api/auth/sign-in/email`, {
    method: "POST",
    headers: { "content-type": "application/json", origin: base },
    body: JSON.stringify({ email, password: SCALE_PASSWORD }),
  });
  if (!res.ok) throw new Error(`could not sign in as ${email}: ${res.status} ${await res.text()}`);
  return res.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");
}

/** One request, timed from sending to the last byte of the body. */
async function timed(url: string, cookie: string, init: RequestInit = {}) {
  const t0 = performance.now();
  const res = await fetch(url.startsWith("http") ? url : `${base}${url}`, { ...init, headers: { cookie, origin: base, ...(init.headers ?? {}) }, redirect: "manual" });
  const body = await res.arrayBuffer();
  return { ms: performance.now() - t0, status: res.status, bytes: body.byteLength, body };
}

type Row = { what: string; url: string; median: number; p95: number; status: number; kb: number; cpuMs: number };

async function measurePage(what: string, url: string, cookie: string, appPid: number | undefined): Promise<Row> {
  let last = { status: 0, bytes: 0 };
  for (let i = 0; i < 3; i++) last = await timed(url, cookie);
  const times: number[] = [];
  const cpu0 = cpuSeconds(appPid);
  for (let i = 0; i < SAMPLES; i++) {
    const r = await timed(url, cookie);
    times.push(r.ms);
    last = r;
  }
  const cpuMs = ((cpuSeconds(appPid) - cpu0) * 1000) / SAMPLES;
  return { what, url, median: quantile(times, 0.5), p95: quantile(times, 0.95), status: last.status, kb: last.bytes / 1024, cpuMs };
}

const pad = (s: string, n: number) => s.padEnd(n);
const lpad = (s: string, n: number) => s.padStart(n);

function printPages(rows: Row[]) {
  console.log(`\nPages and APIs (technician with ${TUBS} client tubs × ${READINGS} readings; ms from request to last byte, ${SAMPLES} requests each)`);
  console.log(`(app CPU: the app process's CPU time per request, user + system)`);
  console.log(`${pad("page", 32)}${lpad("median", 8)}${lpad("p95", 8)}${lpad("app CPU", 9)}${lpad("status", 8)}${lpad("KB", 8)}  url`);
  for (const r of rows) console.log(`${pad(r.what, 32)}${lpad(ms(r.median), 8)}${lpad(ms(r.p95), 8)}${lpad(ms(r.cpuMs), 9)}${lpad(String(r.status), 8)}${lpad(r.kb.toFixed(0), 8)}  ${r.url}`);
}

async function main() {
  console.log(`Dipwell app benchmark: ${TUBS} tubs × ${READINGS} readings, ${SAMPLES} samples a page\n`);
  for (const [what, port] of Object.entries(P)) if (what !== "postgres") await assertPortFree(port, `the benchmark's ${what}`);
  const postgres = await startPostgres({ projectRoot: root, folder, port: P.postgres });
  let worker: ChildProcess | undefined;
  const cleanup = () => {
    stopChildren();
    postgres.stop();
  };
  for (const signal of ["SIGINT", "SIGTERM"] as const) process.on(signal, () => (cleanup(), process.exit(130)));
  try {
    const dbName = "dipwell_bench";
    const databaseUrl = postgres.url(dbName);
    // A new database each run (migrated by the seed), unless --reuse keeps an earlier seed.
    await createDatabase(postgres.url("postgres"), dbName, { fresh: !args.includes("--reuse") });
    const sql = new pg.Pool({ connectionString: databaseUrl, max: 4 });
    const seeded = await sql
      .query(`select (select count(*)::int from tub t join "user" u on u.id = t.owner_id where u.email like '%@scale.lanternbay.test') as tubs,
                     (select count(*)::int from reading r join tub t on t.id = r.tub_id join "user" u on u.id = t.owner_id where u.email like '%@scale.lanternbay.test') as readings`)
      .then((r) => r.rows[0] as { tubs: number; readings: number })
      .catch(() => ({ tubs: 0, readings: 0 }));
    if (args.includes("--reuse") && seeded.tubs === TUBS && seeded.readings === TUBS * READINGS) {
      await migrateDatabase(databaseUrl, root);
      console.log(`Reusing the seeded data (${seeded.tubs} tubs, ${seeded.readings} readings).`);
    } else {
      console.log("Seeding with SQL…");
      const r = await seedScale({ tubs: TUBS, readings: READINGS, databaseUrl, log: console.log });
      console.log(`Seeded in ${r.seconds.toFixed(1)} s: ${r.tubs} tubs, ${r.readings} readings, ${r.waiting} waiting for review.`);
    }

    rmSync(path.join(dataDir, "s3"), { recursive: true, force: true });
    rmSync(path.join(dataDir, "mail"), { recursive: true, force: true });
    await startS3({ projectRoot: root, dataDir: path.join(dataDir, "s3"), port: P.s3, bucket: "dipwell-photos", allowedOrigins: [base] });
    await startMailCatcher({ projectRoot: root, dataDir: path.join(dataDir, "mail"), smtpPort: P.smtp, webPort: P.mailWeb });
    const env: NodeJS.ProcessEnv = {
      ...process.env,
      ...serviceEnv({ databaseUrl, s3Port: P.s3, smtpPort: P.smtp, mailWebPort: P.mailWeb, publicUrl: base, dataDir }),
      NODE_ENV: "production",
      PORT: String(P.app),
      HOST: "127.0.0.1",
      DIPWELL_BUILD_DIR: buildDir,
    };
    if (!(args.includes("--no-build") && existsSync(path.join(root, buildDir, "server", "index.js")))) {
      console.log("Building the app…");
      const b = spawnSync(path.join(root, "node_modules", ".bin", "react-router"), ["build"], { cwd: root, stdio: ["ignore", "ignore", "inherit"], env });
      if (b.status !== 0) throw new Error("The app did not build.");
    }
    for (const f of Object.values(logs)) writeFileSync(f, "");
    const app = spawnService("app", process.execPath, [...(PROFILE ? ["--cpu-prof", "--cpu-prof-dir", PROFILE] : []), "app/ops/server.mjs", `./${buildDir}/server/index.js`], { cwd: root, env, quiet: true, logFile: logs.app });
    worker = spawnService("worker", process.execPath, ["--import", "tsx", "app/jobs/worker.ts"], { cwd: root, env, quiet: true, logFile: logs.worker });
    await waitForPort(P.app, "the app", 60_000);
    // Let the worker create its queues before the outbox is used.
    await sleep(3000);

    const tech = await signIn(SCALE_TECH_EMAIL);
    const admin = await signIn(SCALE_ADMIN_EMAIL);
    const {
      rows: [pick],
    } = await sql.query(
      `select t.id as tub, (select r.id from reading r where r.tub_id = t.id order by r.taken_at desc limit 1) as reading
         from tub t join "user" u on u.id = t.owner_id where u.email like '%@scale.lanternbay.test' order by t.name limit 1`,
    );
    const tub = `/tubs/${pick.tub}`;

    // ------------------------------------------------------------ pages and APIs
    console.log("Timing pages…");
    const pages: [string, string, string][] = [
      ["dashboard (/clients)", "/clients", tech],
      // The same page's data request (middleware and loaders, no rendering): the rest of the page's time is rendering.
      ["dashboard data (/clients.data)", "/clients.data", tech],
      ["dashboard, page 10", "/clients?page=10", tech],
      ["dashboard, needing attention", "/clients?show=attention", tech],
      ["review queue", "/clients/review", tech],
      ["tub list", "/tubs", tech],
      ["tub list, page 15", "/tubs?page=15", tech],
      ["tub list, search", "/tubs?q=harbour", tech],
      ["tub page", tub, tech],
      ["history", `${tub}/history`, tech],
      ["history, page 40 by status", `${tub}/history?page=40&sort=status&dir=asc`, tech],
      ["history CSV (500 readings)", `${tub}/history.csv`, tech],
      ["trends page", `${tub}/trends`, tech],
      ["trends API, 90 days", `/api/tubs/${pick.tub}/trends`, tech],
      ["trends API, 3 years", `/api/tubs/${pick.tub}/trends?days=1095`, tech],
      ["reading", `${tub}/readings/${pick.reading}`, tech],
      ["treatment plan", `${tub}/plan`, tech],
      ["treatments", `${tub}/treatments`, tech],
      ["visit notes", `${tub}/notes`, tech],
      ["notifications", "/notifications", tech],
      ["products", "/products", tech],
      ["charts", "/charts", tech],
      ["users (admin)", "/admin/users", admin],
      ["users, search (admin)", "/admin/users?q=owner-02", admin],
      ["e-mail log (admin)", "/admin/email", admin],
    ];
    const chosen = PAGES ? pages.filter(([what, url]) => PAGES.some((w) => what.toLowerCase().includes(w) || url.toLowerCase().includes(w))) : pages;
    if (!chosen.length) throw new Error(`No page matches --pages ${PAGES!.join(",")}.`);
    const rows: Row[] = [];
    for (const [what, url, cookie] of chosen) rows.push(await measurePage(what, url, cookie, app.pid));
    if (PAGES) {
      printPages(rows);
      await sql.end();
      return;
    }

    // ------------------------------------------------------------ uploads
    console.log("Rendering the test photo and timing uploads…");
    const chart = JSON.parse(readFileSync(path.join(root, "calibration", "demo-6pad.json"), "utf8"));
    const photo = await renderStripPhoto(chart, { seed: 11, width: 2048, height: 1536 });
    const { rows: tubs } = await sql.query(
      `select t.id from tub t join "user" u on u.id = t.owner_id where u.email like '%@scale.lanternbay.test' order by t.name offset 1 limit 100`,
    );
    const ordinary = tub; // the tub page
    const uploads: {
      n: number; done: number; seconds: number; p95: number; median: number; registerP95: number; pageP95: number; pageSamples: number; idleP95: number; idleSamples: number;
      errors: string[]; appCpu: number; parts: PartsCpu; phases: { sending: number[]; reading: number[] }; idleParts: PartsCpu; idleCount: number;
    }[] = [];
    let variant = 0;
    const probe = startProbe();
    for (const n of [20, 50]) {
      const errors: string[] = [];
      // The ordinary page's idle p95 to compare with: the same probe (requests back to back, in its
      // own process) just before the uploads, with none running (so the machine's other load is
      // alike), for at least 10 s and 200 requests.
      const idle0 = partsCpu({ app: app.pid, worker: worker?.pid, postgresDir: postgres.dataDir });
      await probe.run(ordinary, tech);
      const idleStart = performance.now();
      while (performance.now() - idleStart < 10_000) await sleep(100);
      let idleTimes = await probe.stop();
      const idleParts = cpuSince(idle0, partsCpu({ app: app.pid, worker: worker?.pid, postgresDir: postgres.dataDir }));
      const idleCount = idleTimes.length;
      while (idleTimes.length < 200) {
        await probe.run(ordinary, tech);
        await sleep(1000);
        idleTimes = idleTimes.concat(await probe.stop());
      }
      await probe.run(ordinary, tech);
      const cpu0 = cpuSeconds(app.pid);
      const parts0 = partsCpu({ app: app.pid, worker: worker?.pid, postgresDir: postgres.dataDir });
      const t0 = performance.now();
      let registeredBy = 0; // when the last registration was answered (ms since the epoch)
      const results = await Promise.all(
        Array.from({ length: n }, async (_, i) => {
          // Each upload a different photo (a few bytes after the image's end make a new file).
          const bytes = Buffer.concat([photo.jpeg, Buffer.from(`bench-${randomUUID()}-${variant++}`)]);
          const tubId = tubs[i % tubs.length].id;
          const start = performance.now();
          try {
            const pre = await fetch(`${base}/api/tubs/${tubId}/uploads`, {
              method: "POST", headers: { cookie: tech, origin: base, "content-type": "application/json" },
              body: JSON.stringify({ contentType: "image/jpeg", size: bytes.length }),
            });
            if (!pre.ok) throw new Error(`presign ${pre.status}: ${(await pre.text()).slice(0, 120)}`);
            const { key, url } = (await pre.json()) as { key: string; url: string };
            const put = await fetch(url, { method: "PUT", headers: { "content-type": "image/jpeg" }, body: bytes });
            if (!put.ok) throw new Error(`PUT ${put.status}`);
            const r0 = performance.now();
            const reg = await fetch(`${base}/api/tubs/${tubId}/photos`, {
              method: "POST", headers: { cookie: tech, origin: base, "content-type": "application/json" }, body: JSON.stringify({ key }),
            });
            const registerMs = performance.now() - r0;
            registeredBy = Math.max(registeredBy, Date.now());
            if (!reg.ok) throw new Error(`register ${reg.status}: ${(await reg.text()).slice(0, 120)}`);
            const out = (await reg.json()) as { readingId?: string; photoId?: string; status?: string };
            // Ready when the reading is stored with its result (read, or could not be read), asked
            // as the owner's review screen asks: the reading's status from the app, once a second at
            // first and then less often (readingPollDelay, the screen's own schedule).
            if (!(out.status && FINAL.has(out.status))) {
              if (!out.readingId) throw new Error("registration answered without a reading");
              const deadline = Date.now() + 240_000;
              for (let answers = 1; ; answers++) {
                await sleep(readingPollDelay(answers));
                const st = await fetch(`${base}/api/tubs/${tubId}/readings/${out.readingId}`, { headers: { cookie: tech, origin: base, accept: "application/json" } });
                if (!st.ok) throw new Error(`reading status ${st.status}`);
                if (FINAL.has(((await st.json()) as { status: string }).status)) break;
                if (Date.now() > deadline) throw new Error("the reading was not ready within 240 s");
              }
            }
            return { ms: performance.now() - start, registerMs };
          } catch (error) {
            errors.push((error as Error).message);
            return null;
          }
        }),
      );
      const seconds = (performance.now() - t0) / 1000;
      const appCpu = cpuSeconds(app.pid) - cpu0;
      // Until every reading is stored the worker has done its part; the S3 service and PostgreSQL finish with it.
      const parts = cpuSince(parts0, partsCpu({ app: app.pid, worker: worker?.pid, postgresDir: postgres.dataDir }));
      const pageTimes = await probe.stop();
      // The tub page while the photos were sent and registered, and afterwards while they were read.
      const sending = pageTimes.filter((_, i) => probe.starts[i] < registeredBy);
      const reading = pageTimes.filter((_, i) => probe.starts[i] >= registeredBy);
      const ok = results.filter((r): r is { ms: number; registerMs: number } => r !== null);
      uploads.push({
        n, done: ok.length, seconds, median: quantile(ok.map((r) => r.ms), 0.5), p95: quantile(ok.map((r) => r.ms), 0.95),
        registerP95: quantile(ok.map((r) => r.registerMs), 0.95), pageP95: quantile(pageTimes, 0.95), pageSamples: pageTimes.length,
        idleP95: quantile(idleTimes, 0.95), idleSamples: idleTimes.length, errors, appCpu, parts, idleParts, idleCount, phases: { sending, reading },
      });
      await sleep(2000);
    }
    probe.close();

    // ------------------------------------------------------------ e-mail
    console.log(`Queuing ${MAILS} e-mails through the outbox…`);
    Object.assign(process.env, env);
    const { enqueueEmail } = await import("../../app/features/notify/outbox.server");
    const run = randomUUID().slice(0, 8);
    const countSent = async () =>
      (await sql.query("select count(*)::int as n from email_log where dedupe_key like $1 and status = 'sent'", [`bench:${run}:%`])).rows[0].n as number;
    const m0 = performance.now();
    let next = 0;
    await Promise.all(
      Array.from({ length: 8 }, async () => {
        for (let i = next++; i < MAILS; i = next++) {
          await enqueueEmail({
            kind: "test_due", to: `owner-${String((i % TUBS) + 1).padStart(4, "0")}@scale.lanternbay.test`, dedupeKey: `bench:${run}:${i}`,
            subject: "A water test is due (benchmark)", text: "A benchmark message.", html: "<p>A benchmark message.</p>",
          });
        }
      }),
    );
    const queuedAt = performance.now();
    const queuedSeconds = (queuedAt - m0) / 1000;
    const sentWhenQueued = await countSent();
    let sent = sentWhenQueued;
    const deadline = performance.now() + 120_000;
    let lastSentAt = queuedAt;
    while (sent < MAILS && performance.now() < deadline) {
      await sleep(200);
      const c = await countSent();
      if (c > sent) lastSentAt = performance.now();
      sent = c;
    }
    // Delivery rate once everything is queued; when the worker kept up with the queuing
    // itself, the whole run from the first message.
    const mailSeconds = (lastSentAt - (sentWhenQueued < MAILS / 2 ? queuedAt : m0)) / 1000;
    const mailRate = (sentWhenQueued < MAILS / 2 ? sent - sentWhenQueued : sent) / Math.max(0.001, mailSeconds);

    // ------------------------------------------------------------ report
    printPages(rows);
    console.log(`\nConcurrent photo uploads (3 MP JPEG; presign → PUT → register → reading stored)`);
    console.log(`(tub page p95: its requests back to back during the uploads, from a process of their own; idle p95: the same just before them, with no uploads;`);
    console.log(` app CPU: the app process's CPU seconds while the uploads ran, the tub page's requests included)`);
    console.log(`${pad("uploads", 10)}${lpad("ready", 7)}${lpad("per s", 8)}${lpad("median", 9)}${lpad("p95", 9)}${lpad("register p95", 14)}${lpad("tub page p95", 14)}${lpad("(n)", 7)}${lpad("idle p95", 10)}${lpad("(n)", 7)}${lpad("app CPU s", 11)}`);
    for (const u of uploads) {
      console.log(`${pad(String(u.n), 10)}${lpad(`${u.done}/${u.n}`, 7)}${lpad((u.done / u.seconds).toFixed(2), 8)}${lpad(ms(u.median), 9)}${lpad(ms(u.p95), 9)}${lpad(ms(u.registerP95), 14)}${lpad(ms(u.pageP95), 14)}${lpad(String(u.pageSamples), 7)}${lpad(ms(u.idleP95), 10)}${lpad(String(u.idleSamples), 7)}${lpad(u.appCpu.toFixed(1), 11)}`);
      for (const e of [...new Set(u.errors)].slice(0, 3)) console.log(`    error: ${e}`);
    }
    console.log(`\nThe tub page's p95 (n) while the photos were sent and registered, and afterwards while they were read`);
    for (const u of uploads) {
      const { sending, reading } = u.phases;
      console.log(`${pad(String(u.n), 10)}${lpad(ms(quantile(sending, 0.95)), 8)}${lpad(`(${sending.length})`, 7)}${lpad(ms(quantile(reading, 0.95)), 10)}${lpad(`(${reading.length})`, 7)}`);
    }
    console.log(`\nCPU seconds per upload while they ran, by part, less the tub page probe's share (its CPU per request`);
    console.log(`in the first 10 s of idle probing, times its requests during the uploads); readers: the worker's reader processes`);
    console.log(`${pad("uploads", 10)}${lpad("app", 8)}${lpad("worker", 8)}${lpad("readers", 9)}${lpad("S3", 8)}${lpad("PostgreSQL", 12)}${lpad("all served", 12)}${lpad("clients", 9)}`);
    for (const u of uploads) {
      const k = u.pageSamples / Math.max(1, u.idleCount);
      const p = Object.fromEntries(Object.entries(u.parts).map(([key, v]) => [key, v - (key === "clients" ? 0 : k * u.idleParts[key as keyof PartsCpu])])) as PartsCpu;
      const per = (x: number) => (x / u.n).toFixed(3);
      console.log(`${pad(String(u.n), 10)}${lpad(per(p.app), 8)}${lpad(per(p.worker), 8)}${lpad(per(p.readers), 9)}${lpad(per(p.s3), 8)}${lpad(per(p.postgres), 12)}${lpad(per(p.app + p.worker + p.readers + p.s3 + p.postgres), 12)}${lpad(per(p.clients), 9)}`);
    }
    console.log(`\nE-mail: ${MAILS} queued through the outbox in ${queuedSeconds.toFixed(1)} s (${sentWhenQueued} already sent by then); ${sent} sent, ${mailRate.toFixed(1)} per s${sent < MAILS ? " (stopped waiting after 120 s)" : ""}`);

    const dashboard = rows[0];
    const slowest = rows.reduce((a, b) => (b.p95 > a.p95 ? b : a));
    const under50 = uploads.find((u) => u.n === 50)!;
    console.log("");
    console.log(`dashboard p95: ${Math.round(dashboard.p95)} ms`);
    console.log(`slowest page p95: ${Math.round(slowest.p95)} ms (${slowest.what})`);
    console.log(`page p95 under 50 uploads / idle: ${(under50.pageP95 / under50.idleP95).toFixed(2)}`);
    console.log(`mail per second: ${mailRate.toFixed(1)}`);
    await sql.end();
  } finally {
    worker?.kill("SIGTERM");
    cleanup();
  }
  process.exit(0);
}

main().then(() => process.exit(0)).catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  for (const [what, file] of Object.entries(logs)) {
    const lines = existsSync(file) ? readFileSync(file, "utf8").trim().split("\n").filter((l) => !/^(GET|POST|PUT|HEAD) \//.test(l)) : [];
    if (lines.length) console.error(`\nThe ${what}'s last output (${path.relative(root, file)}):\n${lines.slice(-15).join("\n")}`);
  }
  stopChildren();
  process.exit(1);
});
