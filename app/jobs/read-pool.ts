// A pool of reader threads sized to the machine's cores. Each thread reads one photo at a time; a
// thread that dies fails only its own photo (the job is retried) and is replaced.
import { availableParallelism } from "node:os";
import { Worker } from "node:worker_threads";
import { readStrip, ReadingError, type StripChart, type StripReading } from "../reading";

const THREAD_URL = new URL("./read-thread.ts", import.meta.url).href;

type Pending = { resolve: (r: StripReading) => void; reject: (e: Error) => void };
type Slot = { worker: Worker; busy: Pending & { id: number } | null };

export function readerPoolSize() {
  const fromEnv = Number(process.env.READER_THREADS);
  return Number.isInteger(fromEnv) && fromEnv > 0 ? fromEnv : Math.max(1, availableParallelism());
}

export function createReaderPool(size = readerPoolSize()) {
  const slots: Slot[] = [];
  const waiting: { bytes: Buffer; chart: StripChart; p: Pending }[] = [];
  let nextId = 1;
  let closed = false;
  // Threads that die one after another without reading anything (they cannot start): stop
  // replacing them and read in this thread instead, rather than spinning up threads for ever.
  let deathsInRow = 0;
  let inProcess = false;

  const spawn = (): Slot => {
    // The worker runs TypeScript through tsx; each thread registers tsx, then loads the reader.
    const worker = new Worker(
      `import("tsx/esm/api").then((api) => { api.register(); return import(${JSON.stringify(THREAD_URL)}); })`,
      { eval: true },
    );
    const slot: Slot = { worker, busy: null };
    worker.on("message", (msg: { id: number; ok: boolean; result?: StripReading; error?: { code: string | null; message: string } }) => {
      const task = slot.busy;
      if (!task || task.id !== msg.id) return;
      slot.busy = null;
      deathsInRow = 0;
      if (msg.ok) {
        const r = msg.result!;
        for (const pad of r.pads) if (pad.crop) pad.crop = Buffer.from(pad.crop as unknown as Uint8Array);
        task.resolve(r);
      } else if (msg.error!.code) task.reject(new ReadingError(msg.error!.code as never, msg.error!.message));
      else task.reject(new Error(msg.error!.message));
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
      task?.reject(new Error(`reader thread stopped: ${why}`));
      if (closed) return;
      if (++deathsInRow > 2 * size) {
        if (!inProcess) console.error(`reader threads keep stopping (${why}); reading in the worker's own thread`);
        inProcess = true;
        for (const w of waiting.splice(0)) readStrip(w.bytes, w.chart, { crops: true }).then(w.p.resolve, w.p.reject);
        return;
      }
      slots.push(spawn());
      pump();
    };
    worker.on("error", (e) => lost(e.message));
    worker.on("exit", (code) => lost(`exit ${code}`));
    return slot;
  };

  const pump = () => {
    for (const slot of slots) {
      if (slot.busy || !waiting.length) continue;
      const { bytes, chart, p } = waiting.shift()!;
      const id = nextId++;
      slot.busy = { id, ...p };
      slot.worker.postMessage({ id, bytes, chart });
    }
  };

  for (let i = 0; i < size; i++) slots.push(spawn());

  return {
    size,
    read(bytes: Buffer, chart: StripChart) {
      if (inProcess) return readStrip(bytes, chart, { crops: true });
      return new Promise<StripReading>((resolve, reject) => {
        waiting.push({ bytes, chart, p: { resolve, reject } });
        pump();
      });
    },
    async close() {
      closed = true;
      await Promise.all(slots.map((s) => s.worker.terminate()));
    },
  };
}
