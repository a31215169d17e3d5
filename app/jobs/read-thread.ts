// One reader thread: reads strip photos handed over by the pool (read-pool.ts), so the reader's
// pixel work runs beside the worker's main thread, one photo per thread at a time.
import { parentPort } from "node:worker_threads";
import { readStrip, ReadingError, type StripChart } from "../reading";

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
