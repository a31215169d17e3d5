// One reader process: reads strip photos handed over by the pool (read-pool.ts), one at a time,
// and decodes newly registered photos (their size and thumbnail) the same way.
// The pool starts it at a lower priority (nice 10) as a whole process, so every thread of it
// (the reader's own, and the image library's decoding threads) steps back for the web app's
// requests where the two share cores, and reads take the rest of the processor.
import { decodePhoto, PhotoError } from "../features/photos/decode";
import type { PhotoType } from "../features/photos/rules";
import { readStrip, ReadingError, type StripChart } from "../reading";

/** A strip to read with a chart, or (`decode`) a newly registered photo to decode once: size and thumbnail. */
type Task = { id: number; bytes: Uint8Array; chart?: StripChart; decode?: PhotoType };

process.on("message", async ({ id, bytes, chart, decode }: Task) => {
  try {
    const buffer = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    const result = decode ? await decodePhoto(buffer, decode) : await readStrip(buffer, chart!, { crops: true });
    process.send!({ id, ok: true, result });
  } catch (error) {
    const e = error as Error;
    process.send!({
      id, ok: false,
      error: error instanceof ReadingError ? { code: error.code, message: error.message } : error instanceof PhotoError ? { code: error.code, message: error.message, photo: true } : { code: null, message: e?.stack ?? String(e) },
    });
  }
});
// The pool going away (its worker stopped or died) ends this process too.
process.on("disconnect", () => process.exit(0));
