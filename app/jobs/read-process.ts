// One reader process: reads strip photos handed over by the pool (read-pool.ts), one at a time.
// The pool starts it at a lower priority (nice 10) as a whole process, so every thread of it
// (the reader's own, and the image library's decoding threads) steps back for the web app's
// requests where the two share cores, and reads take the rest of the processor.
import { readStrip, ReadingError, type StripChart } from "../reading";

type Task = { id: number; bytes: Uint8Array; chart: StripChart };

process.on("message", async ({ id, bytes, chart }: Task) => {
  try {
    const result = await readStrip(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), chart, { crops: true });
    process.send!({ id, ok: true, result });
  } catch (error) {
    const e = error as Error;
    process.send!({ id, ok: false, error: error instanceof ReadingError ? { code: error.code, message: error.message } : { code: null, message: e?.stack ?? String(e) } });
  }
});
// The pool going away (its worker stopped or died) ends this process too.
process.on("disconnect", () => process.exit(0));
