// One reader process: reads the strip photos the pool (read-pool.ts) hands over, one at a time,
// each in one visit: it fetches the photo from storage itself, checks and decodes a newly
// registered one (its size and thumbnail), and reads it (reader-job.ts).
// The pool starts it at a lower priority (nice 10) as a whole process, so every thread of it
// (the reader's own, the image library's decoding threads, the fetch from storage) steps back for
// the web app's requests where the two share cores, and reads take the rest of the processor.
import { writeFileSync } from "node:fs";
import { getPriority } from "node:os";
import sharp from "sharp";
import { failureOf, runPhotoRead, type PhotoRead } from "./reader-job";

// No libvips operation cache: each photo is decoded once for its reading (and once, smaller, for
// its thumbnail), so a cached operation is never used again, and keeping and evicting them cost
// time and memory (reads of the real practice photos in a loop: medians 29–36 ms without the cache
// against 32–43 ms with it, here). The reading benchmark measures reads the same way.
sharp.cache(false);

// Started in a session of its own: where the kernel schedules sessions as groups (Linux autogroup),
// plain nice only orders the processes within a group, so the group is given the reader's nice
// value too. Elsewhere there is no such file, and the process's own priority is all there is.
try {
  writeFileSync("/proc/self/autogroup", String(getPriority()));
} catch {}

process.on("message", async ({ id, ...job }: PhotoRead & { id: number }) => {
  try {
    process.send!({ id, ok: true, result: await runPhotoRead(job) });
  } catch (error) {
    process.send!({ id, ok: false, error: failureOf(error) });
  }
});
// The pool going away (its worker stopped or died) ends this process too.
process.on("disconnect", () => process.exit(0));
