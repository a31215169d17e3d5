import { describe, expect, it } from "vitest";
import { LONGEST_POLL_MS, QUICK_ASKS, readingPollDelay } from "./status-poll";

describe("how often the review screen asks about a reading", () => {
  it("asks once a second at first, then less often, never more than the longest wait apart", () => {
    const delays = Array.from({ length: 30 }, (_, i) => readingPollDelay(i));
    expect(delays.slice(0, QUICK_ASKS)).toEqual(Array(QUICK_ASKS).fill(1000));
    expect(delays.slice(QUICK_ASKS, QUICK_ASKS + 4)).toEqual([1500, 2000, 2500, 3000]);
    for (let i = 1; i < delays.length; i++) expect(delays[i]).toBeGreaterThanOrEqual(delays[i - 1]);
    expect(Math.max(...delays)).toBe(LONGEST_POLL_MS);
  });

  it("asks about 20 times in the first minute rather than 60", () => {
    let t = 0;
    let asks = 0;
    while (t < 60_000) t += readingPollDelay(++asks);
    expect(asks).toBeLessThan(25);
  });
});
