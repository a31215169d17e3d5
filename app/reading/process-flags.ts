// How a process that reads photo after photo (the reader processes of the worker's pool, the
// reading benchmark) starts Node. Kept with the engine because it follows from how the engine
// uses memory; the engine itself reads no flag or environment.

/**
 * V8 flags for a reader process. Each read leaves a few megabytes of image buffers outside the
 * JavaScript heap (the decoded working copy, the search copy) and a few megabytes of short-lived
 * objects; with V8's small starting old generation (a few megabytes of live objects in a process
 * that only reads), that kept V8 running a full mark-compact collection about every third photo,
 * each 5–15 ms of the reading thread's time (measured with --trace-gc: 31–39 per 100 reads of a
 * 2 MP photo). Starting the old generation's limit at 128 MB leaves the garbage of a read to the
 * young generation's scavenges (1 full collection per 100 reads). It is a limit, not memory
 * taken: the heap commits only what it holds.
 */
export const READER_V8_FLAGS = ["--initial-old-space-size=128"] as const;
