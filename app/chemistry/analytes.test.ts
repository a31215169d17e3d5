// The one list of analyte names: each known analyte has a name, the same name inside a sentence,
// and a form label with the unit. "as CaCO3" for alkalinity and hardness is how water analysis
// reports them (common practice; from memory of the standard methods' convention).
import { describe, expect, it } from "vitest";
import { ANALYTES, analyteLabel, analyteName, analyteWord } from "./analytes";

describe("analyte names", () => {
  it("gives a name, a word for a sentence and a form label", () => {
    expect([analyteName("free_chlorine"), analyteWord("free_chlorine"), analyteLabel("free_chlorine")]).toEqual(["Free chlorine", "free chlorine", "Free chlorine (mg/L)"]);
    expect([analyteName("ph"), analyteWord("ph"), analyteLabel("ph")]).toEqual(["pH", "pH", "pH"]);
    expect(analyteLabel("total_alkalinity")).toBe("Total alkalinity (mg/L as CaCO3)");
  });

  it("reads an analyte it does not know as its words, and never an inherited property", () => {
    expect(analyteName("nitrate_n")).toBe("Nitrate n");
    expect(analyteWord("nitrate_n")).toBe("nitrate n");
    expect(analyteName("constructor")).toBe("Constructor");
  });

  it("keeps every word the name in lower case, except pH", () => {
    for (const [key, w] of Object.entries(ANALYTES)) expect(w.word, key).toBe(key === "ph" ? "pH" : w.name.toLowerCase());
  });
});
