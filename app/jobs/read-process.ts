// One reader process: reads strip photos handed over by the pool (read-pool.ts), one at a time,
// and decodes newly registered photos (their size and thumbnail) the same way.
// The pool starts it at a lower priority (nice 10) as a whole process, so every thread of it
// (the reader's own, and the image library's decoding threads) steps back for the web app's
// requests where the two share cores, and reads take the rest of the processor.
import { failureOf, runReaderJob, type ReaderJob } from "./reader-job";

type Task = Omit<ReaderJob, "bytes"> & { id: number; bytes: Uint8Array };

process.on("message", async ({ id, bytes, ...job }: Task) => {
  try {
    const result = await runReaderJob({ ...job, bytes: Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength) });
    process.send!({ id, ok: true, result });
  } catch (error) {
    process.send!({ id, ok: false, error: failureOf(error) });
  }
});
// The pool going away (its worker stopped or died) ends this process too.
process.on("disconnect", () => process.exit(0));
