// One reader thread: reads strip photos handed over by the pool (read-pool.ts), so the reader's
// pixel work runs beside the worker's main thread, one photo per thread at a time.
import { setPriority } from "node:os";
import { parentPort } from "node:worker_threads";
import { readStrip, ReadingError, type StripChart } from "../reading";

// Reading photos is background work. On Linux each thread has its own priority: this thread
// steps back (nice 10), so where the worker shares cores with the web app, pages are served
// first and reads take the rest of the processor.
try {
  setPriority(10);
} catch {
  // not supported here: read at the usual priority
}

type Task = { id: number; bytes: Uint8Array; chart: StripChart };

parentPort!.on("message", async ({ id, bytes, chart }: Task) => {
  try {
    const result = await readStrip(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), chart, { crops: true });
    parentPort!.postMessage({ id, ok: true, result });
  } catch (error) {
    const e = error as Error;
    parentPort!.postMessage({ id, ok: false, error: error instanceof ReadingError ? { code: error.code, message: error.message } : { code: null, message: e?.stack ?? String(e) } });
  }
});
