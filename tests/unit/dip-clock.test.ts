// Where a remembered dip puts the owner: counting down, photographing, or dipping a new strip.
import { describe, expect, it } from "vitest";
import { dipState, STRIP_FRESH_SECONDS } from "~/components/reading/dip-clock";

describe("dip clock", () => {
  const now = 1_800_000_000_000;
  it("nothing remembered: the first step", () => expect(dipState(null, 15, now)).toEqual({ step: "prepare", stale: false }));
  it("inside the wait: the countdown, from when the strip came out", () => expect(dipState(now - 4_000, 15, now)).toEqual({ step: "countdown", startedAt: now - 4_000 }));
  it("after the wait, while the colours hold: the photo", () => expect(dipState(now - 40_000, 15, now)).toEqual({ step: "photo" }));
  it("long after: a new strip", () => expect(dipState(now - (STRIP_FRESH_SECONDS + 1) * 1000, 15, now)).toEqual({ step: "prepare", stale: true }));
});
