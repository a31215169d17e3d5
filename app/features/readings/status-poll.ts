// How often the review screen asks whether a reading is ready (routes/tubs/reading.tsx), shared
// with the app benchmark so that its simulated owners ask exactly as the screen does.

/** Answers after which the screen still asks once a second: a lone photo is usually read by then. */
export const QUICK_ASKS = 5;
/** The longest wait between two asks, once a reading is taking its time (a queue of photos). */
export const LONGEST_POLL_MS = 3000;

/**
 * The wait before the next ask, after `answers` answers (successful or not): one second for the
 * first few, then half a second longer each time, up to three seconds.
 */
export function readingPollDelay(answers: number): number {
  if (answers < QUICK_ASKS) return 1000;
  return Math.min(LONGEST_POLL_MS, 1000 + 500 * (answers - QUICK_ASKS + 1));
}

/** Photos ahead in the queue are counted up to this many; the screen says "more than" beyond. */
export const AHEAD_SHOWN_UP_TO = 100;
