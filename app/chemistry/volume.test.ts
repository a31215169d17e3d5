import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { drainIntervalDays, estimateVolumeLitres, litresFromUsGallons, usGallonsFromLitres } from "./volume";

describe("drain-and-refill interval", () => {
  // Maine 10-144 CMR ch. 202 App. B "Water Replacement Interval": 600 gal, 85 bathers/day → 2.4 → 2 days.
  it("reproduces the Maine App. B example", () => {
    expect(drainIntervalDays(litresFromUsGallons(600), 85)).toBe(2);
  });
  // Derived test values, chemistry.md §5 [D]: 400 gal at 4/day → 33.3 days; 1500 L at 2/day → 66 days.
  it("matches the derived values", () => {
    expect(drainIntervalDays(litresFromUsGallons(400), 4)).toBe(33);
    expect(drainIntervalDays(1500, 2)).toBe(66);
  });
  it("rejects zero bathers and bad volumes", () => {
    expect(() => drainIntervalDays(1000, 0)).toThrow(RangeError);
    expect(() => drainIntervalDays(-5, 2)).toThrow(RangeError);
  });
});

describe("units and volume", () => {
  // 1 US gal = 3.785411784 L exactly (NIST Handbook 44, Appendix C).
  it("converts US gallons exactly", () => {
    expect(litresFromUsGallons(1)).toBe(3.785411784);
    expect(usGallonsFromLitres(3.785411784)).toBe(1);
  });
  it("round-trips (property)", () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1e6, noNaN: true }), (x) => {
        expect(usGallonsFromLitres(litresFromUsGallons(x))).toBeCloseTo(x, 6);
        expect(litresFromUsGallons(usGallonsFromLitres(x))).toBeCloseTo(x, 6);
      }),
    );
  });
  it("estimates volume from inside dimensions (geometry)", () => {
    expect(estimateVolumeLitres("rectangular", { length: 200, width: 150 }, 80)).toBe(2400);
    expect(estimateVolumeLitres("square", { side: 200 }, 75)).toBe(3000);
    expect(estimateVolumeLitres("round", { diameter: 180 }, 70)).toBeCloseTo((Math.PI * 90 * 90 * 70) / 1000, 6);
    expect(() => estimateVolumeLitres("round", { diameter: -1 }, 70)).toThrow(RangeError);
  });
});
