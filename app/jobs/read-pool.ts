// A pool of reader processes sized to the machine's cores. Each process reads one photo at a time;
// a process that dies fails only its own photo (the job is retried) and is replaced. The processes
// run at a lower priority (nice 10), every thread of them: where the worker shares the machine
// with the web app, pages are served first and reading takes the rest of the processor.
import { spawn as spawnProcess, spawnSync, type ChildProcess } from "node:child_process";
import { existsSync } from "node:fs";
import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { READER_V8_FLAGS } from "../reading/process-flags";
import { errorOf, runPhotoRead, type PhotoRead as Job, type PhotoReadResult, type ReaderFailure } from "./reader-job";

const PROCESS_FILE = fileURLToPath(new URL("./read-process.ts", import.meta.url));
/** How far reading steps back for the web app (the `nice` increment, 0–19). */
const READER_NICENESS = 10;
const NICE = ["/usr/bin/nice", "/bin/nice"].find((p) => existsSync(p));
/**
 * Where the system allows it (Linux, `chrt`), reader processes also run under the idle scheduling
 * policy: they use a processor only when no ordinary process wants it, and a request of the web app
 * that wakes up takes the processor from them at once, instead of after their time slice.
 */
const CHRT = ["/usr/bin/chrt", "/bin/chrt"].find((p) => existsSync(p));
let idlePolicy: boolean | undefined;
const idlePolicyWorks = () => (idlePolicy ??= Boolean(CHRT) && spawnSync(CHRT!, ["--idle", "0", "true"]).status === 0);

type Pending = { resolve: (r: PhotoReadResult) => void; reject: (e: Error) => void };
type Slot = { worker: ChildProcess; busy: Pending & { id: number } | null };

/** A reader process: Node with the reader's heap flags and the TypeScript loader, started through `nice` (and `chrt --idle`) where there are. */
function startReader(): ChildProcess {
  const node = [process.execPath, ...READER_V8_FLAGS, "--import", import.meta.resolve("tsx"), PROCESS_FILE];
  const niced = NICE ? [NICE, "-n", String(READER_NICENESS), ...node] : node;
  const [command, ...args] = idlePolicyWorks() ? [CHRT!, "--idle", "0", ...niced] : niced;
  // A session of its own (detached): where the kernel groups processes by session for scheduling
  // (autogroup), a reader's priority then counts against the web app's processes, not only within
  // the worker's session (read-process.ts gives its group the reader's own nice value).
  return spawnProcess(command, args, { stdio: ["ignore", "inherit", "inherit", "ipc"], serialization: "advanced", detached: true });
}

export function readerPoolSize() {
  const fromEnv = Number(process.env.READER_PROCESSES ?? process.env.READER_THREADS);
  return Number.isInteger(fromEnv) && fromEnv > 0 ? fromEnv : Math.max(1, availableParallelism());
}

export function createReaderPool(size = readerPoolSize()) {
  const slots: Slot[] = [];
  const waiting: { job: Job; p: Pending }[] = [];
  let nextId = 1;
  let closed = false;
  // Processes that die one after another without reading anything (they cannot start): stop
  // replacing them and read in this process instead, rather than starting processes for ever.
  let deathsInRow = 0;
  let inProcess = false;

  const spawn = (): Slot => {
    const worker = startReader();
    const slot: Slot = { worker, busy: null };
    worker.on("message", (msg: { id: number; ok: boolean; result?: PhotoReadResult; error?: ReaderFailure }) => {
      const task = slot.busy;
      if (!task || task.id !== msg.id) return;
      slot.busy = null;
      deathsInRow = 0;
      if (msg.ok) task.resolve(msg.result!);
      else task.reject(errorOf(msg.error!));
      pump();
    });
    let gone = false;
    const lost = (why: string) => {
      if (gone) return;
      gone = true;
      const task = slot.busy;
      slot.busy = null;
      const i = slots.indexOf(slot);
      if (i >= 0) slots.splice(i, 1);
      task?.reject(new Error(`reader process stopped: ${why}`));
      if (closed) return;
      if (++deathsInRow > 2 * size) {
        if (!inProcess) console.error(`reader processes keep stopping (${why}); reading in the worker's own process`);
        inProcess = true;
        for (const w of waiting.splice(0)) runPhotoRead(w.job).then(w.p.resolve, w.p.reject);
        return;
      }
      slots.push(spawn());
      pump();
    };
    worker.on("error", (e) => lost(e.message));
    worker.on("exit", (code, signal) => lost(signal ? `signal ${signal}` : `exit ${code}`));
    return slot;
  };

  const pump = () => {
    for (const slot of slots) {
      if (slot.busy || !waiting.length) continue;
      const { job, p } = waiting.shift()!;
      const id = nextId++;
      slot.busy = { id, ...p };
      slot.worker.send({ id, ...job });
    }
  };

  const run = (job: Job): Promise<PhotoReadResult> => {
    if (inProcess) return runPhotoRead(job);
    return new Promise((resolve, reject) => {
      waiting.push({ job, p: { resolve, reject } });
      pump();
    });
  };

  for (let i = 0; i < size; i++) slots.push(spawn());

  return {
    size,
    /** Reads a kept photo in one visit to a reader process (see PhotoRead), at the readers' priority. */
    read: run,
    async close() {
      closed = true;
      await Promise.all(
        slots.map((s) => (s.worker.exitCode !== null || s.worker.signalCode !== null ? null : new Promise((done) => (s.worker.once("exit", done), s.worker.kill())))),
      );
    },
  };
}
